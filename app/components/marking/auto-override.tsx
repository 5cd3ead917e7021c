/**
 * An automatic criterion of one student's mark: the suggestion with its reason, and the override,
 * which needs a reason kept with the mark. The desk's side panel and the per-student view show it.
 */
import { useId, useState } from "react";
import type { MarkChange } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
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
  const [points, setPoints] = useState(cell?.source === "override" ? String(cell.points ?? "") : "");
  const [reason, setReason] = useState(cell?.overrideReason ?? "");
  const [invalid, setInvalid] = useState(false);
  // An override is within the criterion's points, like any score: a keystroke leaving them is not taken.
  const [refusal, setRefusal] = useState("");
  const refusalId = useId();
  return (
    <div className="flex flex-col gap-1 text-sm">
      <p>
        Suggested: <strong className="tabular-nums">{cell?.suggestion?.points ?? "—"}</strong> — {cell?.suggestion?.reason}
      </p>
      {cell?.source === "override" ? (
        <p className="text-amber-700">
          Overridden to {cell.points} points: “{cell.overrideReason}”
        </p>
      ) : null}
      {canEdit && cell?.source !== "released" ? (
        <form
          className="flex flex-wrap items-end gap-2"
          onSubmit={(event) => {
            event.preventDefault();
            const typed = typedPoints(points);
            setInvalid(typed === null || !Number.isFinite(typed));
            if (typed !== null && Number.isFinite(typed))
              save({ kind: "score", criterionId: criterion.id, points: typed, level: null, overrideReason: reason });
          }}
        >
          <label className="flex flex-col">
            <span className="text-xs">Points</span>
            <input
              className={`w-20 rounded border px-1 py-1 ${invalid ? "border-outlier" : "border-ink-900/20"}`}
              inputMode="decimal"
              aria-invalid={invalid || undefined}
              aria-describedby={refusal ? refusalId : undefined}
              value={points}
              onChange={(event) => {
                const refused = outOfBounds(event.target.value, { min: 0, max: criterion.maxPoints });
                setRefusal(refused ?? "");
                if (!refused) setPoints(event.target.value);
              }}
            />
          </label>
          <label className="flex min-w-40 flex-1 flex-col">
            <span className="text-xs">Why (kept with the mark)</span>
            <input
              className="rounded border border-ink-900/20 px-1 py-1"
              value={reason}
              onChange={(event) => setReason(event.target.value)}
              maxLength={500}
            />
          </label>
          <button type="submit" className="rounded bg-white px-3 py-1.5 ring-1 ring-ink-800">
            Override
          </button>
          {cell?.source === "override" ? (
            <button
              type="button"
              className="px-2 py-1.5 underline"
              onClick={() => save({ kind: "score", criterionId: criterion.id, points: null, level: null })}
            >
              Use the suggestion
            </button>
          ) : null}
          <span id={refusalId} role="status" className="basis-full text-xs text-ink-800">
            {refusal}
          </span>
        </form>
      ) : null}
    </div>
  );
}
