/** The class comparison's hand-ins, each with its parts, figure, label and the reason for it. */
import { Link } from "react-router";
import { ClassLabelTag } from "~/components/comparison/class-label";
import { TableHead } from "~/components/ui/table-head";
import { formatNumber } from "~/lib/kits/part-display";
import type { ComparisonJson } from "~/server/comparison/class-comparison.server";

export function HandInTable({ handIns }: { handIns: ComparisonJson["handIns"] }) {
  return (
    <section aria-labelledby="table-heading">
      <h2 id="table-heading" className="mb-2 text-lg font-semibold">
        Hand-ins
      </h2>
      <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
        <table className="min-w-full text-left text-sm">
          <TableHead headers={["Student", "Cohort", "Sphere / lot / column", "Figure", "Label", "Why"]} />
          <tbody className="divide-y divide-ink-900/5">
            {handIns.length === 0 ? (
              <tr>
                <td colSpan={6} className="px-3 py-6 text-center text-ink-600">
                  No hand-ins match.
                </td>
              </tr>
            ) : (
              handIns.map((handIn) => (
                <tr key={handIn.dropLogId} id={`drop-log-${handIn.dropLogId}`}>
                  <td className="px-3 py-2">
                    <Link to={handIn.href} className="underline underline-offset-2">
                      {handIn.student.name}
                    </Link>
                    {handIn.late ? <span className="ml-1 text-ink-600">(late)</span> : null}
                    {handIn.kitNotAtHome ? (
                      <span className="ml-1 text-amber-800">(kit {handIn.kitNotAtHome.toLowerCase()} at hand-in)</span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2">{handIn.cohort?.name ?? "—"}</td>
                  <td className="px-3 py-2">
                    {[handIn.parts.sphere, handIn.parts.fluidLot, handIn.parts.column].map((part) => part?.label ?? "—").join(" / ")}
                  </td>
                  <td className="px-3 py-2">{formatNumber(handIn.figure)}</td>
                  <td className="px-3 py-2">
                    <ClassLabelTag label={handIn.label} />
                  </td>
                  <td className="px-3 py-2 text-ink-800">{handIn.reason}</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </section>
  );
}
