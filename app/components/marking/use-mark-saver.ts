/**
 * Runs one desk row's saves: it feeds the loader's reads and the fetcher's answers to the `markSaves`
 * reducer, and sends the save that the reducer has put in flight. The rules live in `mark-saves`.
 */
import { useCallback, useEffect, useRef, type Dispatch } from "react";
import { useFetcher } from "react-router";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { rowView, type MarkSaveEvent, type RowSaves, type SaveResponse } from "./mark-saves";

export function useMarkSaver({
  action,
  rubric,
  base,
  saves,
  dispatch,
}: {
  action: string;
  rubric: readonly RubricCriterion[];
  /** The row as the page's loader last read it. */
  base: MarkingDeskRow;
  /** This row's saves in the desk's `markSaves` state. */
  saves: RowSaves | undefined;
  dispatch: Dispatch<MarkSaveEvent>;
}) {
  const { membershipId } = base;
  const fetcher = useFetcher<SaveResponse>({ key: `mark:${membershipId}` });
  const inFlight = saves?.inFlight ?? null;
  // A save already in flight when the row mounts was sent before it was last unmounted (paging away).
  const submitted = useRef(inFlight);
  const handled = useRef<SaveResponse | undefined>(undefined);

  useEffect(() => dispatch({ type: "loaded", row: base }), [base, dispatch]);

  useEffect(() => {
    if (!inFlight || inFlight === submitted.current) return;
    submitted.current = inFlight;
    fetcher.submit(
      { intent: "save", membershipId, expectedVersion: inFlight.expectedVersion, change: inFlight.change, reason: inFlight.reason },
      { method: "post", action, encType: "application/json" },
    );
    // Each save the reducer puts in flight is sent once; `fetcher` changes identity as it submits.
  }, [inFlight, membershipId, action]);

  useEffect(() => {
    const response = fetcher.data;
    if (fetcher.state !== "idle" || !response || response === handled.current) return;
    handled.current = response;
    dispatch({ type: "answered", membershipId, rubric, response });
  }, [fetcher.state, fetcher.data, membershipId, rubric, dispatch]);

  const save = useCallback(
    (change: MarkChange, reason: string | null = null) => dispatch({ type: "changed", rubric, base, change, reason }),
    [dispatch, rubric, base],
  );
  const retry = useCallback(() => dispatch({ type: "retried", membershipId, rubric }), [dispatch, membershipId, rubric]);
  const { row, save: saveState } = rowView(saves, base);
  return { row, saveState, save, retry };
}
