/**
 * One hand-in on the criterion-first desk: the student (linked to their evidence view), the drop-time
 * strip, the key figure with its uncertainty, the flags, and the keys of the criterion being marked.
 * The card saves itself as the marker works (see `mark-saves`): number keys on the focused card set a
 * level or points, 0 clears, and an entry the criterion cannot take is explained here, not sent.
 */
import { useCallback, useEffect, useMemo, useState, type Dispatch, type KeyboardEvent } from "react";
import { Link, useLocation } from "react-router";
import { ClassLabelTag } from "~/components/comparison/class-label";
import { figure } from "~/components/drop-logs/reduction-summary";
import { ExtendedTo } from "~/components/labs/extended-to";
import { cardRow, type DeskCard, type DeskCardRow } from "~/lib/marking/desk-card";
import type { RubricCriterion } from "~/lib/marking/rubric";
import { markingStudentHref } from "~/lib/marking/links";
import { handInStatesOf } from "~/lib/marking/status-words";
import { counted } from "~/lib/plural";
import { formatWithUncertainty } from "~/lib/round-to-uncertainty";
import { OverrideForm } from "./auto-override";
import { DropStrip } from "./drop-strip";
import { PointsInput, SaveStatus } from "./mark-inputs";
import type { MarkSaveEvent, RowSaves } from "./mark-saves";
import { StateMark } from "./state-mark";
import { useMarkSaver } from "./use-mark-saver";

export type CardDesk = {
  courseId: string;
  labId: string;
  kind: "drag" | "viscometry";
  timeZone: string;
  rubric: RubricCriterion[];
  criterion: RubricCriterion;
  canEdit: boolean;
};

/**
 * The whole points a criterion's keys can give directly: its levels, or a small whole range. A level's
 * description is said once above the cards (`LevelLegend`), not on every card's key.
 */
function keysOf(criterion: RubricCriterion): { key: number; label: string; title: string }[] {
  if (criterion.kind === "levels")
    return (criterion.levels ?? []).map((level, index) => ({
      key: index + 1,
      label: `${index + 1}`,
      title: `Level ${index + 1}, ${counted(level.points, "point", "points")}`,
    }));
  if (criterion.kind === "range" && Number.isInteger(criterion.minPoints) && Number.isInteger(criterion.maxPoints))
    if (criterion.maxPoints <= 9)
      return Array.from({ length: criterion.maxPoints - criterion.minPoints + 1 }, (_, index) => {
        const points = criterion.minPoints + index;
        return { key: points, label: `${points}`, title: counted(points, "point", "points") };
      });
  return [];
}

/** Why `points` cannot be given on a range criterion, or null when it can. */
export function outOfRange(criterion: RubricCriterion, points: number): string | null {
  if (points >= criterion.minPoints && points <= criterion.maxPoints) return null;
  return `${points} is outside this criterion's ${criterion.minPoints}–${counted(criterion.maxPoints, "point", "points")}: nothing was saved.`;
}

