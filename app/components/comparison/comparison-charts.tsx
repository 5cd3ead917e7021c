/**
 * The class-comparison plots, drawn as SVG on the server so they show without JavaScript and print:
 * the drag curve (log–log, with the reference correlations), measured against reference viscosity, and
 * the strip of normalised figures with the method's limits. Every point links to its hand-in.
 */
import { scaleLinear, scaleLog, scaleSequential } from "d3-scale";
import type { ClassComparisonLabel } from "~/lib/reduction/class-comparison";
import { referenceDragCoefficient, type DragModel } from "~/lib/reduction/drag";
import type { ComparisonLimits } from "~/lib/comparison/class-labelling";
import { formatNumber } from "~/lib/kits/part-display";
import {
  Axes,
  ChartFigure,
  chartTableClass,
  LabelLegend,
  LabelMarker,
  labelWords,
  linePath,
  useChartLayout,
  chartFontSize,
} from "./chart-parts";
import { counted } from "~/lib/plural";

export type ComparisonPoint = {
  id: string;
  href: string;
  studentName: string;
  label: ClassComparisonLabel;
  figure: number;
  reynolds: number | null;
  dragCoefficient: number | null;
  viscosityPaS: number | null;
  referenceViscosityPaS: number | null;
  temperatureC: number | null;
};

/** A phone-wide plot names the curves only; the formulas do not fit beside the key. */
const referenceCurves: { model: DragModel; name: string; formula: string; dash: string }[] = [
  { model: "stokes", name: "Stokes", formula: "24/Re", dash: "" },
  { model: "oseen", name: "Oseen", formula: "24/Re·(1 + 3Re/16)", dash: "6 4" },
  { model: "schiller-naumann", name: "Schiller–Naumann", formula: "24/Re·(1 + 0.15Re^0.687)", dash: "2 3" },
];

/** Log-spaced values from low to high, for drawing a curve on a log axis. */
function logSpace(low: number, high: number, count: number): number[] {
  const a = Math.log10(low);
  const b = Math.log10(high);
  return Array.from({ length: count }, (_, i) => 10 ** (a + ((b - a) * i) / (count - 1)));
}

const extent = (values: number[], fallback: [number, number]): [number, number] =>
  values.length ? [Math.min(...values), Math.max(...values)] : fallback;

function PointLink({ point, x, y, text }: { point: ComparisonPoint; x: number; y: number; text: string }) {
  return (
    // Out of the tab order: the table behind the plot holds the same links, one stop each, in order.
    <a href={point.href} data-point={point.id} tabIndex={-1}>
      {/* A finger-sized target around a marker only a few pixels wide. */}
      <circle cx={x} cy={y} r={12} fill="transparent" />
      <LabelMarker label={point.label} x={x} y={y} />
      <title>{`${point.studentName}: ${text} (${labelWords[point.label]})`}</title>
    </a>
  );
}

