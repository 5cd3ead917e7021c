/**
 * The live preview: while the student types, the server's reduction of the log as it stands (the
 * same one a hand-in stores), asked for after a pause and dropped when the input changes again. An
 * enhancement: without JavaScript the hand-in's answer shows the result.
 */
import { useEffect, useState } from "react";
import { dropFieldName } from "~/lib/drop-logs/drop-log-input";
import type { DropLogReduction } from "~/lib/drop-logs/reduce-drop-log";
import { parseTypedNumber } from "~/lib/forms/typed-number";

export type Preview =
  | { status: "idle" | "loading" }
  | { status: "ready"; result: DropLogReduction; rows: number[] }
  | { status: "error"; message: string; issues: Record<string, string> };

const PREVIEW_DELAY_MS = 400;

/** Issue paths (`drops.2` of the sent drops) back on the form's fields (the row the drop came from). */
function issuesByField(issues: { path: (string | number)[]; message: string }[], rows: number[]): Record<string, string> {
  const byField: Record<string, string> = {};
  for (const issue of issues) {
    const [first, second] = issue.path;
    const key = first === "drops" && typeof second === "number" ? dropFieldName(rows[second] ?? second) : String(first ?? "");
    byField[key] ??= issue.message;
  }
  return byField;
}

export function useReductionPreview(labId: string, input: { temperatureC: string; drops: string[] }, rows: number[]): Preview {
  const [preview, setPreview] = useState<Preview>({ status: "idle" });
  useEffect(() => {
    if (!input.drops.length || parseTypedNumber(input.temperatureC) === undefined) {
      setPreview({ status: "idle" });
      return;
    }
    const controller = new AbortController();
    const timer = setTimeout(async () => {
      setPreview({ status: "loading" });
      try {
        const response = await fetch("/api/v1/reduce", {
          method: "POST",
          headers: { "Content-Type": "application/json" },
          body: JSON.stringify({ labId, input }),
          signal: controller.signal,
        });
        const body = await response.json();
        if (response.ok) setPreview({ status: "ready", result: body as DropLogReduction, rows });
        else
          setPreview({
            status: "error",
            message: body.error?.message ?? "The preview failed.",
            issues: issuesByField(body.error?.issues ?? [], rows),
          });
      } catch {
        if (!controller.signal.aborted)
          setPreview({ status: "error", message: "No connection: the preview will come back when you are online.", issues: {} });
      }
    }, PREVIEW_DELAY_MS);
    return () => {
      clearTimeout(timer);
      controller.abort();
    };
  }, [labId, input, rows]);
  return preview;
}