export function HandInCard({
  desk,
  base,
  saves,
  dispatch,
  index,
  selected,
  onSelect,
  onMove,
}: {
  desk: CardDesk;
  base: DeskCardRow;
  saves: RowSaves<DeskCardRow> | undefined;
  dispatch: Dispatch<MarkSaveEvent<DeskCardRow>>;
  index: number;
  selected: boolean;
  onSelect: (selected: boolean) => void;
  /** Moves the focus to the card `step` away. */
  onMove: (from: number, step: -1 | 1) => void;
}) {
  const { criterion, canEdit } = desk;
  const location = useLocation();
  const action = location.pathname;
  const view = useMemo(() => ({ criterionId: criterion.id }), [criterion.id]);
  const rowOf = useCallback((card: DeskCard) => cardRow(desk.rubric, card), [desk.rubric]);
  const { row, saveState, save, retry } = useMarkSaver({ action, rubric: desk.rubric, base, saves, dispatch, view, rowOf });
  const [explanation, setExplanation] = useState<string | null>(null);
  // A mark changed elsewhere (a bulk action) answers whatever the last keystroke was told.
  useEffect(() => setExplanation(null), [base.expectedVersion]);
  const cell = row.cells[criterion.id];
  const keys = keysOf(criterion);
  const handIn = row.handIn;
  const titleId = `card-${index}-title`;

  const give = (points: number | null) => {
    setExplanation(null);
    if (criterion.kind === "levels") save({ kind: "score", criterionId: criterion.id, level: points, points: null });
    else save({ kind: "score", criterionId: criterion.id, points, level: null });
  };

  const onKeyDown = (event: KeyboardEvent<HTMLElement>) => {
    const target = event.target as HTMLElement;
    // Typing in a field stays typing; the card's keys act on the card and its buttons.
    if (target instanceof HTMLInputElement && target.type === "text") return;
    if (event.altKey || event.ctrlKey || event.metaKey) return;
    if (event.key === "ArrowDown" || event.key === "ArrowRight" || event.key === "j") {
      event.preventDefault();
      onMove(index, 1);
    } else if (event.key === "ArrowUp" || event.key === "ArrowLeft" || event.key === "k") {
      event.preventDefault();
      onMove(index, -1);
    } else if (event.key === " " && target === event.currentTarget && canEdit) {
      event.preventDefault();
      onSelect(!selected);
    } else if (/^[0-9]$/.test(event.key) && canEdit) {
      event.preventDefault();
      const number = Number(event.key);
      if (criterion.kind === "auto")
        setExplanation("This criterion is scored automatically: override it below, with a reason, to give other points.");
      else if (criterion.kind === "levels") {
        const count = criterion.levels?.length ?? 0;
        if (number === 0) give(null);
        else if (number > count) setExplanation(`There is no level ${number}: press 1 to ${count}, or 0 to clear.`);
        else give(number);
      } else {
        const problem = outOfRange(criterion, number);
        if (problem) setExplanation(problem);
        else give(number);
      }
    } else if ((event.key === "Delete" || event.key === "Backspace") && canEdit && criterion.kind !== "auto") {
      event.preventDefault();
      if (cell?.points != null) give(null);
    }
  };

  const states = handInStatesOf(row);
  return (
    <article
      aria-labelledby={titleId}
      aria-keyshortcuts={criterion.kind === "auto" ? undefined : [...keys.map((key) => String(key.key)), "0"].join(" ")}
      data-card={index}
      data-membership={row.membershipId}
      tabIndex={index === 0 ? 0 : -1}
      onKeyDown={onKeyDown}
      onFocus={(event) => {
        // Roving tab stop: the card last focused is where Tab comes back to.
        if (event.target !== event.currentTarget) return;
        document
          .querySelectorAll<HTMLElement>('[data-card][tabindex="0"]')
          .forEach((card) => card !== event.currentTarget && (card.tabIndex = -1));
        event.currentTarget.tabIndex = 0;
      }}
      className="desk-card"
      data-selected={selected || undefined}
    >
      <header className="flex items-start gap-2">
        {canEdit ? (
          <input
            type="checkbox"
            className="mt-0.5 h-5 w-5 shrink-0"
            checked={selected}
            onChange={(event) => onSelect(event.target.checked)}
            aria-label={`Select ${row.studentName}`}
          />
        ) : null}
        <div className="flex min-w-0 flex-1 flex-col">
          <h3 id={titleId} className="font-semibold break-words">
            <Link
              to={markingStudentHref(desk.courseId, desk.labId, row.membershipId, location.search)}
              className="underline underline-offset-2"
            >
              {row.studentName}
            </Link>
          </h3>
          <span className="text-xs text-ink-700">
            {[
              row.cohortName,
              handIn ? ` · version ${handIn.version}` : "",
              handIn?.dropCount != null ? ` · ${counted(handIn.dropCount, "drop", "drops")}` : "",
              handIn?.strayDropCount ? ` (${counted(handIn.strayDropCount, "stray", "strays")})` : "",
            ].join("")}
          </span>
          {row.deadline ? <ExtendedTo deadline={row.deadline} timeZone={desk.timeZone} /> : null}
        </div>
      </header>

      <ul className="flex flex-wrap gap-x-3 gap-y-1 text-xs text-ink-800" aria-label="State">
        {states.map((state) => (
          <li key={state}>
            {/* The desk's legend holds the shapes. */}
            <StateMark state={state} explain shared />
          </li>
        ))}
      </ul>

      {handIn ? (
        <>
          {handIn.dropTimes?.length ? <DropStrip times={handIn.dropTimes} strayDrops={handIn.strayDrops ?? []} /> : null}
          <p className="flex flex-wrap items-baseline gap-x-2 tabular-nums">
            <span className="text-xs text-ink-700">{desk.kind === "drag" ? "C_D / C_D,ref" : "μ / μ_ref"}</span>
            <strong>{handIn.figure === null ? "—" : formatWithUncertainty(handIn.figure, handIn.figureExpanded)}</strong>
            <span className="text-xs text-ink-700">
              {desk.kind === "drag"
                ? `C_D ${figure(handIn.dragCoefficient, 3)} at Re ${figure(handIn.reynolds, 2)}`
                : `μ ${figure(handIn.viscosityPaS, 3)} Pa·s`}
            </span>
          </p>
          <Flags row={row} />
        </>
      ) : null}

      <CriterionKeys
        desk={desk}
        row={row}
        keys={keys}
        give={give}
        save={save}
        explain={setExplanation}
        cellPoints={cell?.points ?? null}
        cellLevel={cell?.level ?? null}
      />

      <div role="status" aria-live="polite" className="min-h-4 text-xs break-words">
        {explanation ? <span className="text-ink-900">{explanation}</span> : <SaveStatus state={saveState} retry={retry} />}
      </div>
    </article>
  );
}

