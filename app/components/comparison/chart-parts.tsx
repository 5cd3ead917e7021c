/**
 * The pieces the comparison plots share: a figure with its text alternative and table view, axes drawn
 * from d3-scale ticks, and a marker that shows a hand-in's label by shape and colour (so the plots
 * still read in grey print and for people who do not tell the colours apart).
 */
import type { ReactNode, RefObject } from "react";
import { useMeasuredWidth } from "~/components/ui/use-measured-width";
import type { ClassComparisonLabel } from "~/lib/reduction";

/** The plot area inside an SVG drawn at its rendered width (one unit is one CSS pixel). */
export type ChartLayout = {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
  /** A phone-wide plot: fewer ticks, a shorter plot. */
  narrow: boolean;
};

/** The width drawn on the server and before the page's script measures the figure (and without script). */
const defaultWidth = 640;
/** Every label in the plots, in CSS pixels: the SVG is not scaled, so this is what the reader sees. */
export const chartFontSize = 12;

export function chartLayout(width: number = defaultWidth): ChartLayout {
  const narrow = width < 520;
  const height = narrow ? 320 : 380;
  const margin = narrow ? { top: 16, right: 12, bottom: 44, left: 58 } : { top: 16, right: 20, bottom: 44, left: 68 };
  return { width, height, left: margin.left, right: width - margin.right, top: margin.top, bottom: height - margin.bottom, narrow };
}

/** A plot's layout at its figure's current width (at most max-w-3xl), and the ref that goes on the figure. */
export function useChartLayout() {
  const { ref, width } = useMeasuredWidth<HTMLElement>(defaultWidth);
  return { ref, layout: chartLayout(width) };
}

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

/** The legend of the three labels, top right inside the plot unless placed. */
export function LabelLegend({ layout, x = layout.right - 110, y = layout.top + 8 }: { layout: ChartLayout; x?: number; y?: number }) {
  return (
    <g fontSize={chartFontSize} fill="currentColor">
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

const tickNumber = new Intl.NumberFormat("en", { maximumSignificantDigits: 6 });

/**
 * A tick's label in plain decimals (10, not "1e+1"). The scale's own format still decides which ticks
 * get a label: on a log axis it leaves out the ones that would crowd (it returns "" for them).
 */
function tickLabeller(scale: Scale, count: number): (value: number) => string {
  const shown = scale.tickFormat(count);
  return (value) => (shown(value) === "" ? "" : tickNumber.format(value));
}

/** Grid lines and labelled ticks for both axes, with the axis titles. Log scales label only 1, 2, 5 × 10ⁿ. */
export function Axes({
  layout,
  x,
  y,
  xTitle,
  yTitle,
  xTicks = layout.narrow ? 4 : 8,
  yTicks = layout.narrow ? 5 : 6,
}: {
  layout: ChartLayout;
  x: Scale;
  y: Scale;
  xTitle: string;
  yTitle: string;
  xTicks?: number;
  yTicks?: number;
}) {
  const { left: plotLeft, right: plotRight, top: plotTop, bottom: plotBottom } = layout;
  const xLabel = tickLabeller(x, xTicks);
  const yLabel = tickLabeller(y, yTicks);
  return (
    <g className="text-ink-600" fontSize={chartFontSize} fill="currentColor">
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
      <text x={(plotLeft + plotRight) / 2} y={layout.height - 6} textAnchor="middle">
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
  layout,
  figureRef,
  title,
  description,
  caption,
  table,
  linked = false,
  children,
}: {
  id: string;
  layout: ChartLayout;
  figureRef: RefObject<HTMLElement | null>;
  title: string;
  description: string;
  caption: ReactNode;
  table: ReactNode;
  /** Its points are links: an image may not hold controls, so the plot is a labelled group instead. */
  linked?: boolean;
  children: ReactNode;
}) {
  return (
    <figure ref={figureRef} className="flex w-full max-w-3xl flex-col gap-2" aria-labelledby={`${id}-caption`}>
      <svg
        viewBox={`0 0 ${layout.width} ${layout.height}`}
        className="h-auto w-full text-ink-900"
        role={linked ? "group" : "img"}
        aria-labelledby={`${id}-title ${id}-desc`}
      >
        <title id={`${id}-title`}>{title}</title>
        <desc id={`${id}-desc`}>{description}</desc>
        {children}
      </svg>
      <figcaption id={`${id}-caption`} className="text-sm text-ink-700">
        {caption}
      </figcaption>
      <details className="text-sm">
        <summary className="no-print cursor-pointer text-ink-700 underline underline-offset-2">The numbers behind this plot</summary>
        <div className="mt-2 overflow-x-auto">{table}</div>
      </details>
    </figure>
  );
}
