/**
 * One change for every selected student: a level or points of the criterion being marked (or another),
 * a late penalty, or a comment.
 * The selection goes as the desk's filters and what was chosen among them (everything, whole bands,
 * cards one by one, cards taken out), so that "every hand-in shown" never ships every student's id;
 * the server finds the students and applies the change in one transaction, all or nothing. The bar
 * shows the work under way and what came of it.
 */
import { useEffect, useRef, useState } from "react";
import { useFetcher, useLocation } from "react-router";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import { counted } from "~/lib/plural";
import { typedPoints } from "./mark-inputs";

export type BulkResponse =
  | { intent: "bulk"; status: "applied"; changed: number; unchanged: number }
  | { intent: "bulk"; status: "refused"; error: { code: string; message: string; membershipIds: string[] } }
  | { status: "failed"; message: string };

/** The selection as the bulk action takes it (see `DeskSelection`), with the filters it is made within and its size. */
export type BulkTarget = {
  criterionId: string;
  cohortId: string | null;
  status: string | null;
  all: boolean;
  bands: string[];
  ids: string[];
  except: string[];
  count: number;
};

const control = "max-w-full rounded border border-ink-900/20 bg-white px-2 py-1.5 text-sm";

export function BulkBar({
  rubric,
  criterion: marking,
  target,
  clear,
}: {
  rubric: RubricCriterion[];
  /** The criterion the desk is marking: what the bar changes unless told otherwise. */
  criterion: RubricCriterion;
  target: BulkTarget;
  clear: () => void;
}) {
  const fetcher = useFetcher<BulkResponse>({ key: "bulk-marks" });
  const action = useLocation().pathname;
  const [what, setWhat] = useState(`criterion:${marking.id}`);
  const [value, setValue] = useState("");
  const [reason, setReason] = useState("");
  const [localError, setLocalError] = useState<string | null>(null);
  const sentCount = useRef(0);
  const criterion = what.startsWith("criterion:") ? rubric.find((candidate) => `criterion:${candidate.id}` === what) : undefined;
  const busy = fetcher.state !== "idle";
  const result = busy ? undefined : fetcher.data;

  useEffect(() => {
    if (result && "intent" in result && result.status === "applied") clear();
  }, [result, clear]);

  const selected = target.count;
  if (selected === 0 && !busy && !result) return null;

  const changeFor = (): MarkChange | string => {
    const number = typedPoints(value);
    if (what === "feedback") return { kind: "feedback", text: value };
    if (number === null || !Number.isFinite(number)) return criterion?.kind === "levels" ? "Choose a level." : "Enter a number of points.";
    if (what === "penalty") return { kind: "latePenalty", points: number };
    if (criterion?.kind === "levels") return { kind: "score", criterionId: criterion.id, level: number, points: null };
    return {
      kind: "score",
      criterionId: criterion!.id,
      points: number,
      level: null,
      overrideReason: criterion?.kind === "auto" ? reason : null,
    };
  };

  return (
    <section
      aria-label="Change the selected students"
      className="no-print flex flex-col gap-2 rounded-lg bg-paper-100 p-3 text-sm ring-1 ring-ink-900/10"
    >
      <form
        className="flex flex-wrap items-end gap-3"
        onSubmit={(event) => {
          event.preventDefault();
          const change = changeFor();
          if (typeof change === "string") return setLocalError(change);
          setLocalError(null);
          sentCount.current = selected;
          const { count: _count, ...selection } = target;
          fetcher.submit(
            { intent: "bulk", selection, change, reason: reason.trim() || null },
            { method: "post", action, encType: "application/json" },
          );
        }}
      >
        <span className="self-center font-medium">{counted(selected, "card", "cards")} selected</span>
        <label className="flex min-w-0 max-w-full flex-col gap-1">
          <span>Change</span>
          <select className={control} value={what} onChange={(event) => (setWhat(event.target.value), setValue(""))}>
            {rubric.map((entry) => (
              <option key={entry.id} value={`criterion:${entry.id}`}>
                {entry.title}
              </option>
            ))}
            <option value="penalty">Late penalty</option>
            <option value="feedback">Feedback comment</option>
          </select>
        </label>
        {criterion?.kind === "levels" ? (
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span>Level</span>
            <select className={control} value={value} onChange={(event) => setValue(event.target.value)}>
              <option value="">Choose…</option>
              {(criterion.levels ?? []).map((level, index) => (
                <option key={index} value={index + 1}>
                  {index + 1} · {counted(level.points, "point", "points")}: {level.description}
                </option>
              ))}
            </select>
          </label>
        ) : what === "feedback" ? (
          <label className="flex min-w-0 flex-1 flex-col gap-1 sm:min-w-64">
            <span>Comment (replaces each one&apos;s feedback)</span>
            <textarea className={control} rows={2} value={value} onChange={(event) => setValue(event.target.value)} maxLength={5000} />
          </label>
        ) : (
          <label className="flex min-w-0 max-w-full flex-col gap-1">
            <span>
              {what === "penalty"
                ? "Penalty (points)"
                : `Points (${criterion?.kind === "range" ? criterion.minPoints : 0}–${criterion?.maxPoints})`}
            </span>
            <input className={`${control} w-24`} inputMode="decimal" value={value} onChange={(event) => setValue(event.target.value)} />
          </label>
        )}
        <label className="flex min-w-0 flex-col gap-1 sm:min-w-48">
          <span>{criterion?.kind === "auto" ? "Why override the automatic points (required)" : "Reason (needed for released marks)"}</span>
          <input className={control} value={reason} onChange={(event) => setReason(event.target.value)} maxLength={500} />
        </label>
        <button
          type="submit"
          disabled={busy || selected === 0}
          className="rounded bg-ink-800 px-4 py-2 font-medium text-paper-50 hover:bg-ink-700 disabled:opacity-60"
        >
          Apply to {counted(selected, "card", "cards")}
        </button>
        <button type="button" onClick={clear} className="rounded px-3 py-2 underline">
          Clear the selection
        </button>
      </form>
      <div role="status" aria-live="polite">
        {busy ? (
          <span className="flex items-center gap-2">
            <progress className="h-2 w-40" aria-label="Applying the change" />
            Applying to {counted(sentCount.current, "student", "students")} in one go…
          </span>
        ) : localError ? (
          <span className="text-outlier">{localError}</span>
        ) : result && "intent" in result && result.status === "applied" ? (
          <span className="text-consistent">
            Done: {counted(result.changed, "mark", "marks")} changed
            {result.unchanged ? `, ${result.unchanged} already had it` : ""}.
          </span>
        ) : result ? (
          <span className="text-outlier">Nothing was changed: {"intent" in result ? result.error.message : result.message}</span>
        ) : null}
      </div>
    </section>
  );
}
