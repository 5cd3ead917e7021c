/**
 * Saving one student's mark as the marker works: each change shows at once (computed with the same
 * pure rubric code the server runs), then goes to the server through the row's fetcher, naming the
 * version it started from. Changes made while a save is on its way wait their turn, so a quick
 * marker never conflicts with themself; another person's save in between comes back as a conflict,
 * and the row then shows their mark. A failed save keeps the change on screen with a retry.
 */
import { AppError } from "~/lib/app-error";
import { useCallback, useEffect, useRef } from "react";
import { useFetcher } from "react-router";
import { applyMarkChange, markProgress, markTotals, type MarkChange, type MarkContent } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";

export type SaveState =
  | { status: "idle" }
  | { status: "saving" }
  | { status: "saved" }
  | { status: "conflict"; message: string }
  | { status: "failed"; message: string; change: MarkChange; reason?: string | null };

export type RowState = { row: MarkingDeskRow; save: SaveState };

/** What the desk's action answers to one save. */
export type SaveResponse =
  | { intent: "save"; status: "saved" | "conflict"; row: MarkingDeskRow }
  | { intent: "save"; status: "refused"; error: { code: string; message: string; field: string } }
  | { status: "failed"; message: string };

const idle: SaveState = { status: "idle" };

const contentOf = (row: MarkingDeskRow): MarkContent | null =>
  row.mark ? { scores: row.mark.scores, feedback: row.mark.feedback, latePenaltyPoints: row.mark.latePenaltyPoints } : null;

/** The row as it will be once `change` is saved; throws an `AppError` for a value the rubric refuses. */
export function withChange(rubric: readonly RubricCriterion[], row: MarkingDeskRow, change: MarkChange): MarkingDeskRow {
  const content = applyMarkChange(rubric, contentOf(row), change, { released: row.mark?.releasedAt != null });
  const totals = markTotals(rubric, content, row.suggestions);
  const mark = row.mark ? { ...row.mark, ...content } : ({ ...content, id: "", version: 0, storedTotal: 0, basedOnVersionId: null, basedOnRevision: null, basedOnFigure: null, markedBy: null, moderatedBy: null, moderatedAt: null, updatedAt: "", releasedAt: null, releasedSnapshot: null, reopenedAt: null } satisfies NonNullable<MarkingDeskRow["mark"]>);
  // A save rests the mark on the result shown now, so a "result changed since it was marked" flag goes.
  return { ...row, mark, resultChangedSinceMarked: null, cells: totals.cells, subtotal: totals.subtotal, total: totals.total, complete: totals.complete, progress: markProgress(true, totals) };
}

export function useMarkSaver({
  action,
  rubric,
  base,
  state,
  onState,
}: {
  action: string;
  rubric: readonly RubricCriterion[];
  /** The row as the page's loader last read it. */
  base: MarkingDeskRow;
  state: RowState | undefined;
  onState: (membershipId: string, state: RowState | undefined) => void;
}) {
  const fetcher = useFetcher<SaveResponse>({ key: `mark:${base.membershipId}` });
  /** The row as the server last confirmed it: the version the next save names. */
  const confirmed = useRef(base);
  const inflight = useRef<{ change: MarkChange; reason?: string | null } | null>(null);
  const queue = useRef<{ change: MarkChange; reason?: string | null }[]>([]);
  const handled = useRef<SaveResponse | undefined>(undefined);
  const shown = state?.row ?? base;

  // A fresher read by the loader (after a bulk action, or paging back) supersedes what this row knew.
  useEffect(() => {
    if (base.expectedVersion >= confirmed.current.expectedVersion) confirmed.current = base;
    if (state && !inflight.current && state.save.status !== "failed" && base.expectedVersion >= state.row.expectedVersion) onState(base.membershipId, undefined);
    // Only a new read from the loader matters here; the row's own saves update `state` themselves.
  }, [base]);

  const send = useCallback(
    (next: { change: MarkChange; reason?: string | null }) => {
      inflight.current = next;
      fetcher.submit(
        { intent: "save", membershipId: base.membershipId, expectedVersion: confirmed.current.expectedVersion, change: next.change, reason: next.reason ?? null },
        { method: "post", action, encType: "application/json" },
      );
    },
    [fetcher, action, base.membershipId],
  );

  useEffect(() => {
    const response = fetcher.data;
    if (fetcher.state !== "idle" || !response || response === handled.current) return;
    handled.current = response;
    const sent = inflight.current;
    inflight.current = null;
    if ("intent" in response && response.status === "saved") {
      confirmed.current = response.row;
      const waiting = queue.current.shift();
      if (!waiting) return onState(base.membershipId, { row: response.row, save: { status: "saved" } });
      // Show the waiting changes over the server's row, and send the next one on from its version.
      let row = response.row;
      for (const entry of [waiting, ...queue.current]) row = safeWithChange(rubric, row, entry.change) ?? row;
      onState(base.membershipId, { row, save: { status: "saving" } });
      return send(waiting);
    }
    queue.current = [];
    if ("intent" in response && response.status === "conflict") {
      confirmed.current = response.row;
      return onState(base.membershipId, {
        row: response.row,
        save: { status: "conflict", message: `${response.row.mark?.markedBy?.name ?? "Someone"} changed this mark meanwhile: theirs is shown. Make your change again if it still applies.` },
      });
    }
    // Refused or lost on the way: what the marker entered stays on screen, marked unsaved, with a retry.
    const message = "error" in response ? response.error.message : "message" in response ? response.message : "The save was not taken.";
    onState(base.membershipId, { row: state?.row ?? confirmed.current, save: { status: "failed", message, change: sent!.change, reason: sent?.reason } });
  }, [fetcher.state, fetcher.data, base.membershipId, onState, rubric, send, state]);

  /** Applies `change` on screen now and saves it; false (with the message shown) when the rubric refuses it. */
  const save = useCallback(
    (change: MarkChange, reason?: string | null): boolean => {
      let row: MarkingDeskRow;
      try {
        row = withChange(rubric, shown, change);
      } catch (error) {
        if (!(error instanceof AppError)) throw error;
        onState(base.membershipId, { row: shown, save: { status: "failed", message: error.message, change, reason } });
        return false;
      }
      onState(base.membershipId, { row, save: { status: "saving" } });
      if (inflight.current) queue.current.push({ change, reason });
      else send({ change, reason });
      return true;
    },
    [rubric, shown, base.membershipId, onState, send],
  );

  const retry = useCallback(() => {
    if (state?.save.status === "failed") save(state.save.change, state.save.reason);
  }, [state, save]);

  return { row: shown, saveState: state?.save ?? idle, save, retry };
}

function safeWithChange(rubric: readonly RubricCriterion[], row: MarkingDeskRow, change: MarkChange): MarkingDeskRow | null {
  try {
    return withChange(rubric, row, change);
  } catch {
    return null;
  }
}