/** The numbers behind a plot: one row per point, the student linking to the hand-in, the label last. */
function PointTable({
  points,
  columns,
}: {
  points: ComparisonPoint[];
  columns: { header: string; value: (point: ComparisonPoint) => string }[];
}) {
  return (
    <table className={chartTableClass}>
      <thead>
        <tr>
          <th scope="col">Student</th>
          {columns.map((column) => (
            <th key={column.header} scope="col">
              {column.header}
            </th>
          ))}
          <th scope="col">Label</th>
        </tr>
      </thead>
      <tbody>
        {points.map((point) => (
          <tr key={point.id}>
            <td>
              <a href={point.href} className="underline">
                {point.studentName}
              </a>
            </td>
            {columns.map((column) => (
              <td key={column.header}>{column.value(point)}</td>
            ))}
            <td>{labelWords[point.label]}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

/** The drag coefficient against Reynolds number, both log, with the three reference curves. */
export function DragCurveChart({ points, title }: { points: ComparisonPoint[]; title: string }) {
  const { ref, layout } = useChartLayout();
  const { left: plotLeft, right: plotRight, top: plotTop, bottom: plotBottom } = layout;
  const plotted = points.filter((point) => (point.reynolds ?? 0) > 0 && (point.dragCoefficient ?? 0) > 0);
  const [reLow, reHigh] = extent(
    plotted.map((point) => point.reynolds!),
    [0.01, 10],
  );
  const x = scaleLog()
    .domain([reLow / 3, reHigh * 3])
    .range([plotLeft, plotRight])
    .nice();
  const [domainLow, domainHigh] = x.domain();
  const curveRe = logSpace(domainLow, domainHigh, 80);
  const curveValues = referenceCurves.flatMap((curve) => curveRe.map((re) => referenceDragCoefficient(re, curve.model)));
  const [cdLow, cdHigh] = extent([...plotted.map((point) => point.dragCoefficient!), ...curveValues], [1, 1000]);
  const y = scaleLog()
    .domain([cdLow / 1.5, cdHigh * 1.5])
    .range([plotBottom, plotTop])
    .nice();
  return (
    <ChartFigure
      linked
      layout={layout}
      figureRef={ref}
      id="drag-curve"
      title={title}
      description={`${counted(plotted.length, "hand-in", "hand-ins")} as points, drag coefficient against Reynolds number on logarithmic axes, with the Stokes, Oseen and Schiller–Naumann reference curves. Circles are consistent, triangles suspect, squares outliers.`}
      caption="Each point is a hand-in (circle consistent, triangle suspect, square outlier); the lines are the reference correlations. Select a point to open the hand-in."
      table={
        <PointTable
          points={plotted}
          columns={[
            { header: "Re", value: (point) => formatNumber(point.reynolds) },
            { header: "C_D", value: (point) => formatNumber(point.dragCoefficient) },
            { header: "C_D/C_D,ref", value: (point) => formatNumber(point.figure) },
          ]}
        />
      }
    >
      <Axes layout={layout} x={x} y={y} xTitle="Reynolds number Re (log)" yTitle="drag coefficient C_D (log)" />
      {referenceCurves.map((curve) => (
        <path
          key={curve.model}
          data-curve={curve.model}
          d={linePath(curveRe.map((re) => [x(re), y(referenceDragCoefficient(re, curve.model))]))}
          fill="none"
          stroke="var(--color-ink-700)"
          strokeWidth="1.5"
          strokeDasharray={curve.dash}
        />
      ))}
      <g fontSize={chartFontSize} fill="currentColor">
        {referenceCurves.map((curve, index) => (
          <g key={curve.model}>
            <line
              x1={plotLeft + 10}
              x2={plotLeft + 40}
              y1={plotBottom - 52 + index * 16}
              y2={plotBottom - 52 + index * 16}
              stroke="var(--color-ink-700)"
              strokeWidth="1.5"
              strokeDasharray={curve.dash}
            />
            <text x={plotLeft + 46} y={plotBottom - 52 + index * 16} dy="0.32em">
              {layout.narrow ? curve.name : `${curve.name} ${curve.formula}`}
            </text>
          </g>
        ))}
      </g>
      <LabelLegend layout={layout} />
      {plotted.map((point) => (
        <PointLink
          key={point.id}
          point={point}
          x={x(point.reynolds!)}
          y={y(point.dragCoefficient!)}
          text={`Re ${formatNumber(point.reynolds)}, C_D ${formatNumber(point.dragCoefficient)}`}
        />
      ))}
    </ChartFigure>
  );
}

/**
 * Viscometry: measured against reference viscosity (log–log) with the line y = x. The fluid's
 * temperature colours a ring round each point (a sequential scale, its key below the plot), while the
 * label keeps its shape and palette colour inside.
 */
export function ViscometryChart({ points, title }: { points: ComparisonPoint[]; title: string }) {
  const { ref, layout } = useChartLayout();
  const { left: plotLeft, right: plotRight, top: plotTop, bottom: plotBottom } = layout;
  const plotted = points.filter((point) => (point.viscosityPaS ?? 0) > 0 && (point.referenceViscosityPaS ?? 0) > 0);
  const values = plotted.flatMap((point) => [point.viscosityPaS!, point.referenceViscosityPaS!]);
  const [low, high] = extent(values, [0.1, 10]);
  const x = scaleLog()
    .domain([low / 1.3, high * 1.3])
    .range([plotLeft, plotRight])
    .nice();
  const y = scaleLog().domain(x.domain()).range([plotBottom, plotTop]).nice();
  const temperatures = plotted.map((point) => point.temperatureC).filter((value): value is number => value !== null);
  const [tLow, tHigh] = extent(temperatures, [15, 30]);
  const temperatureColour = scaleSequential((t: number) => `hsl(${220 - 200 * t} 70% 45%)`).domain([
    tLow,
    tHigh === tLow ? tLow + 1 : tHigh,
  ]);
  const [dLow, dHigh] = x.domain();
  return (
    <ChartFigure
      linked
      layout={layout}
      figureRef={ref}
      id="viscometry"
      title={title}
      description={`${counted(plotted.length, "hand-in", "hand-ins")}, measured viscosity against the fluid lot's reference viscosity at the drop temperature, logarithmic axes, with the line where they are equal. A coloured ring gives each drop's temperature from ${formatNumber(tLow, 3)} °C (blue) to ${formatNumber(tHigh, 3)} °C (red).`}
      caption={`Points on the diagonal measured what the lot's calibration predicts. Ring colour: fluid temperature, blue ${formatNumber(tLow, 3)} °C to red ${formatNumber(tHigh, 3)} °C. Select a point to open the hand-in.`}
      table={
        <PointTable
          points={plotted}
          columns={[
            { header: "Temperature (°C)", value: (point) => formatNumber(point.temperatureC, 3) },
            { header: "Measured μ (Pa·s)", value: (point) => formatNumber(point.viscosityPaS) },
            { header: "Reference μ (Pa·s)", value: (point) => formatNumber(point.referenceViscosityPaS) },
            { header: "Ratio", value: (point) => formatNumber(point.figure) },
          ]}
        />
      }
    >
      <Axes
        layout={layout}
        x={x}
        y={y}
        xTitle="reference viscosity at the drop temperature (Pa·s, log)"
        yTitle="measured viscosity (Pa·s, log)"
      />
      <path
        data-curve="identity"
        d={linePath([
          [x(dLow), y(dLow)],
          [x(dHigh), y(dHigh)],
        ])}
        stroke="var(--color-ink-700)"
        strokeWidth="1.5"
        fill="none"
      />
      <LabelLegend layout={layout} x={plotLeft + 10} />
      {plotted.map((point) => (
        <g key={point.id}>
          {point.temperatureC !== null ? (
            <circle
              cx={x(point.referenceViscosityPaS!)}
              cy={y(point.viscosityPaS!)}
              r="9"
              fill="none"
              stroke={temperatureColour(point.temperatureC)}
              strokeWidth="2"
            />
          ) : null}
          <PointLink
            point={point}
            x={x(point.referenceViscosityPaS!)}
            y={y(point.viscosityPaS!)}
            text={`${formatNumber(point.viscosityPaS)} Pa·s measured, ${formatNumber(point.referenceViscosityPaS)} Pa·s reference at ${formatNumber(point.temperatureC, 3)} °C`}
          />
        </g>
      ))}
    </ChartFigure>
  );
}

/** A small spread for each point of the strip so equal figures do not hide each other; fixed by index, not random. */
const jitter = (index: number) => ((index * 0.618034) % 1) - 0.5;

/** The normalised figures on a log axis, one row, with the Tukey fences or the Grubbs limits drawn. */
export function FigureStripChart({ points, limits, title }: { points: ComparisonPoint[]; limits: ComparisonLimits; title: string }) {
  const { ref, layout } = useChartLayout();
  const { left: plotLeft, right: plotRight, top: plotTop, bottom: plotBottom } = layout;
  const limitValues = limits ? [...limits.inner, ...(limits.outer ?? [])] : [];
  const [low, high] = extent([...points.map((point) => point.figure), ...limitValues, 1], [0.5, 2]);
  const x = scaleLog()
    .domain([low / 1.1, high * 1.1])
    .range([plotLeft, plotRight]);
  const y = scaleLinear().domain([-1, 1]).range([plotBottom, plotTop]);
  const noTicks = Object.assign((value: number) => y(value), { ticks: () => [] as number[], tickFormat: () => () => "" });
  const limitLines = limits
    ? [
        ...limits.inner.map((value) => ({ value, name: limits.kind === "tukey" ? "inner fence" : "Grubbs limit", dash: "6 4" })),
        ...(limits.outer ?? []).map((value) => ({ value, name: "outer fence", dash: "" })),
      ]
    : [];
  return (
    <ChartFigure
      linked
      layout={layout}
      figureRef={ref}
      id="figure-strip"
      title={title}
      description={`${counted(points.length, "normalised figure", "normalised figures")} on a logarithmic axis${limits ? `, with ${limits.note}` : ""}. Circles are consistent, triangles suspect, squares outliers.`}
      caption={
        <>
          Each hand-in's normalised figure (1 means it agrees with the reference).{" "}
          {limits
            ? `${limits.note}: ${limitLines.map((line) => formatNumber(line.value, 3)).join(", ")}.`
            : "The class is too small to draw limits."}{" "}
          Points are spread vertically only so they do not cover each other.
        </>
      }
      table={<PointTable points={points} columns={[{ header: "Figure", value: (point) => formatNumber(point.figure) }]} />}
    >
      <Axes layout={layout} x={x} y={noTicks} xTitle="normalised figure (log)" yTitle="" />
      {limitLines.map((line) => (
        <g key={`${line.name}${line.value}`} data-limit={line.name}>
          <line
            x1={x(line.value)}
            x2={x(line.value)}
            y1={plotTop}
            y2={plotBottom}
            stroke="var(--color-ink-700)"
            strokeWidth="1.5"
            strokeDasharray={line.dash}
          />
          {/* Along the bottom, clear of the legend at the top; on the inner side of the line, so it stays on the plot. */}
          <text
            x={x(line.value)}
            y={plotBottom - (line.dash ? 8 : 24)}
            dx={x(line.value) > (plotLeft + plotRight) / 2 ? -4 : 4}
            textAnchor={x(line.value) > (plotLeft + plotRight) / 2 ? "end" : "start"}
            fontSize={chartFontSize}
            fill="currentColor"
          >
            {line.name}
          </text>
        </g>
      ))}
      <LabelLegend layout={layout} />
      {points.map((point, index) => (
        <PointLink
          key={point.id}
          point={point}
          x={x(point.figure)}
          y={y(jitter(index) * 1.4)}
          text={`figure ${formatNumber(point.figure)}`}
        />
      ))}
    </ChartFigure>
  );
}
