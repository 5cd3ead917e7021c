/**
 * The side panel of the marking desk: one student's mark criterion by criterion, with every level's
 * description, the automatic suggestions with their reasons (and the override, which needs one), the
 * late penalty and the feedback; beside it the hand-in itself — reduction, warnings, drop times,
 * photos and versions — loaded from the hand-in page with a fetcher.
 */
import { useEffect, useRef, useState } from "react";
import { useFetcher } from "react-router";
import { HandInDetail, type HandInDetailData } from "~/components/drop-logs/hand-in-detail";
import { ExtendedTo } from "~/components/labs/extended-to";
import { Notice } from "~/components/ui/notice";
import type { HandInStanding } from "~/lib/drop-logs/hand-in-window";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { AutoOverride } from "./auto-override";
import { PointsInput, SaveStatus } from "./mark-inputs";
import type { SaveState } from "./mark-saves";

const panelStatusWords: Record<HandInStanding, string> = {
  missing: "nothing handed in",
  "not-due": "not handed in yet; their due time is still ahead",
  late: "handed in late",
  "on-time": "handed in on time",
};

export function MarkPanel({
  courseId,
  labId,
  timeZone,
  rubric,
  canEdit,
  row,
  saveState,
  save,
  retry,
  onClose,
  onStep,
  position,
}: {
  courseId: string;
  labId: string;
  timeZone: string;
  rubric: RubricCriterion[];
  canEdit: boolean;
  row: MarkingDeskRow;
  saveState: SaveState;
  save: (change: MarkChange, reason?: string | null) => void;
  retry: () => void;
  onClose: () => void;
  onStep: (step: -1 | 1) => void;
  position: { index: number; count: number };
}) {
  const handIn = useFetcher<HandInDetailData>();
  const [feedback, setFeedback] = useState(row.mark?.feedback ?? "");
  const heading = useRef<HTMLHeadingElement>(null);
  const dropLogId = row.handIn?.dropLogId;
  useEffect(() => {
    if (dropLogId) handIn.load(`/courses/${courseId}/labs/${labId}/hand-ins/${dropLogId}`);
    // Loads once per hand-in shown; `handIn` itself changes identity as it loads.
  }, [courseId, labId, dropLogId]);
  useEffect(() => heading.current?.focus(), []);
  const saveFeedback = () => {
    if (feedback.trim() !== (row.mark?.feedback ?? "")) save({ kind: "feedback", text: feedback });
  };

  return (
    <aside
      aria-labelledby="panel-heading"
      className="flex w-full flex-col gap-4 rounded-lg bg-paper-50 p-4 shadow ring-1 ring-ink-900/15 xl:sticky xl:top-4 xl:max-h-[calc(100vh-2rem)] xl:w-[34rem] xl:overflow-y-auto"
      onKeyDown={(event) => {
        if (event.key === "Escape") onClose();
      }}
    >
      <div className="flex items-start justify-between gap-2">
        <div>
          <h2 id="panel-heading" ref={heading} tabIndex={-1} className="text-lg font-semibold">
            {row.studentName}
          </h2>
          <p className="text-sm text-ink-700">
            {row.cohortName} · {panelStatusWords[row.status]}
            {row.deadline.extendedBy ? (
              <>
                {" "}
                (<ExtendedTo deadline={row.deadline} timeZone={timeZone} />)
              </>
            ) : null}{" "}
            · total <strong>{row.total}</strong> / {row.maxTotal}
          </p>
        </div>
        <div className="flex gap-1">
          <button
            type="button"
            className="min-h-9 rounded px-2 ring-1 ring-ink-900/20 disabled:opacity-50"
            disabled={position.index <= 0}
            onClick={() => onStep(-1)}
          >
            Previous
          </button>
          <button
            type="button"
            className="min-h-9 rounded px-2 ring-1 ring-ink-900/20 disabled:opacity-50"
            disabled={position.index >= position.count - 1}
            onClick={() => onStep(1)}
          >
            Next
          </button>
          <button type="button" className="min-h-9 rounded px-2 ring-1 ring-ink-900/20" onClick={onClose} aria-label="Close the panel">
            Close
          </button>
        </div>
      </div>
      <div role="status" aria-live="polite">
        <SaveStatus state={saveState} retry={retry} />
      </div>

      <section aria-label="Rubric" className="flex flex-col gap-3">
        {rubric.map((criterion) => {
          const cell = row.cells[criterion.id];
          return (
            <fieldset key={criterion.id} className="rounded-md bg-white p-3 ring-1 ring-ink-900/10">
              <legend className="px-1 text-sm font-semibold">
                {criterion.title} <span className="font-normal text-ink-600">(max {criterion.maxPoints})</span>
              </legend>
              {criterion.description ? <p className="mb-1 text-xs text-ink-700">{criterion.description}</p> : null}
              {criterion.kind === "levels" ? (
                <div className="flex flex-col gap-1">
                  {(criterion.levels ?? []).map((level, index) => (
                    <label key={index} className="flex items-start gap-2 text-sm">
                      <input
                        type="radio"
                        className="mt-1 h-4 w-4"
                        name={`level-${criterion.id}`}
                        checked={cell?.level === index + 1}
                        disabled={!canEdit}
                        onChange={() => save({ kind: "score", criterionId: criterion.id, level: index + 1, points: null })}
                      />
                      <span>
                        <strong>{index + 1}</strong> · {level.points} pts — {level.description}
                      </span>
                    </label>
                  ))}
                </div>
              ) : criterion.kind === "range" ? (
                canEdit ? (
                  <PointsInput
                    value={cell?.points ?? null}
                    label={`${criterion.title}, ${criterion.minPoints} to ${criterion.maxPoints} points`}
                    onCommit={(points) => save({ kind: "score", criterionId: criterion.id, points, level: null })}
                  />
                ) : (
                  <p className="text-sm">{cell?.points ?? "—"}</p>
                )
              ) : (
                <AutoOverride key={`${cell?.source}-${cell?.points}`} criterion={criterion} row={row} save={save} canEdit={canEdit} />
              )}
            </fieldset>
          );
        })}
        <div className="flex flex-wrap items-end gap-4 text-sm">
          <label className="flex flex-col gap-1">
            <span>Late penalty (points)</span>
            {canEdit ? (
              <PointsInput
                value={row.mark?.latePenaltyPoints || null}
                label="Late penalty, in points"
                onCommit={(points) => save({ kind: "latePenalty", points: points ?? 0 })}
              />
            ) : (
              <span>{row.mark?.latePenaltyPoints ?? 0}</span>
            )}
          </label>
        </div>
        <label className="flex flex-col gap-1 text-sm">
          <span>Feedback to the student (shown when marks are released)</span>
          <textarea
            className="rounded border border-ink-900/20 bg-white px-2 py-1.5"
            rows={4}
            maxLength={5000}
            value={feedback}
            readOnly={!canEdit}
            onChange={(event) => setFeedback(event.target.value)}
            onBlur={saveFeedback}
          />
        </label>
        {canEdit ? (
          <button type="button" className="self-start rounded bg-white px-3 py-1.5 text-sm ring-1 ring-ink-800" onClick={saveFeedback}>
            Save the feedback
          </button>
        ) : null}
      </section>

      <section aria-label="The hand-in">
        {row.handInChangedSinceMarked ? (
          <Notice tone="warning">
            {row.markedHandIn
              ? `This mark rests on version ${row.markedHandIn.version}`
              : "This mark was given before anything was handed in"}
            ; version {row.handIn?.version} is newer and is shown below.
            {row.needsRemarking
              ? " It was handed in after the release, so the mark is reopened: saving it marks the newer version (with a reason, as the student sees the change)."
              : " Saving the mark moves it onto the newer version."}
          </Notice>
        ) : null}
        {!row.handIn ? (
          <p className="text-sm text-ink-700">Nothing handed in: automatic criteria suggest 0.</p>
        ) : handIn.data ? (
          <HandInDetail handIn={handIn.data} headingLevel={3} />
        ) : (
          <p className="text-sm text-ink-700">Loading the hand-in…</p>
        )}
      </section>
    </aside>
  );
}
