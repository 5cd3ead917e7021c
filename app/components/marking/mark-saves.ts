/**
 * The marking desk's saves, one entry per student (keyed by membership id), as one pure reducer that
 * the tests drive without a browser. Each change shows at once (computed with the same pure rubric
 * code the server runs), then goes to the server naming the version it started from. Changes made
 * while a save is on its way wait their turn, so a quick marker never conflicts with themself; another
 * person's save in between comes back as a conflict, and the row then shows their mark. A failed save
 * keeps the change on screen with a retry. `use-mark-saver` only runs the fetcher this state asks for.
 */
import { AppError } from "~/lib/app-error";
import { applyMarkChange, markProgress, markTotals, type MarkChange, type MarkContent } from "~/lib/marking/marks";
import type { AutoSuggestion } from "~/lib/marking/automatic-criteria";
import type { MarkScores, MarkTotals, MarkProgress } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";

/**
 * What a save reads and rewrites of a row: a desk card (`DeskCardRow`) or a student's whole row on
 * their marking view (`MarkingDeskRow`).
 */
export type SavableRow = {
  membershipId: string;
  expectedVersion: number;
  mark: {
    scores: MarkScores;
    latePenaltyPoints: number;
    feedback?: string;
    releasedAt: string | null;
    markedBy: { name: string } | null;
  } | null;
  suggestions: Record<string, AutoSuggestion>;
  resultChangedSinceMarked: unknown;
  progress: MarkProgress;
} & Pick<MarkTotals, "cells" | "subtotal" | "total" | "complete">;

/** One change as the marker made it, with the reason a released mark's change needs. */
export type MarkEdit = { change: MarkChange; reason: string | null };

export type SaveState =
  | { status: "idle" }
  | { status: "saving" }
  | { status: "saved" }
  | { status: "conflict"; message: string }
  /** `retryable`: only a save lost on the way may succeed when sent again; a refused value never does. */
  | ({ status: "failed"; message: string; retryable: boolean } & MarkEdit);

/** What the desk's action answers to one save; `failed` is the client action's word for a lost connection. */
export type SaveResponse<Row extends SavableRow = MarkingDeskRow> =
  | { intent: "save"; status: "saved" | "conflict"; row: Row }
  | { intent: "save"; status: "refused"; error: { code: string; message: string; field: string } }
  | { status: "failed"; message: string };

export type RowSaves<Row extends SavableRow = MarkingDeskRow> = {
  /** The row as the server last confirmed it: the version the next save names. */
  confirmed: Row;
  /** The row on screen: the confirmed one with the changes not saved yet. */
  shown: Row;
  /** The save on its way. A new object each time one is due, so the effect runner sends each once. */
  inFlight: (MarkEdit & { expectedVersion: number }) | null;
  /** Changes made while a save was on its way, sent one after another from the version it returns. */
  queue: MarkEdit[];
  save: SaveState;
  /** Retries since the last change that was saved. */
  retries: number;
};

/** The rows with saves of their own; a row not here shows what the loader read. */
export type MarkSaves<Row extends SavableRow = MarkingDeskRow> = Readonly<Record<string, RowSaves<Row>>>;

export type MarkSaveEvent<Row extends SavableRow = MarkingDeskRow> =
  /** The loader read the row again (after a bulk action, or paging back). */
  | { type: "loaded"; row: Row }
  | ({ type: "changed"; rubric: readonly RubricCriterion[]; base: Row } & MarkEdit)
  | { type: "answered"; membershipId: string; rubric: readonly RubricCriterion[]; response: SaveResponse<Row> }
  | { type: "retried"; membershipId: string; rubric: readonly RubricCriterion[] };

// A desk card has no feedback: it never changes it, and the server applies a change to the stored mark.
const contentOf = (row: SavableRow): MarkContent | null =>
  row.mark ? { scores: row.mark.scores, feedback: row.mark.feedback ?? "", latePenaltyPoints: row.mark.latePenaltyPoints } : null;

/** The row as it will be once `change` is saved; throws an `AppError` for a value the rubric refuses. */
export function withChange<Row extends SavableRow>(rubric: readonly RubricCriterion[], row: Row, change: MarkChange): Row {
  const content = applyMarkChange(rubric, contentOf(row), change, { released: row.mark?.releasedAt != null });
  const totals = markTotals(rubric, content, row.suggestions);
  const mark = row.mark
    ? { ...row.mark, ...content }
    : ({
        ...content,
        id: "",
        version: 0,
        storedTotal: 0,
        basedOnVersionId: null,
        basedOnRevision: null,
        basedOnFigure: null,
        markedBy: null,
        moderatedBy: null,
        moderatedAt: null,
        updatedAt: "",
        releasedAt: null,
        releasedSnapshot: null,
        reopenedAt: null,
      } satisfies NonNullable<MarkingDeskRow["mark"]> as NonNullable<Row["mark"]>);
  // A save rests the mark on the result shown now, so a "result changed since it was marked" flag goes.
  return {
    ...row,
    mark,
    resultChangedSinceMarked: null,
    cells: totals.cells,
    subtotal: totals.subtotal,
    total: totals.total,
    complete: totals.complete,
    progress: markProgress(true, totals),
  };
}

