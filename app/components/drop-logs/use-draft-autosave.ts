/**
 * Saves the form as a draft a moment after the student stops typing, so a reload or a dropped
 * connection loses nothing. The draft save changes nothing the page shows: the route skips reloading.
 */
import { useCallback, useEffect, useRef } from "react";
import { useFetcher } from "react-router";
import type { FormState } from "./use-drop-log-state";

const DRAFT_DELAY_MS = 1200;

export function useDraftAutosave(state: FormState): { saving: boolean; savedAt: string | undefined; cancel: () => void } {
  const fetcher = useFetcher<{ draftSavedAt?: string }>();
  const firstRender = useRef(true);
  const timer = useRef<ReturnType<typeof setTimeout>>(undefined);
  useEffect(() => {
    // What the page loaded with is already on the server.
    if (firstRender.current) {
      firstRender.current = false;
      return;
    }
    timer.current = setTimeout(() => {
      fetcher.submit({ intent: "save-draft", draft: JSON.stringify(state) }, { method: "post" });
    }, DRAFT_DELAY_MS);
    return () => clearTimeout(timer.current);
    // The fetcher's identity changes as it runs; only the typed state should restart the timer.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state]);
  // A draft save that ends while the form's own submission reloads the page would end that reload
  // with its data, which skips this route (React Router completes a pending navigation with the latest
  // fetcher's revalidation): the page kept the old versions after a hand-in. The form sends everything
  // typed anyway, so a submission drops the waiting or running draft save.
  const { reset } = fetcher;
  const cancel = useCallback(() => {
    clearTimeout(timer.current);
    reset();
  }, [reset]);
  return { saving: fetcher.state !== "idle", savedAt: fetcher.data?.draftSavedAt, cancel };
}
