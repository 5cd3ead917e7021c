/**
 * One student's mark, criterion by criterion, as the per-student view shows it beside the evidence:
 * each criterion is a card, and while the focus is in it the number keys pick its level (0 takes the
 * level away); points are typed within the criterion's range, automatic criteria show their
 * suggestion and take an override with a reason. Then the late deduction and the feedback. Every
 * change shows at once and saves through the desk's `markSaves` (conflicts and retries included).
 */
import { useState, type KeyboardEvent } from "react";
import type { MarkChange } from "~/lib/marking/marks";
import { MAX_CRITERION_POINTS, type RubricCriterion } from "~/lib/marking/rubric";
import { counted } from "~/lib/plural";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { AutoOverride } from "./auto-override";
import { PointsInput, SaveStatus } from "./mark-inputs";
import type { SaveState } from "./mark-saves";

type Props = {
  rubric: RubricCriterion[];
  row: MarkingDeskRow;
  canEdit: boolean;
  saveState: SaveState;
  save: (change: MarkChange, reason?: string | null) => void;
  retry: () => void;
};

const cellWords = (row: MarkingDeskRow, criterion: RubricCriterion): string => {
  const cell = row.cells[criterion.id];
  if (!cell || cell.points === null) return "not scored yet";
  const points = `${cell.points} of ${counted(criterion.maxPoints, "point", "points")}`;
  if (cell.source === "suggestion") return `${points}, as suggested`;
  if (cell.source === "override") return `${points}, overridden`;
  return cell.level ? `level ${cell.level}: ${points}` : points;
};

function LevelChoice({ criterion, row, canEdit, setLevel }: Props & { criterion: RubricCriterion; setLevel: (level: number) => void }) {
  const chosen = row.cells[criterion.id]?.level ?? null;
  return (
    <ol className="flex flex-col gap-1.5">
      {(criterion.levels ?? []).map((level, index) => {
        const number = index + 1;
        const pressed = chosen === number;
        return (
          <li key={number}>
            <button
              type="button"
              aria-pressed={pressed}
              disabled={!canEdit}
              onClick={() => setLevel(number)}
              className={`flex w-full items-start gap-3 rounded-md px-3 py-2 text-left text-sm ring-1 ${
                pressed ? "bg-paper-100 font-medium ring-2 ring-ink-900" : "bg-white ring-ink-900/15"
              }`}
            >
              <kbd className="mt-0.5 rounded bg-ink-900/5 px-1.5 font-mono text-xs" aria-hidden="true">
                {number}
              </kbd>
              <span className="min-w-0 flex-1">
                <span className="tabular-nums">{counted(level.points, "point", "points")}</span> — {level.description}
              </span>
              {/* The chosen level is said in words and by its frame, not by its shade alone. */}
              {pressed ? <span className="text-xs">chosen</span> : null}
            </button>
          </li>
        );
      })}
    </ol>
  );
}

function CriterionCard(props: Props & { criterion: RubricCriterion; number: number }) {
  const { criterion, row, canEdit, save, number } = props;
  const cell = row.cells[criterion.id];
  const levels = criterion.levels?.length ?? 0;
  const setLevel = (level: number | null) => save({ kind: "score", criterionId: criterion.id, level, points: null });
  const headingId = `criterion-${criterion.id}`;
  const onKeyDown = (event: KeyboardEvent<HTMLElement>) => {
    const target = event.target as HTMLElement;
    if (target instanceof HTMLInputElement || target instanceof HTMLTextAreaElement) {
      // Enter keeps typed points, as leaving the field does.
      if (event.key === "Enter" && target instanceof HTMLInputElement) target.blur();
      return;
    }
    if (criterion.kind !== "levels" || !canEdit || event.altKey || event.ctrlKey || event.metaKey) return;
    const key = Number(event.key);
    if (!/^\d$/.test(event.key) || key > levels) return;
    event.preventDefault();
    if (key === 0) {
      if (cell?.level) setLevel(null);
    } else setLevel(key);
  };
  return (
    <section
      role="group"
      aria-labelledby={headingId}
      aria-describedby="criterion-keys"
      aria-keyshortcuts={
        criterion.kind === "levels" && canEdit ? ["0", ...Array.from({ length: levels }, (_, i) => String(i + 1))].join(" ") : undefined
      }
      data-criterion={number}
      onKeyDown={onKeyDown}
      className="flex flex-col gap-2 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10 focus-within:ring-2 focus-within:ring-ink-900"
    >
      <div className="flex flex-wrap items-baseline justify-between gap-x-3">
        <h3 id={headingId} className="font-semibold">
          {criterion.title}
        </h3>
        <p className="text-sm tabular-nums text-ink-700">{cellWords(row, criterion)}</p>
      </div>
      {criterion.description ? <p className="text-sm text-ink-700">{criterion.description}</p> : null}
      {criterion.kind === "levels" ? (
        <LevelChoice {...props} setLevel={setLevel} />
      ) : criterion.kind === "range" ? (
        canEdit ? (
          <label className="flex flex-wrap items-start gap-2 text-sm">
            <span className="pt-1">
              Points, {criterion.minPoints} to {criterion.maxPoints}
            </span>
            <PointsInput
              value={cell?.points ?? null}
              label={`${criterion.title}, ${criterion.minPoints} to ${counted(criterion.maxPoints, "point", "points")}`}
              bounds={{ min: criterion.minPoints, max: criterion.maxPoints }}
              onCommit={(points) => save({ kind: "score", criterionId: criterion.id, points, level: null })}
            />
          </label>
        ) : null
      ) : (
        <AutoOverride key={`${cell?.source}-${cell?.points}`} criterion={criterion} row={row} save={save} canEdit={canEdit} />
      )}
    </section>
  );
}

