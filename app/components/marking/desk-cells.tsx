/**
 * The cells of the marking desk's grid and its columns: each cell reads its row (and the row's save)
 * and the desk from context, so TanStack Table's column definitions stay static per rubric.
 */
import { createColumnHelper } from "@tanstack/react-table";
import { SortHeader } from "~/components/ui/sort-header";
import { createContext, useContext, type KeyboardEvent } from "react";
import { ClassLabelTag } from "~/components/comparison/class-label";
import { figure } from "~/components/drop-logs/reduction-summary";
import { ExtendedTo } from "~/components/labs/extended-to";
import { handInStandingWords } from "~/lib/drop-logs/hand-in-window";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { PointsInput, SaveStatus } from "./mark-inputs";
import type { SaveState } from "./mark-saves";

export type RowTools = {
  row: MarkingDeskRow;
  index: number;
  saveState: SaveState;
  save: (change: MarkChange, reason?: string | null) => void;
  retry: () => void;
};

export const RowContext = createContext<RowTools | null>(null);
export type DeskTools = {
  canEdit: boolean;
  rubric: RubricCriterion[];
  open: (membershipId: string) => void;
  kind: "drag" | "viscometry";
  timeZone: string;
};
export const DeskContext = createContext<DeskTools | null>(null);
const useRowTools = () => useContext(RowContext)!;
export const useDesk = () => useContext(DeskContext)!;

/** A control of the grid: `col` counts only the cells that take focus, so arrows skip plain text. */
const cellProps = (row: number, col: number) => ({ "data-row": row, "data-col": col, tabIndex: -1 });

function SelectCell({ checked, onChange, label }: { checked: boolean; onChange: (value: boolean) => void; label: string }) {
  const { index } = useRowTools();
  return (
    <input
      type="checkbox"
      className="h-5 w-5"
      checked={checked}
      onChange={(event) => onChange(event.target.checked)}
      aria-label={label}
      {...cellProps(index, 0)}
    />
  );
}

function StudentCell() {
  const { row, index } = useRowTools();
  const { open } = useDesk();
  return (
    <div className="flex flex-col">
      <button
        type="button"
        className="min-h-6 text-left font-medium underline underline-offset-2"
        onClick={() => open(row.membershipId)}
        {...cellProps(index, 1)}
      >
        {row.studentName}
      </button>
      <span className="text-xs text-ink-600">{row.cohortName}</span>
    </div>
  );
}

function HandInCell() {
  const { row } = useRowTools();
  const { timeZone } = useDesk();
  return (
    <div className="flex flex-col text-xs">
      <span className={row.status === "missing" || row.status === "late" ? "font-medium text-outlier" : ""}>
        {handInStandingWords[row.status]}
      </span>
      <ExtendedTo deadline={row.deadline} timeZone={timeZone} />
      {row.handIn ? (
        <span className="text-ink-600">
          v{row.handIn.version} · {row.handIn.dropCount ?? "?"} drops
        </span>
      ) : null}
      {row.handInChangedSinceMarked ? (
        <span className="text-amber-700">
          {/* Which version the mark rests on, so a marker knows what they are re-marking from. */}
          {row.markedHandIn ? `marked on v${row.markedHandIn.version}` : "marked before any hand-in"}; v{row.handIn?.version} is newer
          {row.needsRemarking ? " · needs re-marking (handed in after release)" : ""}
        </span>
      ) : null}
      {row.handIn?.kitNotAtHome ? <span className="text-amber-700">kit {row.handIn.kitNotAtHome.toLowerCase()} at hand-in</span> : null}
      {row.resultChangedSinceMarked ? (
        <span className="text-amber-700" data-testid="result-changed">
          result changed since it was marked: {figure(row.resultChangedSinceMarked.oldFigure, 3)} →{" "}
          {figure(row.resultChangedSinceMarked.newFigure, 3)} × ref
          {row.resultChangedSinceMarked.reofferedCriterionIds.length
            ? `; ${row.resultChangedSinceMarked.reofferedCriterionIds.length} automatic criteria now suggest other points`
            : ""}
        </span>
      ) : null}
    </div>
  );
}

function ResultCell() {
  const { row } = useRowTools();
  const { kind } = useDesk();
  if (!row.handIn) return null;
  return (
    <div className="flex flex-col text-xs tabular-nums">
      <span>{figure(row.handIn.figure, 3)} × ref</span>
      <span className="text-ink-600">
        {kind === "drag"
          ? `C_D ${figure(row.handIn.dragCoefficient, 3)} at Re ${figure(row.handIn.reynolds, 2)}`
          : `μ ${figure(row.handIn.viscosityPaS, 3)} Pa·s`}
      </span>
    </div>
  );
}