const idle: SaveState = { status: "idle" };

/** What a row shows and how its save stands: its saves, or else the loader's `base` row. */
export const rowView = <Row extends SavableRow>(saves: RowSaves<Row> | undefined, base: Row) => ({
  row: saves?.shown ?? base,
  save: saves?.save ?? idle,
});

const withRow = <Row extends SavableRow>(saves: MarkSaves<Row>, membershipId: string, entry: RowSaves<Row> | undefined): MarkSaves<Row> => {
  const next = { ...saves };
  if (entry) next[membershipId] = entry;
  else delete next[membershipId];
  return next;
};

function edit<Row extends SavableRow>(
  rubric: readonly RubricCriterion[],
  entry: RowSaves<Row>,
  { change, reason }: MarkEdit,
): RowSaves<Row> {
  let shown: Row;
  try {
    shown = withChange(rubric, entry.shown, change);
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    return { ...entry, save: { status: "failed", message: error.message, retryable: false, change, reason } };
  }
  if (entry.inFlight) return { ...entry, shown, save: { status: "saving" }, queue: [...entry.queue, { change, reason }] };
  return { ...entry, shown, save: { status: "saving" }, inFlight: { change, reason, expectedVersion: entry.confirmed.expectedVersion } };
}

function answer<Row extends SavableRow>(
  rubric: readonly RubricCriterion[],
  entry: RowSaves<Row>,
  response: SaveResponse<Row>,
): RowSaves<Row> {
  const sent = entry.inFlight!;
  if ("intent" in response && response.status === "saved") {
    const [waiting, ...rest] = entry.queue;
    if (!waiting) return { confirmed: response.row, shown: response.row, inFlight: null, queue: [], save: { status: "saved" }, retries: 0 };
    // Show the waiting changes over the server's row, and send the next one on from its version.
    const shown = entry.queue.reduce((row, queued) => safeWithChange(rubric, row, queued.change) ?? row, response.row);
    return {
      confirmed: response.row,
      shown,
      inFlight: { ...waiting, expectedVersion: response.row.expectedVersion },
      queue: rest,
      save: { status: "saving" },
      retries: 0,
    };
  }
  if ("intent" in response && response.status === "conflict") {
    const message = `${response.row.mark?.markedBy?.name ?? "Someone"} changed this mark meanwhile: theirs is shown. Make your change again if it still applies.`;
    return { confirmed: response.row, shown: response.row, inFlight: null, queue: [], save: { status: "conflict", message }, retries: 0 };
  }
  // Refused or lost on the way: what the marker entered stays on screen, marked unsaved, with a retry.
  const message = "error" in response ? response.error.message : "message" in response ? response.message : "The save was not taken.";
  const retryable = !("error" in response);
  return { ...entry, inFlight: null, queue: [], save: { status: "failed", message, retryable, change: sent.change, reason: sent.reason } };
}

export function markSaves<Row extends SavableRow>(saves: MarkSaves<Row>, event: MarkSaveEvent<Row>): MarkSaves<Row> {
  if (event.type === "loaded") {
    const entry = saves[event.row.membershipId];
    if (!entry) return saves;
    const confirmed = event.row.expectedVersion >= entry.confirmed.expectedVersion ? event.row : entry.confirmed;
    // A fresher read supersedes what the row showed, unless a save is on its way or failed.
    if (!entry.inFlight && entry.save.status !== "failed" && event.row.expectedVersion >= entry.shown.expectedVersion)
      return withRow(saves, event.row.membershipId, undefined);
    return confirmed === entry.confirmed ? saves : withRow(saves, event.row.membershipId, { ...entry, confirmed });
  }
  if (event.type === "changed") {
    const entry: RowSaves<Row> = saves[event.base.membershipId] ?? {
      confirmed: event.base,
      shown: event.base,
      inFlight: null,
      queue: [],
      save: idle,
      retries: 0,
    };
    return withRow(saves, event.base.membershipId, edit(event.rubric, entry, event));
  }
  const entry = saves[event.membershipId];
  if (event.type === "answered")
    return entry?.inFlight ? withRow(saves, event.membershipId, answer(event.rubric, entry, event.response)) : saves;
  if (entry?.save.status !== "failed") return saves;
  return withRow(saves, event.membershipId, { ...edit(event.rubric, entry, entry.save), retries: entry.retries + 1 });
}

function safeWithChange<Row extends SavableRow>(rubric: readonly RubricCriterion[], row: Row, change: MarkChange): Row | null {
  try {
    return withChange(rubric, row, change);
  } catch {
    return null;
  }
}