export function CriterionMarks(props: Props) {
  const { rubric, row, canEdit, saveState, save, retry } = props;
  const released = row.mark?.releasedAt != null;
  const [feedback, setFeedback] = useState(row.mark?.feedback ?? "");
  const [reason, setReason] = useState("");
  // A released mark changes only with a reason the student is shown; it goes with every change made here.
  const withReason = (change: MarkChange) => save(change, released ? reason.trim() || null : null);
  const saveFeedback = () => {
    if (feedback.trim() !== (row.mark?.feedback ?? "")) withReason({ kind: "feedback", text: feedback });
  };
  const scoredByHand = rubric.filter((criterion) => criterion.kind !== "auto");
  const scored = scoredByHand.filter((criterion) => row.cells[criterion.id]?.points != null).length;

  return (
    <section aria-labelledby="marks-heading" className="flex min-w-0 flex-col gap-3">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <h2 id="marks-heading" className="text-lg font-semibold">
          Mark: <span className="tabular-nums">{row.progress === "unmarked" ? "—" : row.total}</span> of{" "}
          {counted(row.maxTotal, "point", "points")}
        </h2>
        <p className="text-sm text-ink-700">
          {scored} of {counted(scoredByHand.length, "criterion", "criteria")} scored by hand
          {released ? " · released to the student" : ""}
        </p>
      </div>
      <div role="status" aria-live="polite" className="min-h-5">
        <SaveStatus state={saveState} retry={retry} />
      </div>
      {released && canEdit ? (
        <label className="flex flex-col gap-1 rounded-lg bg-white p-3 text-sm ring-1 ring-amber-500">
          <span>The student has seen this mark: say why it changes (they are shown the reason)</span>
          <input
            className="rounded border border-ink-900/20 px-2 py-1.5"
            value={reason}
            maxLength={500}
            onChange={(event) => setReason(event.target.value)}
          />
        </label>
      ) : null}
      <div className="flex flex-col gap-3">
        {rubric.map((criterion, index) => (
          <CriterionCard key={criterion.id} {...props} save={withReason} criterion={criterion} number={index} />
        ))}
      </div>
      <p id="criterion-keys" className="text-xs text-ink-700">
        Keys: Tab goes from criterion to criterion; while a criterion with levels has the focus, a level&apos;s number picks it and 0 takes
        the level away; typed points are kept on Enter or on leaving the field; Alt+N opens the next hand-in still to mark.
      </p>
      <div className="flex flex-col gap-3 rounded-lg bg-white p-4 text-sm shadow-sm ring-1 ring-ink-900/10">
        <label className="flex flex-wrap items-start gap-2">
          <span className="pt-1">Late deduction, in points, taken off the criteria&apos;s sum</span>
          {canEdit ? (
            <PointsInput
              value={row.mark?.latePenaltyPoints || null}
              label="Late deduction, in points"
              bounds={{ min: 0, max: MAX_CRITERION_POINTS }}
              onCommit={(points) => withReason({ kind: "latePenalty", points: points ?? 0 })}
            />
          ) : (
            <span className="pt-1 tabular-nums">{row.mark?.latePenaltyPoints ?? 0}</span>
          )}
        </label>
        <label className="flex flex-col gap-1">
          <span>Feedback for the student (they read it once marks are released)</span>
          <textarea
            className="rounded border border-ink-900/20 bg-white px-2 py-1.5"
            rows={5}
            maxLength={5000}
            value={feedback}
            readOnly={!canEdit}
            onChange={(event) => setFeedback(event.target.value)}
            onBlur={saveFeedback}
          />
        </label>
        {canEdit ? (
          <button type="button" className="self-start rounded bg-white px-3 py-1.5 ring-1 ring-ink-800" onClick={saveFeedback}>
            Keep the feedback
          </button>
        ) : null}
      </div>
    </section>
  );
}