function LabelCell() {
  const { row } = useRowTools();
  if (!row.classLabel) return <span className="text-xs text-ink-600">—</span>;
  return (
    <span title={row.classLabel.reason} className="text-xs">
      <ClassLabelTag label={row.classLabel.label} />
      <span className="sr-only">: {row.classLabel.reason}</span>
    </span>
  );
}

/** Moves focus within the grid; Left/Right leave a text field only from its ends, Enter in one moves down. */
export function moveFocus(event: KeyboardEvent<HTMLElement>, table: HTMLElement) {
  const target = event.target as HTMLElement;
  const row = Number(target.dataset.row);
  const col = Number(target.dataset.col);
  const input = target instanceof HTMLInputElement && target.type === "text" ? target : null;
  const inRow = (index: number) => [...table.querySelectorAll<HTMLElement>(`[data-row="${index}"][data-col]`)];
  let found: HTMLElement | undefined;
  if (event.key === "ArrowDown" || event.key === "ArrowUp" || (event.key === "Enter" && input)) {
    found = inRow(row + (event.key === "ArrowUp" ? -1 : 1)).find((cell) => Number(cell.dataset.col) === col);
  } else if (event.key === "ArrowLeft" && (!input || input.selectionStart === 0)) {
    found = inRow(row)
      .filter((cell) => Number(cell.dataset.col) < col)
      .at(-1);
  } else if (event.key === "ArrowRight" && (!input || input.selectionEnd === input.value.length)) {
    found = inRow(row).find((cell) => Number(cell.dataset.col) > col);
  } else if ((event.key === "Home" || event.key === "End") && !input) {
    found = event.key === "Home" ? inRow(row)[0] : inRow(row).at(-1);
  }
  if (!found) return;
  event.preventDefault();
  if (input) input.blur(); // commits the field before focus moves on
  found.focus();
}

function LevelsCell({ criterion, col }: { criterion: RubricCriterion; col: number }) {
  const { row, index, save } = useRowTools();
  const { canEdit } = useDesk();
  const cell = row.cells[criterion.id];
  const levels = criterion.levels ?? [];
  const label = `${criterion.title} for ${row.studentName}`;
  if (!canEdit) return <span>{cell?.level ? `${cell.level} · ${cell.points}` : "—"}</span>;
  const setLevel = (level: number | null) => save({ kind: "score", criterionId: criterion.id, level, points: null });
  return (
    <select
      aria-label={label}
      aria-keyshortcuts={levels.map((_, number) => String(number + 1)).join(" ")}
      className="w-full min-w-28 rounded border border-ink-900/20 bg-white px-1 py-1 text-sm"
      value={cell?.level ?? ""}
      onChange={(event) => setLevel(event.target.value ? Number(event.target.value) : null)}
      onKeyDown={(event) => {
        const number = Number(event.key);
        if (Number.isInteger(number) && number >= 1 && number <= levels.length) {
          event.preventDefault();
          setLevel(number);
        } else if (event.key === "Delete" || event.key === "Backspace") {
          event.preventDefault();
          if (cell?.level) setLevel(null);
        } else if (event.key.startsWith("Arrow")) {
          // Arrows move between cells; the level is set by its number or the list.
          event.preventDefault();
        }
      }}
      {...cellProps(index, col)}
    >
      <option value="">—</option>
      {levels.map((level, number) => (
        <option key={number} value={number + 1}>
          {number + 1} · {level.points} pt{level.points === 1 ? "" : "s"}:{" "}
          {level.description.length > 24 ? `${level.description.slice(0, 23)}…` : level.description}
        </option>
      ))}
    </select>
  );
}

function RangeCell({ criterion, col }: { criterion: RubricCriterion; col: number }) {
  const { row, index, save } = useRowTools();
  const { canEdit } = useDesk();
  const points = row.cells[criterion.id]?.points ?? null;
  if (!canEdit) return <span className="tabular-nums">{points ?? "—"}</span>;
  return (
    <PointsInput
      value={points}
      label={`${criterion.title} for ${row.studentName}, ${criterion.minPoints} to ${criterion.maxPoints} points`}
      onCommit={(value) => save({ kind: "score", criterionId: criterion.id, points: value, level: null })}
      {...cellProps(index, col)}
    />
  );
}