function Flags({ row }: { row: DeskCardRow }) {
  const handIn = row.handIn!;
  const flags: React.ReactNode[] = [];
  if (row.classLabel)
    flags.push(
      <span key="label" title={row.classLabel.reason}>
        <ClassLabelTag label={row.classLabel.label} />
        <span className="sr-only">: {row.classLabel.reason}</span>
      </span>,
    );
  if (handIn.warningCount) flags.push(<span key="warnings">{counted(handIn.warningCount, "warning", "warnings")}</span>);
  if (handIn.kitNotAtHome) flags.push(<span key="kit">kit {handIn.kitNotAtHome.toLowerCase()} at hand-in</span>);
  if (row.handInChangedSinceMarked)
    flags.push(
      <span key="version">
        {`${row.markedVersion ? `scored on version ${row.markedVersion}` : "scored before any hand-in"}; version ${handIn.version} is newer`}
      </span>,
    );
  if (row.resultChangedSinceMarked)
    flags.push(
      <span key="result" data-testid="result-changed">
        {`result changed since it was marked: ${figure(row.resultChangedSinceMarked.oldFigure, 3)} → ${figure(row.resultChangedSinceMarked.newFigure, 3)} × ref`}
      </span>,
    );
  if (flags.length === 0) return null;
  return <p className="flex flex-wrap gap-x-3 gap-y-1 text-xs text-ink-800">{flags}</p>;
}

