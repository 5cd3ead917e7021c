import { partStatusLabels, type PartStatus } from "~/lib/kits/part-display";

/** The status in words; "Needs re-measuring" also gets an amber mark so it stands out in a long table. */
export function StatusBadge({ status }: { status: PartStatus }) {
  const styles: Record<PartStatus, string> = {
    in_service: "bg-paper-100 text-ink-800",
    remeasure: "bg-amber-300/40 font-semibold text-amber-700 ring-1 ring-amber-500",
    retired: "bg-white text-ink-600 line-through decoration-ink-600/40",
  };
  return (
    <span className={`inline-flex items-center gap-1 whitespace-nowrap rounded px-2 py-0.5 text-xs ${styles[status]}`}>
      {status === "remeasure" ? <span aria-hidden="true">▲</span> : null}
      {partStatusLabels[status]}
    </span>
  );
}
