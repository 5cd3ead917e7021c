/**
 * Saves the form as a draft a moment after the student stops typing, so a reload or a dropped
 * connection loses nothing. The draft save changes nothing the page shows: the route skips reloading.
 */
import { useEffect, useRef } from "react";
import { useFetcher } from "react-router";
import type { FormState } from "./use-drop-log-state";

const DRAFT_DELAY_MS = 1200;

export function useDraftAutosave(state: FormState): { saving: boolean; savedAt: string | undefined } {
  const fetcher = useFetcher<{ draftSavedAt?: string }>();
  const firstRender = useRef(true);
  useEffect(() => {
    // What the page loaded with is already on the server.
    if (firstRender.current) {
      firstRender.current = false;
      return;
    }
    const timer = setTimeout(() => {
      fetcher.submit({ intent: "save-draft", draft: JSON.stringify(state) }, { method: "post" });
    }, DRAFT_DELAY_MS);
    return () => clearTimeout(timer);
    // The fetcher's identity changes as it runs; only the typed state should restart the timer.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [state]);
  return { saving: fetcher.state !== "idle", savedAt: fetcher.data?.draftSavedAt };
}