/** An automatic criterion: its suggestion (or the override) in the grid; overriding needs a reason, so it happens in the side panel. */
function AutoCell({ criterion, col }: { criterion: RubricCriterion; col: number }) {
  const { row, index } = useRowTools();
  const { open } = useDesk();
  const cell = row.cells[criterion.id];
  const tag = cell?.source === "override" ? "overridden" : cell?.source === "released" ? "released" : "auto";
  return (
    <button
      type="button"
      onClick={() => open(row.membershipId)}
      title={cell?.overrideReason ?? cell?.suggestion?.reason ?? ""}
      className="inline-flex min-h-8 items-baseline gap-1 rounded px-1 text-sm tabular-nums ring-1 ring-ink-900/10"
      {...cellProps(index, col)}
    >
      {cell?.points ?? "—"}
      <span className={`text-xs ${tag === "overridden" ? "text-amber-700" : "text-ink-600"}`}>{tag}</span>
      {/* Visible words first, so the name heard matches the one seen; Enter opens the panel to override. */}
      <span className="sr-only">
        : {criterion.title} for {row.studentName}. {cell?.overrideReason ?? cell?.suggestion?.reason ?? ""}
      </span>
    </button>
  );
}

function PenaltyCell({ col }: { col: number }) {
  const { row, index, save } = useRowTools();
  const { canEdit } = useDesk();
  const penalty = row.mark?.latePenaltyPoints ?? 0;
  if (!canEdit) return <span className="tabular-nums">{penalty || ""}</span>;
  return (
    <PointsInput
      value={penalty || null}
      label={`Late penalty for ${row.studentName}, in points`}
      onCommit={(value) => save({ kind: "latePenalty", points: value ?? 0 })}
      {...cellProps(index, col)}
    />
  );
}

function TotalCell() {
  const { row } = useRowTools();
  return (
    <span className="font-medium tabular-nums">
      {row.progress === "unmarked" ? <span className="text-ink-600">—</span> : row.total}
      <span className="text-xs font-normal text-ink-600"> / {row.maxTotal}</span>
      {row.mark?.releasedAt ? <span className="block text-xs font-normal text-consistent">released</span> : null}
    </span>
  );
}

function StatusCell() {
  const { saveState, retry } = useRowTools();
  return (
    <div role="status" aria-live="polite" className="min-w-20">
      <SaveStatus state={saveState} retry={retry} />
    </div>
  );
}

const column = createColumnHelper<MarkingDeskRow>();

/** The desk's columns: selection, student, evidence, one per criterion, penalty, total and the save. */
export function deskColumns(rubric: RubricCriterion[], sort: string | null, maxTotal: number) {
  let col = 2; // 0: the selection box, 1: the student's name
  const criterionColumns = rubric.map((criterion) => {
    const at = col++;
    return column.display({
      id: criterion.id,
      header: () => (
        <span title={criterion.description}>
          {criterion.title}
          <span className="block font-normal normal-case text-ink-600">
            {criterion.kind === "levels"
              ? `levels 1–${criterion.levels?.length ?? 0}`
              : criterion.kind === "auto"
                ? "automatic"
                : `${criterion.minPoints}–${criterion.maxPoints}`}{" "}
            · max {criterion.maxPoints}
          </span>
        </span>
      ),
      cell: () =>
        criterion.kind === "levels" ? (
          <LevelsCell criterion={criterion} col={at} />
        ) : criterion.kind === "range" ? (
          <RangeCell criterion={criterion} col={at} />
        ) : (
          <AutoCell criterion={criterion} col={at} />
        ),
    });
  });
  const penaltyCol = col++;
  return [
    column.display({
      id: "select",
      header: ({ table }) => (
        <input
          type="checkbox"
          className="h-5 w-5"
          aria-label="Select every student on this page"
          checked={table.getIsAllRowsSelected()}
          ref={(input) => {
            if (input) input.indeterminate = table.getIsSomeRowsSelected();
          }}
          onChange={table.getToggleAllRowsSelectedHandler()}
        />
      ),
      cell: ({ row }) => (
        <SelectCell
          checked={row.getIsSelected()}
          onChange={(value) => row.toggleSelected(value)}
          label={`Select ${row.original.studentName}`}
        />
      ),
    }),
    column.display({ id: "student", header: () => <SortHeader label="Student" by="name" sort={sort} />, cell: () => <StudentCell /> }),
    column.display({ id: "status", header: () => <SortHeader label="Hand-in" by="status" sort={sort} />, cell: () => <HandInCell /> }),
    column.display({ id: "figure", header: () => <SortHeader label="Result" by="figure" sort={sort} />, cell: () => <ResultCell /> }),
    column.display({ id: "label", header: () => <SortHeader label="Class" by="label" sort={sort} />, cell: () => <LabelCell /> }),
    ...criterionColumns,
    column.display({ id: "penalty", header: "Late penalty", cell: () => <PenaltyCell col={penaltyCol} /> }),
    column.display({
      id: "total",
      header: () => <SortHeader label={`Total / ${maxTotal}`} by="total" sort={sort} />,
      cell: () => <TotalCell />,
    }),
    column.display({ id: "saved", header: () => <span className="sr-only">Saving</span>, cell: () => <StatusCell /> }),
  ];
}
