/**
 * A student's released mark: the total, each criterion with the level reached or the points, the
 * feedback, the hand-in the mark was based on, and any change made after release with its reason.
 */
import { LabTime } from "~/components/drop-logs/lab-time";
import { figure } from "~/components/drop-logs/reduction-summary";
import type { StudentMark } from "~/server/marking/student-mark.server";
import { counted } from "~/lib/plural";

export function StudentMarkView({ mark, timeZone }: { mark: StudentMark; timeZone: string }) {
  const basedOn = mark.basedOn;
  return (
    <section
      id="mark"
      aria-labelledby="mark-heading"
      className="flex scroll-mt-4 flex-col gap-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10"
    >
      <h2 id="mark-heading" className="text-lg font-semibold">
        Your mark: {mark.total} / {mark.maxTotal}
      </h2>
      <p className="text-sm text-ink-700">
        Released <LabTime at={mark.releasedAt} courseTimeZone={timeZone} />.
      </p>
      {mark.changedAfterRelease ? (
        <div role="status" className="rounded border-l-4 border-amber-500 bg-paper-100 px-3 py-2 text-sm">
          <p className="font-medium">Your mark changed after it was released (it was {mark.changedAfterRelease.releasedTotal}).</p>
          <ul className="mt-1 list-disc pl-5">
            {mark.changedAfterRelease.changes.map((change) => (
              <li key={change.changedAt}>
                <LabTime at={change.changedAt} courseTimeZone={timeZone} />: {change.oldTotal ?? "—"} → {change.newTotal}
                {change.reason ? `, because ${change.reason}` : ""}
              </li>
            ))}
          </ul>
        </div>
      ) : null}
      <table className="text-left text-sm">
        <thead className="text-xs uppercase tracking-wide text-ink-700">
          <tr>
            <th scope="col" className="py-1 pr-4 font-medium">
              Criterion
            </th>
            <th scope="col" className="py-1 pr-4 font-medium">
              Points
            </th>
            <th scope="col" className="py-1 font-medium">
              Why
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink-900/5">
          {mark.criteria.map((criterion) => (
            <tr key={criterion.id}>
              <th scope="row" className="py-1.5 pr-4 align-top font-medium">
                {criterion.title}
                {criterion.description ? <span className="block text-xs font-normal text-ink-600">{criterion.description}</span> : null}
              </th>
              <td className="py-1.5 pr-4 align-top tabular-nums">
                {criterion.points ?? "—"} / {criterion.maxPoints}
              </td>
              <td className="py-1.5 align-top">
                {criterion.level
                  ? `Level ${criterion.level.number}: ${criterion.level.description}`
                  : criterion.automatic
                    ? "Computed from your hand-in."
                    : ""}
                {criterion.overrideReason ? ` Adjusted by your marker: ${criterion.overrideReason}` : ""}
              </td>
            </tr>
          ))}
          {mark.latePenaltyPoints ? (
            <tr>
              <th scope="row" className="py-1.5 pr-4 font-medium">
                Late penalty
              </th>
              <td className="py-1.5 pr-4 tabular-nums">−{mark.latePenaltyPoints}</td>
              <td />
            </tr>
          ) : null}
        </tbody>
      </table>
      {mark.feedback ? (
        <div>
          <h3 className="font-semibold">Feedback</h3>
          <p className="whitespace-pre-line text-sm">{mark.feedback}</p>
        </div>
      ) : null}
      {basedOn ? (
        <p className="text-xs text-ink-700">
          Marked on version {basedOn.version} of your drop log (
          {basedOn.dropCount === null ? "? drops" : counted(basedOn.dropCount, "drop", "drops")}
          {basedOn.mode === "drag"
            ? `, C_D ${figure(basedOn.dragCoefficient, 3)} at Re ${figure(basedOn.reynolds, 2)}`
            : `, μ ${figure(basedOn.viscosityPaS, 3)} Pa·s`}
          , {figure(basedOn.normalisedFigure, 3)} × the reference
          {basedOn.late ? ", handed in late" : ""}).
        </p>
      ) : (
        <p className="text-xs text-ink-700">You handed nothing in for this lab.</p>
      )}
    </section>
  );
}
