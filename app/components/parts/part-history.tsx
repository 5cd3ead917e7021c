import { KitName } from "~/components/parts/kit-name";
import type { PartOnPage } from "~/components/parts/part-on-page";
import { formatDateTime } from "~/lib/format-date";
import { formatFieldValue, partFieldLabels } from "~/lib/kits/part-display";

const eventWords: Record<string, string> = {
  created: "Recorded",
  remeasured: "Re-measured",
  "status:remeasure": "Sent for re-measurement",
  "status:retired": "Retired",
  "status:in_service": "Returned to service",
  checked_in: "Checked in",
};

/** What happened to the part, newest first, with what each re-measurement changed. */
export function PartHistory({ events, courseId, timeZone }: { events: PartOnPage["events"]; courseId: string; timeZone: string }) {
  return (
    <section aria-labelledby="history-heading">
      <h2 id="history-heading" className="mb-2 text-lg font-semibold">
        History
      </h2>
      <ol className="flex flex-col gap-3">
        {events.map((event) => {
          const changed = Object.entries((event.detail.changed ?? {}) as Record<string, { from: unknown; to: unknown }>);
          return (
            <li key={event.id} className="rounded-md bg-white p-3 text-sm ring-1 ring-ink-900/10">
              <p>
                <span className="font-medium">{eventWords[event.action] ?? event.action}</span>
                {event.detail.source === "csv-import" ? " from a CSV import" : null}
                {event.kit ? (
                  <>
                    {" with "}
                    <KitName kit={event.kit} courseId={courseId} />
                    {event.detail.condition && event.detail.condition !== "fine" ? ` (${String(event.detail.condition)})` : null}
                  </>
                ) : null}{" "}
                by {event.actor?.name ?? "a former member"},{" "}
                <time dateTime={new Date(event.createdAt).toISOString()}>{formatDateTime(event.createdAt, timeZone)}</time>
              </p>
              {event.note ? <p className="mt-1 text-ink-700">“{event.note}”</p> : null}
              {changed.length ? (
                <ul className="mt-1 text-ink-800">
                  {changed.map(([field, change]) => (
                    <li key={field}>
                      {partFieldLabels[field] ?? field}: {formatFieldValue(change.from)} → {formatFieldValue(change.to)}
                    </li>
                  ))}
                </ul>
              ) : null}
            </li>
          );
        })}
      </ol>
    </section>
  );
}