function CriterionKeys({
  desk,
  row,
  keys,
  give,
  save,
  explain,
  cellPoints,
  cellLevel,
}: {
  desk: CardDesk;
  row: DeskCardRow;
  keys: ReturnType<typeof keysOf>;
  give: (points: number | null) => void;
  save: ReturnType<typeof useMarkSaver>["save"];
  explain: (message: string | null) => void;
  cellPoints: number | null;
  cellLevel: number | null;
}) {
  const { criterion, canEdit } = desk;
  const cell = row.cells[criterion.id];
  if (criterion.kind === "auto")
    return <AutoScore criterion={criterion} row={row} save={save} canEdit={canEdit} key={`${cell?.source}-${cell?.points}`} />;
  const current = criterion.kind === "levels" ? cellLevel : cellPoints;
  const pointsWord = cellPoints === null ? "not scored" : counted(cellPoints, "point", "points");
  return (
    <div
      className="flex flex-wrap items-center gap-1.5"
      role="group"
      aria-label={`${criterion.title} for ${row.studentName}: ${pointsWord}`}
    >
      {keys.map((key) => (
        <button
          key={key.key}
          type="button"
          disabled={!canEdit}
          aria-label={`${key.label}: ${key.title}`}
          aria-pressed={current === key.key}
          onClick={() => give(key.key)}
          tabIndex={-1}
          className="desk-key"
        >
          {key.label}
        </button>
      ))}
      {criterion.kind === "range" ? (
        canEdit ? (
          <PointsInput
            value={cellPoints}
            label={`${criterion.title} for ${row.studentName}, ${criterion.minPoints} to ${counted(criterion.maxPoints, "point", "points")}`}
            refuse={(points) => outOfRange(criterion, points)}
            onRefused={explain}
            onCommit={(points) => give(points)}
          />
        ) : null
      ) : null}
      <span className="text-xs text-ink-700">{`${criterion.kind === "levels" && cellLevel ? `level ${cellLevel} · ` : ""}${pointsWord}`}</span>
    </div>
  );
}

/** An automatic criterion: the suggestion and its reason; overriding it takes points and a reason, kept with the mark. */
function AutoScore({
  criterion,
  row,
  save,
  canEdit,
}: {
  criterion: RubricCriterion;
  row: DeskCardRow;
  save: ReturnType<typeof useMarkSaver>["save"];
  canEdit: boolean;
}) {
  const cell = row.cells[criterion.id];
  const [open, setOpen] = useState(false);
  const shown = cell?.points === null || cell?.points === undefined ? "no points yet" : counted(cell.points, "point", "points");
  return (
    <div className="flex flex-col gap-1 text-xs">
      <p className="text-sm">
        <strong className="tabular-nums">{shown}</strong>{" "}
        <span className="text-ink-700">
          {cell?.source === "override"
            ? `· overridden: “${cell.overrideReason}”`
            : cell?.source === "released"
              ? "· as released"
              : "· suggested"}
        </span>
      </p>
      <p className="text-ink-700">{cell?.suggestion?.reason}</p>
      {canEdit && cell?.source !== "released" ? (
        open ? (
          <OverrideForm criterion={criterion} cell={cell} save={save} onSaved={() => setOpen(false)} />
        ) : (
          <p className="flex flex-wrap gap-3">
            <button type="button" className="underline" onClick={() => setOpen(true)}>
              Override…
            </button>
            {cell?.source === "override" ? (
              <button
                type="button"
                className="underline"
                onClick={() => save({ kind: "score", criterionId: criterion.id, points: null, level: null })}
              >
                Use the suggestion
              </button>
            ) : null}
          </p>
        )
      ) : null}
    </div>
  );
}

/** A levels criterion's levels in words, once above the cards: each card's keys name only the level's number and points. */
export function LevelLegend({ criterion }: { criterion: RubricCriterion }) {
  if (criterion.kind !== "levels" || !criterion.levels?.length) return null;
  return (
    <ol aria-label={`The levels of “${criterion.title}”`} className="flex flex-col gap-0.5 text-sm text-ink-800">
      {criterion.levels.map((level, index) => (
        <li key={index}>
          <kbd className="rounded bg-ink-900/5 px-1.5 font-mono text-xs">{index + 1}</kbd>
          {` ${counted(level.points, "point", "points")}: ${level.description}`}
        </li>
      ))}
    </ol>
  );
}
