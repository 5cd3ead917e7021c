/** The marking desk's small inputs, shared by its cards and the per-student marks. */
import { useEffect, useState } from "react";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import type { SaveState } from "./mark-saves";

/** Points as typed, with a decimal comma or point: null when blank, NaN when not a number. */
export const typedPoints = (text: string): number | null => (parseTypedNumber(text) as number | undefined) ?? null;

/**
 * A points field that saves on Enter, on leaving it, or when an arrow moves on; Escape puts back the
 * saved value. `refuse` names what is wrong with a number before anything is sent (out of the
 * criterion's range, say); the field then keeps the entry, marked invalid, and `onRefused` hears why.
 */
export function PointsInput({
  value,
  onCommit,
  label,
  className = "",
  refuse,
  onRefused,
  ...rest
}: {
  value: number | null;
  onCommit: (points: number | null) => void;
  label: string;
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
  useEffect(() => setText(value === null ? "" : String(value)), [value]);
  const commit = () => {
    const points = typedPoints(text);
    const problem =
      points === null ? null : !Number.isFinite(points) ? "Type a number of points, such as 2 or 2,5." : (refuse?.(points) ?? null);
    setInvalid(problem !== null);
    onRefused?.(problem);
    if (problem) return;
    if (points !== value) onCommit(points);
  };
  return (
    <input
      type="text"
      inputMode="decimal"
      aria-label={label}
      aria-invalid={invalid || undefined}
      className={`w-16 rounded border px-1 py-1 text-right text-sm tabular-nums ${invalid ? "border-outlier" : "border-ink-900/20"} ${className}`}
      value={text}
      onChange={(event) => setText(event.target.value)}
      onBlur={commit}
      onKeyDown={(event) => {
        if (event.key === "Escape") {
          setText(value === null ? "" : String(value));
          setInvalid(false);
          onRefused?.(null);
        } else if (event.key === "Enter") commit();
      }}
      {...rest}
    />
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
