import type { ReactNode } from "react";
import { KitName } from "~/components/parts/kit-name";
import type { PartOnPage } from "~/components/parts/part-on-page";
import { formatDateTime } from "~/lib/format-date";
import type { PartKind } from "~/lib/kits/part-input";
import { formatFieldValue, partFieldLabels } from "~/lib/kits/part-display";

type PartEvent = PartOnPage["events"][number];

/** Each action a part's history records, in words; anything newer reads as a plain "Changed" rather than a code. */
const eventWords: Record<string, string> = {
  created: "Recorded",
  remeasured: "Re-measured",
  "status:remeasure": "Sent for re-measurement",
  "status:retired": "Retired",
  retired: "Retired",
  "status:in_service": "Returned to service",
  replacement_sent: "Sent as a replacement",
  replaced: "Replaced",
};

/**
 * A check-in names the part's condition, which is the point of the entry: a damaged or missing part
 * leaves its kit and is retired, except a fluid lot, which loses only that kit's bottle.
 */
function checkInWords(kind: PartKind, event: PartEvent, kit: ReactNode): ReactNode {
  const what = kind === "fluid_lot" ? "A bottle of this lot" : "It";
  const condition = event.detail.condition;
  const remeasure = event.detail.remeasure ? " and sent for re-measurement" : "";
  const after = kind === "fluid_lot" ? "; the rest of the lot stays in service" : " and retired";
  if (condition === "damaged")
    return (
      <>
        <strong>Came back damaged</strong>: {what} was checked in damaged with {kit}, taken out of the kit{after}
      </>
    );
  if (condition === "missing")
    return (
      <>
        <strong>Missing at check-in</strong>: {what} was not in {kit} when it came back, taken off the kit's list{after}
      </>
    );
  return (
    <>
      <strong>Checked in</strong> with {kit}, in good condition{remeasure}
    </>
  );
}

function eventSentence(kind: PartKind, event: PartEvent, courseId: string): ReactNode {
  const kit = event.kit ? <KitName kit={event.kit} courseId={courseId} /> : "a kit since removed";
  if (event.action === "checked_in") return checkInWords(kind, event, kit);
  return (
    <>
      <strong>{eventWords[event.action] ?? "Changed"}</strong>
      {event.detail.source === "csv-import" ? " from a CSV import" : null}
      {event.kit ? <> for {kit}</> : null}
    </>
  );
}

/** What happened to the part, newest first, with what each re-measurement changed. */
export function PartHistory({
  kind,
  events,
  courseId,
  timeZone,
}: {
  kind: PartKind;
  events: PartEvent[];
  courseId: string;
  timeZone: string;
}) {
  return (
    <section aria-labelledby="history-heading">
      <h2 id="history-heading" className="mb-2 text-lg font-semibold">
        History
      </h2>
      <ol className="flex flex-col gap-3">
        {events.map((event) => {
          const changed = Object.entries(event.detail.changed ?? {});
          return (
            <li key={event.id} className="rounded-md bg-white p-3 text-sm ring-1 ring-ink-900/10">
              <p>
                {eventSentence(kind, event, courseId)}, by {event.actor?.name ?? "a former member"},{" "}
                <time dateTime={new Date(event.createdAt).toISOString()}>{formatDateTime(event.createdAt, timeZone)}</time>.
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
