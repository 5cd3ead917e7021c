/** Every change of every mark, newest first, in words. */
import { LabTime } from "~/components/drop-logs/lab-time";
import { TableHead } from "~/components/ui/table-head";
import type { MarkState } from "~/lib/marking/marks";
import type { MarkChangeEntry } from "~/server/marking/moderation.server";

export type MarkChangeRow = Omit<MarkChangeEntry, "changedAt"> & { changedAt: string };

export function MarkChanges({
  changes,
  criterionNames,
  timeZone,
}: {
  changes: MarkChangeRow[];
  criterionNames: Map<string, string>;
  timeZone: string;
}) {
  return (
    <section aria-labelledby="changes-heading">
      <h2 id="changes-heading" className="mb-2 text-lg font-semibold">
        Every change of a mark (latest {changes.length})
      </h2>
      {changes.length === 0 ? (
        <p className="text-ink-700">No mark has been given yet.</p>
      ) : (
        <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
          <table className="min-w-full text-left text-sm">
            <TableHead headers={["When", "Student", "By", "From", "Total", "What changed", "Why"]} />
            <tbody className="divide-y divide-ink-900/5">
              {changes.map((change) => (
                <tr key={change.id}>
                  <td className="whitespace-nowrap px-3 py-2">
                    <LabTime at={change.changedAt} courseTimeZone={timeZone} />
                  </td>
                  <td className="px-3 py-2">{change.studentName}</td>
                  <td className="px-3 py-2">{change.changedBy?.name ?? "—"}</td>
                  <td className="px-3 py-2">
                    {change.source === "desk" ? "desk" : change.source === "bulk" ? "bulk action" : "moderation"}
                    {change.afterRelease ? <span className="ml-1 text-amber-700">after release</span> : null}
                  </td>
                  <td className="px-3 py-2 tabular-nums">
                    {change.old ? `${change.old.total} → ` : ""}
                    {change.new.total}
                  </td>
                  <td className="px-3 py-2">{describeChange(change.old, change.new, criterionNames)}</td>
                  <td className="px-3 py-2">{change.reason ?? ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}

/** In words, which parts of a mark one change touched. */
function describeChange(before: MarkState | null, after: MarkState, names: Map<string, string>): string {
  if (!before) return "first marked";
  const parts: string[] = [];
  for (const id of new Set([...Object.keys(before.scores), ...Object.keys(after.scores)])) {
    const from = before.scores[id]?.points;
    const to = after.scores[id]?.points;
    if (from !== to) parts.push(`${names.get(id) ?? "a removed criterion"} ${from ?? "—"} → ${to ?? "—"}`);
  }
  if (before.latePenaltyPoints !== after.latePenaltyPoints)
    parts.push(`late penalty ${before.latePenaltyPoints} → ${after.latePenaltyPoints}`);
  if (before.feedback !== after.feedback) parts.push("feedback");
  return parts.join("; ") || "released as it was";
}
