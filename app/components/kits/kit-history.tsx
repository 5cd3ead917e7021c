import { formatDateTime } from "~/lib/format-date";
import { kitStateLabels, type KitState } from "~/lib/kits/kit-states";

type KitEvent = {
  id: string;
  createdAt: Date | string;
  action: string;
  fromState: KitState | null;
  toState: KitState | null;
  detail: Record<string, unknown>;
  note: string | null;
  actor: { name: string } | null;
};

/** The kit's journey, newest first, in the course's time zone. */
export function KitHistory({ events, timeZone }: { events: KitEvent[]; timeZone: string }) {
  return (
    <section aria-labelledby="history-heading">
      <h2 id="history-heading" className="mb-2 text-lg font-semibold">
        History
      </h2>
      <ol className="flex flex-col gap-2 text-sm">
        {events.map((event) => (
          <li key={event.id} className="rounded-md bg-white px-3 py-2 ring-1 ring-ink-900/10">
            <time dateTime={new Date(event.createdAt).toISOString()} className="text-ink-600">
              {formatDateTime(event.createdAt, timeZone)}
            </time>{" "}
            · {event.actor?.name ?? "someone"} · <KitEventWords event={event} />
            {event.note ? <span className="block text-ink-700">“{event.note}”</span> : null}
          </li>
        ))}
      </ol>
    </section>
  );
}

/** One move of a kit in words, as its history says it (also on a student's record). */
export function KitEventWords({ event }: { event: Pick<KitEvent, "action" | "fromState" | "toState" | "detail"> }) {
  if (event.action === "moved" && event.fromState && event.toState) {
    return (
      <span>
        {kitStateLabels[event.fromState]} → <strong>{kitStateLabels[event.toState]}</strong>
      </span>
    );
  }
  if (event.action === "reported") return <strong className="text-outlier">Problem reported: {String(event.detail.problem ?? "")}</strong>;
  if (event.action === "checked_in") return <span>Parts' condition recorded</span>;
  if (event.action === "part_replaced") return <span>Replacement part sent for a reported one</span>;
  if (event.action === "return_requested") return <span>Asked back before the course's return-by date</span>;
  if (event.action === "tracking_corrected" || event.action === "return_tracking_corrected") {
    const shipping = event.detail.shipping as { carrier: string; trackingNumber: string } | undefined;
    return (
      <span>
        {event.action === "tracking_corrected" ? "Tracking" : "Return tracking"} corrected to {shipping?.carrier} {shipping?.trackingNumber}
      </span>
    );
  }
  return <span>{event.action === "created" ? "Made up and put on the shelf" : event.action}</span>;
}
