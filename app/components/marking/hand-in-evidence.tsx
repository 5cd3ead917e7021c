/**
 * The evidence of one student's hand-in, first on their marking view: where it stands (on time, how
 * late, an extension and its reason), the class comparison's flag, then the counted version as the
 * hand-in page draws it (its result, warnings, uncertainty budget, drop times and photos), and the
 * list of every version with a way to the hand-in page.
 */
import { Link } from "react-router";
import { ClassLabelTag } from "~/components/comparison/class-label";
import { LabTime } from "~/components/drop-logs/lab-time";
import { figure } from "~/components/drop-logs/reduction-summary";
import { VersionHistory } from "~/components/drop-logs/version-history";
import { Notice } from "~/components/ui/notice";
import { lateBy } from "~/lib/drop-logs/lateness-words";
import { counted } from "~/lib/plural";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import type { MarkingStudent } from "~/server/marking/marking-student.server";

type Props = {
  courseId: string;
  labId: string;
  kind: "drag" | "viscometry";
  timeZone: string;
  row: MarkingDeskRow;
  dropLog: MarkingStudent["dropLog"];
};

function Standing({ row, timeZone }: Pick<Props, "row" | "timeZone">) {
  const { handIn, deadline } = row;
  const due = <LabTime at={deadline.dueAt} courseTimeZone={timeZone} />;
  const extension = deadline.extendedBy ? (
    <>
      {" "}
      Their due time was moved by {deadline.extendedBy === "cohort" ? "an extension for their cohort" : "an extension of their own"}
      {deadline.extensionReason ? `, because ${deadline.extensionReason}` : ""}.
    </>
  ) : null;
  if (!handIn)
    return (
      <p>
        {row.status === "not-due" ? "Nothing handed in yet; their due time is still ahead: " : "Nothing handed in by their due time, "}
        {due}.{extension}
      </p>
    );
  return (
    <p>
      Handed in <LabTime at={handIn.submittedAt} courseTimeZone={timeZone} />,{" "}
      {handIn.late ? <strong>{lateBy(handIn.submittedAt, deadline.dueAt)} after their due time</strong> : "on time"} (due {due}).
      {extension}
    </p>
  );
}

export function HandInEvidence({ courseId, labId, kind, timeZone, row, dropLog }: Props) {
  const { handIn } = row;
  const counting = dropLog?.versions.find((version) => version.id === dropLog.latestVersionId);
  return (
    <section aria-labelledby="evidence-heading" className="flex min-w-0 flex-col gap-4">
      <h2 id="evidence-heading" className="sr-only">
        The hand-in
      </h2>
      <div className="flex flex-col gap-2 rounded-lg bg-white p-4 text-sm shadow-sm ring-1 ring-ink-900/10">
        <Standing row={row} timeZone={timeZone} />
        {handIn ? (
          <>
            <p className="tabular-nums">
              {figure(handIn.figure, 3)} × the reference ·{" "}
              {kind === "drag"
                ? `C_D ${figure(handIn.dragCoefficient, 3)} at Re ${figure(handIn.reynolds, 2)}`
                : `μ ${figure(handIn.viscosityPaS, 3)} Pa·s`}{" "}
              · {handIn.dropCount === null ? "drops not counted" : counted(handIn.dropCount, "drop", "drops")}
              {handIn.strayDropCount ? `, ${counted(handIn.strayDropCount, "stray drop", "stray drops")}` : ""}
              {handIn.warningCount ? ` · ${counted(handIn.warningCount, "warning", "warnings")}` : ""}
            </p>
            <p>
              {row.classLabel ? (
                <>
                  Class comparison: <ClassLabelTag label={row.classLabel.label} /> — {row.classLabel.reason}
                </>
              ) : (
                "Class comparison: not compared (no normalised figure)."
              )}
            </p>
            {handIn.kitNotAtHome ? <p>The kit was not at home when this was handed in: {handIn.kitNotAtHome.toLowerCase()}.</p> : null}
          </>
        ) : null}
      </div>
      {row.handInChangedSinceMarked ? (
        <Notice tone="warning">
          {row.markedHandIn ? `The mark rests on version ${row.markedHandIn.version}` : "The mark was given before anything was handed in"};
          version {handIn?.version} came since and is the one shown.
          {row.needsRemarking
            ? " It came after the release, so the mark is open again: a change marks the newer version, with a reason the student sees."
            : " The next change to the mark moves it onto the newer version."}
        </Notice>
      ) : null}
      {row.resultChangedSinceMarked ? (
        <Notice tone="warning">
          A part record was corrected since this was marked: the result went from {figure(row.resultChangedSinceMarked.oldFigure, 3)} to{" "}
          {figure(row.resultChangedSinceMarked.newFigure, 3)} × the reference. The mark itself is unchanged.
        </Notice>
      ) : null}
      {dropLog && counting ? (
        <>
          <VersionHistory
            courseId={courseId}
            timeZone={timeZone}
            versions={[counting]}
            latestVersionId={dropLog.latestVersionId}
            photos={dropLog.photos}
            budgetOpen
          />
          <div className="rounded-lg bg-white p-4 text-sm shadow-sm ring-1 ring-ink-900/10">
            <h3 className="font-semibold">{counted(dropLog.versions.length, "version", "versions")} handed in</h3>
            <ol className="mt-1 flex flex-col gap-1">
              {dropLog.versions.map((version) => (
                <li key={version.id}>
                  Version {version.version}, <LabTime at={version.submittedAt} courseTimeZone={timeZone} />
                  {version.late ? ", late" : ""}
                  {version.id === dropLog.latestVersionId ? " — the one that counts" : ""}
                </li>
              ))}
            </ol>
            <Link to={`/courses/${courseId}/labs/${labId}/hand-ins/${dropLog.id}`} className="mt-2 inline-block underline">
              Every version in full, on the hand-in page
            </Link>
          </div>
        </>
      ) : null}
    </section>
  );
}
