/** The receipt of the student's counted hand-in: its version and when it was stored, the course's zone named. */
import { formatDateTime } from "~/lib/format-date";

export function HandInReceipt({
  version,
  timeZone,
}: {
  version: { version: number; submittedAt: string; late: boolean };
  timeZone: string;
}) {
  return (
    <section id="receipt" aria-labelledby="receipt-heading" className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <h2 id="receipt-heading" className="text-lg font-semibold">
        Receipt
      </h2>
      <p className="mt-1">
        Version <strong>{version.version}</strong> handed in on{" "}
        <time dateTime={version.submittedAt}>{formatDateTime(version.submittedAt, timeZone, "seconds")}</time>
        {version.late ? ", late" : ", on time"}.
      </p>
      <p className="mt-1 text-sm text-ink-700">
        The latest version is the one that counts. Each hand-in&apos;s receipt is also e-mailed to you.
      </p>
    </section>
  );
}
