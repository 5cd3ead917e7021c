/** The marking desk's small inputs, shared by its cards and the per-student view. */
import { useEffect, useId, useState } from "react";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import { counted } from "~/lib/plural";
import type { SaveState } from "./mark-saves";

/** Points as typed, with a decimal comma or point: null when blank, NaN when not a number. */
export const typedPoints = (text: string): number | null => (parseTypedNumber(text) as number | undefined) ?? null;

export type PointsBounds = { min: number; max: number };

/** Why `typed` is refused as points within `bounds`, or null when it is within them (or not a whole number yet). */
export function outOfBounds(typed: string, bounds: PointsBounds): string | null {
  const points = typedPoints(typed);
  if (points === null || !Number.isFinite(points) || (points >= bounds.min && points <= bounds.max)) return null;
  return `${typed.trim()} is not taken: give between ${bounds.min} and ${counted(bounds.max, "point", "points")}.`;
}

/**
 * A points field that saves on Enter, on leaving it, or when an arrow moves on; Escape puts back the
 * saved value. With `bounds`, a keystroke that would take the number out of them is not taken and the
 * field says why beside itself; `refuse` names what else is wrong with a number before anything is
 * sent, the field then keeps the entry, marked invalid, and `onRefused` hears why.
 */
export function PointsInput({
  value,
  onCommit,
  label,
  bounds,
  className = "",
  refuse,
  onRefused,
  ...rest
}: {
  value: number | null;
  onCommit: (points: number | null) => void;
  label: string;
  bounds?: PointsBounds;
  className?: string;
  refuse?: (points: number) => string | null;
  onRefused?: (message: string | null) => void;
} & {
  "data-row"?: number;
  "data-col"?: number;
  tabIndex?: number;
}) {
  const [text, setText] = useState(value === null ? "" : String(value));
  const [invalid, setInvalid] = useState(false);
  const [refusal, setRefusal] = useState("");
  const refusalId = useId();
  useEffect(() => setText(value === null ? "" : String(value)), [value]);
  const change = (typed: string) => {
    const refused = bounds ? outOfBounds(typed, bounds) : null;
    setRefusal(refused ?? "");
    if (!refused) setText(typed);
  };
  const commit = () => {
    const points = typedPoints(text);
    const problem =
      points === null ? null : !Number.isFinite(points) ? "Type a number of points, such as 2 or 2,5." : (refuse?.(points) ?? null);
    setInvalid(problem !== null);
    onRefused?.(problem);
    if (problem) return;
    if (points !== value) onCommit(points);
  };
  const input = (
    <input
      type="text"
      inputMode="decimal"
      aria-label={label}
      aria-invalid={invalid || undefined}
      aria-describedby={bounds && refusal ? refusalId : undefined}
      className={`w-16 rounded border px-1 py-1 text-right text-sm tabular-nums ${invalid ? "border-outlier" : "border-ink-900/20"} ${className}`}
      value={text}
      onChange={(event) => change(event.target.value)}
      onBlur={commit}
      onKeyDown={(event) => {
        if (event.key === "Escape") {
          setText(value === null ? "" : String(value));
          setInvalid(false);
          setRefusal("");
          onRefused?.(null);
        } else if (event.key === "Enter") commit();
      }}
      {...rest}
    />
  );
  if (!bounds) return input;
  return (
    <span className="inline-flex flex-col items-start gap-1">
      {input}
      <span id={refusalId} role="status" className="text-xs text-ink-800">
        {refusal}
      </span>
    </span>
  );
}

export function SaveStatus({ state, retry }: { state: SaveState; retry: () => void }) {
  if (state.status === "idle") return null;
  if (state.status === "saving") return <span className="text-xs text-ink-600">Saving…</span>;
  if (state.status === "saved") return <span className="text-xs text-consistent">Saved</span>;
  if (state.status === "conflict") return <span className="text-xs text-amber-700">{state.message}</span>;
  // The message wraps in its card; Retry only where sending again can help (a lost connection).
  return (
    <span className="flex flex-col items-start text-xs break-words text-outlier">
      Not saved: {state.message}
      {state.retryable ? (
        <button type="button" className="underline" onClick={retry}>
          Retry
        </button>
      ) : null}
    </span>
  );
}
