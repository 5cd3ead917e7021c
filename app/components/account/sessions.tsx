import { Form } from "react-router";
import { AccountSection, formatUtc } from "~/components/account/section";
import { Button } from "~/components/ui/button";

type SignedInSession = { id: string; userAgent: string | null; ip: string | null; createdAt: Date | string; current: boolean };

/** Where the person is signed in, each with a way out, and a way out of all of them. */
export function Sessions({ sessions, busy }: { sessions: SignedInSession[]; busy: boolean }) {
  return (
    <AccountSection id="sessions-title" title="Where you are signed in">
      <ul className="divide-y divide-ink-900/10">
        {sessions.map((session) => (
          <li key={session.id} className="flex flex-col gap-2 py-3 sm:flex-row sm:items-center sm:justify-between">
            <div className="text-sm">
              <p className="font-medium">
                {describeDevice(session.userAgent)}
                {session.current ? " · this device" : ""}
              </p>
              <p className="text-ink-600">
                Since <time dateTime={new Date(session.createdAt).toISOString()}>{formatUtc(session.createdAt)}</time>
                {session.ip ? ` · from ${session.ip}` : ""}
              </p>
            </div>
            <Form method="post">
              <input type="hidden" name="intent" value="end-session" />
              <input type="hidden" name="sessionId" value={session.id} />
              <Button
                type="submit"
                variant="secondary"
                disabled={busy}
                aria-label={`Sign out ${describeDevice(session.userAgent)}${session.current ? " (this device)" : ""}`}
              >
                Sign out
              </Button>
            </Form>
          </li>
        ))}
      </ul>
      <Form method="post" className="mt-3">
        <input type="hidden" name="intent" value="sign-out-everywhere" />
        <Button type="submit" variant="danger" disabled={busy}>
          Sign out everywhere
        </Button>
      </Form>
    </AccountSection>
  );
}

function describeDevice(userAgent: string | null): string {
  if (!userAgent) return "Unknown device";
  const browser = /Firefox\//.test(userAgent)
    ? "Firefox"
    : /Edg\//.test(userAgent)
      ? "Edge"
      : /Chrome\//.test(userAgent)
        ? "Chrome"
        : /Safari\//.test(userAgent)
          ? "Safari"
          : "A browser";
  const system = /Android/.test(userAgent)
    ? "Android"
    : /iPhone|iPad/.test(userAgent)
      ? "iOS"
      : /Mac OS X/.test(userAgent)
        ? "macOS"
        : /Windows/.test(userAgent)
          ? "Windows"
          : /Linux/.test(userAgent)
            ? "Linux"
            : null;
  return system ? `${browser} on ${system}` : browser;
}
