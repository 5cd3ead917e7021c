import { Form } from "react-router";
import { AccountSection } from "~/components/account/section";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";

/**
 * The private calendar address: made (or reset) here and shown once, right after, because only its
 * hash is kept. Resetting stops the old address at once.
 */
export function CalendarFeed({ made, url, busy }: { made: boolean; url?: string; busy: boolean }) {
  return (
    <AccountSection id="calendar-title" title="Calendar">
      <p className="text-sm text-ink-700">
        A private address for your calendar app (subscribe to it by URL): the due times and cut-offs of your labs, with your own extensions,
        and the day your kit must be back. Anyone with the address can read it, so keep it to yourself.
      </p>
      {url ? (
        <div className="mt-3">
          <Notice tone="success">
            <p>Your calendar address is ready. Copy it now: it is shown only this once.</p>
            <label htmlFor="calendar-feed-url" className="mt-2 block font-medium">
              Calendar address
            </label>
            <input
              id="calendar-feed-url"
              type="text"
              readOnly
              value={url}
              onFocus={(event) => event.currentTarget.select()}
              className="mt-1 w-full rounded bg-white px-2 py-1 font-mono text-ink-950 ring-1 ring-ink-900/20"
            />
          </Notice>
        </div>
      ) : made ? (
        <p className="mt-2 text-sm text-ink-700">
          You have a calendar address. It cannot be shown again; if you lost it, or someone else has it, reset it: the old address stops
          working at once.
        </p>
      ) : null}
      <Form method="post" className="mt-3">
        <input type="hidden" name="intent" value="calendar-feed" />
        <Button type="submit" variant={made ? "secondary" : undefined} disabled={busy}>
          {made ? "Reset it" : "Make my calendar address"}
        </Button>
      </Form>
    </AccountSection>
  );
}
