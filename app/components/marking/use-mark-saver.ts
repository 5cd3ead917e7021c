/**
 * Runs one desk row's saves: it feeds the loader's reads and the fetcher's answers to the `markSaves`
 * reducer, and sends the save that the reducer has put in flight. The rules live in `mark-saves`.
 */
import { useCallback, useEffect, useRef, type Dispatch } from "react";
import { useFetcher } from "react-router";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import { rowView, type MarkSaveEvent, type RowSaves, type SavableRow, type SaveResponse } from "./mark-saves";

export function useMarkSaver<Row extends SavableRow, Answered = Row>({
  action,
  rubric,
  base,
  saves,
  dispatch,
  view,
  rowOf,
}: {
  action: string;
  rubric: readonly RubricCriterion[];
  /** The row as the page's loader last read it. */
  base: Row;
  /** This row's saves in the desk's `markSaves` state. */
  saves: RowSaves<Row> | undefined;
  dispatch: Dispatch<MarkSaveEvent<Row>>;
  /** Sent with each save: the desk's cards ask for their answer as a card of the criterion they mark. */
  view?: { criterionId: string };
  /** The row in an answer, as the page keeps it (a card gets its cells computed). */
  rowOf?: (answered: Answered) => Row;
}) {
  const { membershipId } = base;
  const fetcher = useFetcher<SaveResponse<Row> | SaveResponse<Row & Answered>>({ key: `mark:${membershipId}` });
  const inFlight = saves?.inFlight ?? null;
  // A save already in flight when the row mounts was sent before it was last unmounted (paging away).
  const submitted = useRef(inFlight);
  const handled = useRef<unknown>(undefined);

  useEffect(() => dispatch({ type: "loaded", row: base }), [base, dispatch]);

  useEffect(() => {
    if (!inFlight || inFlight === submitted.current) return;
    submitted.current = inFlight;
    fetcher.submit(
      {
        intent: "save",
        membershipId,
        expectedVersion: inFlight.expectedVersion,
        change: inFlight.change,
        reason: inFlight.reason,
        view: view ?? null,
      },
      { method: "post", action, encType: "application/json" },
    );
    // Each save the reducer puts in flight is sent once; `fetcher` changes identity as it submits.
  }, [inFlight, membershipId, action, view]);

  useEffect(() => {
    const response = fetcher.data;
    if (fetcher.state !== "idle" || !response || response === handled.current) return;
    handled.current = response;
    const answered = "row" in response && rowOf ? { ...response, row: rowOf(response.row as Answered) } : (response as SaveResponse<Row>);
    dispatch({ type: "answered", membershipId, rubric, response: answered });
  }, [fetcher.state, fetcher.data, membershipId, rubric, dispatch, rowOf]);

  const save = useCallback(
    (change: MarkChange, reason: string | null = null) => dispatch({ type: "changed", rubric, base, change, reason }),
    [dispatch, rubric, base],
  );
  const retry = useCallback(() => dispatch({ type: "retried", membershipId, rubric }), [dispatch, membershipId, rubric]);
  const { row, save: saveState } = rowView(saves, base);
  return { row, saveState, save, retry };
}
