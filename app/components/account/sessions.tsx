import { Form } from "react-router";
import { AccountSection, formatUtc } from "~/components/account/section";
import { Button } from "~/components/ui/button";

type SignedInSession = { id: string; userAgent: string | null; ip: string | null; createdAt: Date | string; current: boolean };

/**
 * Where the person is signed in, each with a way out named by its device and sign-in time (a list of
 * identical "Sign out" buttons tells no one which is which), this device marked, and a way out of all.
 */
export function Sessions({ sessions, busy }: { sessions: SignedInSession[]; busy: boolean }) {
  return (
    <AccountSection id="sessions-title" title="Where you are signed in">
      <ul className="divide-y divide-ink-900/10">
        {sessions.map((session) => {
          const device = describeDevice(session.userAgent);
          const since = formatUtc(session.createdAt);
          return (
            <li key={session.id} className="flex flex-col gap-2 py-3 sm:flex-row sm:items-center sm:justify-between">
              <div className="text-sm">
                <p className="font-medium">
                  {device}
                  {session.current ? (
                    <span className="ml-2 rounded border border-ink-700 px-1.5 text-xs font-medium text-ink-800">this device</span>
                  ) : null}
                </p>
                <p className="text-ink-600">
                  Signed in <time dateTime={new Date(session.createdAt).toISOString()}>{since}</time>
                  {session.ip ? ` · from ${session.ip}` : ""}
                </p>
              </div>
              <Form method="post">
                <input type="hidden" name="intent" value="end-session" />
                <input type="hidden" name="sessionId" value={session.id} />
                <Button type="submit" variant="secondary" disabled={busy} className="text-left">
                  {session.current ? `Sign out this device (${device})` : `Sign out ${device}, signed in ${since}`}
                </Button>
              </Form>
            </li>
          );
        })}
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

/** The browser and system named in a user agent, simply ("Chromium on Linux"); enough to recognise one's own devices. */
function describeDevice(userAgent: string | null): string {
  if (!userAgent) return "Unknown device";
  const browser = /Firefox\//.test(userAgent)
    ? "Firefox"
    : /Edg\//.test(userAgent)
      ? "Edge"
      : /HeadlessChrome\//.test(userAgent)
        ? "Headless Chromium"
        : /Chromium\//.test(userAgent)
          ? "Chromium"
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
