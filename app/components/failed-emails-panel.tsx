import { formatDateTime } from "~/lib/format-date";
import type { FailedEmail } from "~/server/email/failed-emails.server";
import { counted } from "~/lib/plural";

/**
 * Shown to instructors on a course page: messages the course sent that never arrived, so that someone
 * can tell the student another way. Renders nothing when every message went out.
 */
export function FailedEmailsPanel({ failedEmails, timeZone }: { failedEmails: FailedEmail[]; timeZone: string }) {
  if (failedEmails.length === 0) return null;
  // In the course's zone, so the server's text and the browser's agree.
  const formatTime = (value: Date | null) => (value ? formatDateTime(value, timeZone) : "—");
  return (
    <section aria-labelledby="failed-emails-heading" className="rounded-lg border border-amber-400 bg-paper-50 p-4 text-ink-800">
      <h2 id="failed-emails-heading" className="font-semibold">
        {counted(failedEmails.length, "e-mail", "e-mails")} could not be delivered
      </h2>
      <p className="mt-1 text-sm text-ink-600">
        Benchpost tried each one several times, or could not send it at all (the reason is below). Check the address, or reach the person
        another way.
      </p>
      <ul className="mt-3 divide-y divide-paper-200">
        {failedEmails.map((email) => (
          <li key={email.id} className="py-2 text-sm">
            <p className="font-medium">{email.subject}</p>
            <p>
              To {email.toName ? `${email.toName} <${email.toAddress}>` : email.toAddress} ·{" "}
              {email.attempts === 0
                ? `not sent: refused ${formatTime(email.failedAt)}`
                : `gave up ${formatTime(email.failedAt)} after ${counted(email.attempts, "attempt", "attempts")}`}
            </p>
            {email.lastError ? <p className="mt-1 break-words font-mono text-xs text-ink-600">{email.lastError}</p> : null}
          </li>
        ))}
      </ul>
    </section>
  );
}
