/**
 * The pieces the comparison plots share: a figure with its text alternative and table view, axes drawn
 * from d3-scale ticks, and a marker that shows a hand-in's label by shape and colour (so the plots
 * still read in grey print and for people who do not tell the colours apart).
 */
import type { ReactNode } from "react";
import type { ClassComparisonLabel } from "~/lib/reduction";

export const chartSize = { width: 640, height: 380, margin: { top: 16, right: 20, bottom: 44, left: 68 } };
export const plotLeft = chartSize.margin.left;
export const plotRight = chartSize.width - chartSize.margin.right;
export const plotTop = chartSize.margin.top;
export const plotBottom = chartSize.height - chartSize.margin.bottom;

export const labelWords: Record<ClassComparisonLabel, string> = { consistent: "consistent", suspect: "suspect", outlier: "outlier" };

/** Circle, triangle, square: distinct outlines, each in its palette colour. */
export function LabelMarker({ label, x, y, size = 5 }: { label: ClassComparisonLabel; x: number; y: number; size?: number }) {
  const colour = `var(--color-${label})`;
  const common = { fill: colour, fillOpacity: 0.75, stroke: colour, strokeWidth: 1.5, "data-label": label } as const;
  if (label === "consistent") return <circle cx={x} cy={y} r={size} {...common} />;
  if (label === "suspect") {
    const h = size * 1.2;
    return <path d={`M${x},${y - h}L${x + h},${y + h * 0.8}L${x - h},${y + h * 0.8}Z`} {...common} />;
  }
  return <rect x={x - size} y={y - size} width={size * 2} height={size * 2} {...common} />;
}

/** The legend of the three labels, top right inside the plot. */
export function LabelLegend({ x = plotRight - 110, y = plotTop + 8 }: { x?: number; y?: number }) {
  return (
    <g fontSize="11" fill="currentColor">
      {(["consistent", "suspect", "outlier"] as const).map((label, index) => (
        <g key={label}>
          <LabelMarker label={label} x={x + 6} y={y + index * 16 + 4} size={4} />
          <text x={x + 16} y={y + index * 16 + 4} dy="0.32em">
            {labelWords[label]}
          </text>
        </g>
      ))}
    </g>
  );
}

type Scale = ((value: number) => number) & {
  ticks(count?: number): number[];
  tickFormat(count?: number, specifier?: string): (value: number) => string;
};

/** Grid lines and labelled ticks for both axes, with the axis titles. Log scales label only 1, 2, 5 × 10ⁿ. */
export function Axes({
  x,
  y,
  xTitle,
  yTitle,
  xTicks = 8,
  yTicks = 6,
}: {
  x: Scale;
  y: Scale;
  xTitle: string;
  yTitle: string;
  xTicks?: number;
  yTicks?: number;
}) {
  const xLabel = x.tickFormat(xTicks, "~g");
  const yLabel = y.tickFormat(yTicks, "~g");
  return (
    <g className="text-ink-600" fontSize="11" fill="currentColor">
      {y.ticks(yTicks).map((tick) => (
        <g key={`y${tick}`}>
          <line x1={plotLeft} x2={plotRight} y1={y(tick)} y2={y(tick)} stroke="currentColor" strokeOpacity="0.12" />
          {yLabel(tick) ? (
            <text x={plotLeft - 6} y={y(tick)} dy="0.32em" textAnchor="end">
              {yLabel(tick)}
            </text>
          ) : null}
        </g>
      ))}
      {x.ticks(xTicks).map((tick) => (
        <g key={`x${tick}`}>
          <line x1={x(tick)} x2={x(tick)} y1={plotTop} y2={plotBottom} stroke="currentColor" strokeOpacity="0.12" />
          {xLabel(tick) ? (
            <text x={x(tick)} y={plotBottom + 16} textAnchor="middle">
              {xLabel(tick)}
            </text>
          ) : null}
        </g>
      ))}
      <rect
        x={plotLeft}
        y={plotTop}
        width={plotRight - plotLeft}
        height={plotBottom - plotTop}
        fill="none"
        stroke="currentColor"
        strokeOpacity="0.4"
      />
      <text x={(plotLeft + plotRight) / 2} y={chartSize.height - 6} textAnchor="middle">
        {xTitle}
      </text>
      <text transform={`translate(16 ${(plotTop + plotBottom) / 2}) rotate(-90)`} textAnchor="middle">
        {yTitle}
      </text>
    </g>
  );
}

/** A polyline through points, skipping those off the plot's scale (NaN or infinite). */
export function linePath(points: [number, number][]): string {
  return points
    .filter(([px, py]) => Number.isFinite(px) && Number.isFinite(py))
    .map(([px, py], index) => `${index === 0 ? "M" : "L"}${px.toFixed(1)},${py.toFixed(1)}`)
    .join("");
}

/** The small table of numbers behind every plot. */
export const chartTableClass = "text-sm [&_td]:pr-4 [&_th]:pr-4 [&_th]:text-left [&_th]:font-medium";

/**
 * A plot as a figure: the SVG names itself with <title> and <desc>, the caption says how to read it,
 * and the same numbers sit in a table behind a <details> for screen readers, copying and print.
 */
export function ChartFigure({
  id,
  title,
  description,
  caption,
  table,
  linked = false,
  children,
}: {
  id: string;
  title: string;
  description: string;
  caption: ReactNode;
  table: ReactNode;
  /** Its points are links: an image may not hold controls, so the plot is a labelled group instead. */
  linked?: boolean;
  children: ReactNode;
}) {
  return (
    <figure className="flex flex-col gap-2" aria-labelledby={`${id}-caption`}>
      <svg
        viewBox={`0 0 ${chartSize.width} ${chartSize.height}`}
        className="h-auto w-full max-w-3xl text-ink-900"
        role={linked ? "group" : "img"}
        aria-labelledby={`${id}-title ${id}-desc`}
      >
        <title id={`${id}-title`}>{title}</title>
        <desc id={`${id}-desc`}>{description}</desc>
        {children}
      </svg>
      <figcaption id={`${id}-caption`} className="max-w-3xl text-sm text-ink-700">
        {caption}
      </figcaption>
      <details className="max-w-3xl text-sm">
        <summary className="no-print cursor-pointer text-ink-700 underline underline-offset-2">The numbers behind this plot</summary>
        <div className="mt-2 overflow-x-auto">{table}</div>
      </details>
    </figure>
  );
}
