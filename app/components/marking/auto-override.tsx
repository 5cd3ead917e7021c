/**
 * An automatic criterion of one student's mark: the suggestion with its reason, and the override,
 * which needs a reason kept with the mark. The per-student view shows it whole; the desk's cards open
 * the same override form from a short summary.
 */
import { useId, useState } from "react";
import type { MarkCell, MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { counted } from "~/lib/plural";
import { outOfBounds, typedPoints } from "./mark-inputs";

export function AutoOverride({
  criterion,
  row,
  save,
  canEdit,
}: {
  criterion: RubricCriterion;
  row: MarkingDeskRow;
  save: (change: MarkChange) => void;
  canEdit: boolean;
}) {
  const cell = row.cells[criterion.id];
  return (
    <div className="flex flex-col gap-1 text-sm">
      <p>
        Suggested: <strong className="tabular-nums">{cell?.suggestion?.points ?? "—"}</strong> — {cell?.suggestion?.reason}
      </p>
      {cell?.source === "override" ? (
        <p className="text-amber-700">
          Overridden to {counted(cell.points ?? 0, "point", "points")}: “{cell.overrideReason}”
        </p>
      ) : null}
      {canEdit && cell?.source !== "released" ? <OverrideForm criterion={criterion} cell={cell} save={save} /> : null}
    </div>
  );
}

/**
 * Points of one's own for an automatic criterion, with the reason kept with the mark, or back to the
 * suggestion. A keystroke that takes the points out of the criterion's range is not taken, and a
 * missing reason is named before anything is sent. `onSaved` hears each change sent.
 */
export function OverrideForm({
  criterion,
  cell,
  save,
  onSaved,
}: {
  criterion: RubricCriterion;
  cell: MarkCell | undefined;
  save: (change: MarkChange) => void;
  onSaved?: () => void;
}) {
  const [points, setPoints] = useState(cell?.source === "override" ? String(cell.points ?? "") : "");
  const [reason, setReason] = useState(cell?.overrideReason ?? "");
  const [problem, setProblem] = useState("");
  const problemId = useId();
  const send = (change: MarkChange) => {
    save(change);
    onSaved?.();
  };
  return (
    <form
      className="flex flex-wrap items-end gap-2"
      onSubmit={(event) => {
        event.preventDefault();
        const typed = typedPoints(points);
        const refused =
          typed === null || !Number.isFinite(typed)
            ? "Type a number of points."
            : !reason.trim()
              ? "Say why the automatic points do not fit."
              : "";
        setProblem(refused);
        if (!refused) send({ kind: "score", criterionId: criterion.id, points: typed, level: null, overrideReason: reason });
      }}
    >
      <label className="flex flex-col">
        <span className="text-xs">Points</span>
        <input
          className={`w-20 rounded border px-1 py-1 ${problem ? "border-outlier" : "border-ink-900/20"}`}
          inputMode="decimal"
          aria-invalid={problem ? true : undefined}
          aria-describedby={problem ? problemId : undefined}
          value={points}
          onChange={(event) => {
            const refused = outOfBounds(event.target.value, { min: 0, max: criterion.maxPoints });
            setProblem(refused ?? "");
            if (!refused) setPoints(event.target.value);
          }}
        />
      </label>
      <label className="flex min-w-32 flex-1 flex-col">
        <span className="text-xs">Why (kept with the mark)</span>
        <input
          className="rounded border border-ink-900/20 px-1 py-1"
          value={reason}
          onChange={(event) => setReason(event.target.value)}
          maxLength={500}
        />
      </label>
      <button type="submit" className="min-h-8 rounded bg-white px-3 py-1.5 ring-1 ring-ink-800">
        Override
      </button>
      {cell?.source === "override" ? (
        <button
          type="button"
          className="px-2 py-1.5 underline"
          onClick={() => send({ kind: "score", criterionId: criterion.id, points: null, level: null })}
        >
          Use the suggestion
        </button>
      ) : null}
      <span id={problemId} role="status" className="basis-full text-xs text-ink-800">
        {problem}
      </span>
    </form>
  );
}
