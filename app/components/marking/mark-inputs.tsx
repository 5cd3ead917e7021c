/** The marking desk's small inputs, shared by the grid and the side panel. */
import { useEffect, useState } from "react";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import type { SaveState } from "./mark-saves";

/** Points as typed, with a decimal comma or point: null when blank, NaN when not a number. */
export const typedPoints = (text: string): number | null => (parseTypedNumber(text) as number | undefined) ?? null;

/** A points field that saves on Enter, on leaving it, or when an arrow moves on; Escape puts back the saved value. */
export function PointsInput({
  value,
  onCommit,
  label,
  className = "",
  ...rest
}: { value: number | null; onCommit: (points: number | null) => void; label: string; className?: string } & {
  "data-row"?: number;
  "data-col"?: number;
  tabIndex?: number;
}) {
  const [text, setText] = useState(value === null ? "" : String(value));
  const [invalid, setInvalid] = useState(false);
  useEffect(() => setText(value === null ? "" : String(value)), [value]);
  const commit = () => {
    const points = typedPoints(text);
    if (points !== null && !Number.isFinite(points)) return setInvalid(true);
    setInvalid(false);
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
        }
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
  return (
    <span className="flex flex-col items-start text-xs text-outlier">
      Not saved: {state.message}
      <button type="button" className="underline" onClick={retry}>
        Retry
      </button>
    </span>
  );
}
