import type { ClassComparisonLabel } from "~/lib/reduction";
import { LabelMarker, labelWords } from "./chart-parts";

/** A class-comparison label in words, with the plots' shape beside it, so that colour is never the only cue. */
export function ClassLabelTag({ label }: { label: ClassComparisonLabel }) {
  return (
    <span className="inline-flex items-center gap-1 font-medium whitespace-nowrap" style={{ color: `var(--color-${label})` }}>
      <svg viewBox="0 0 12 12" className="h-3 w-3" aria-hidden="true">
        <LabelMarker label={label} x={6} y={6} size={4} />
      </svg>
      {labelWords[label]}
    </span>
  );
}
