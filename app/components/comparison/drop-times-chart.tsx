/**
 * One drop log's timed drops in the order they were timed, with the mean and the stray drops (flagged
 * by the generalized ESD test in the reduction) marked by shape and colour. For the hand-in pages and the dashboard.
 */
import { scaleLinear } from "d3-scale";
import { formatNumber } from "~/lib/kits/part-display";
import { Axes, ChartFigure, chartTableClass, LabelMarker, useChartLayout } from "./chart-parts";
import { counted } from "~/lib/plural";

export function DropTimesChart({
  drops,
  strayDrops,
  title,
  id = "drop-times",
}: {
  drops: number[];
  strayDrops: number[];
  title: string;
  id?: string;
}) {
  const { ref, layout } = useChartLayout();
  const { left: plotLeft, right: plotRight, top: plotTop, bottom: plotBottom } = layout;
  const stray = new Set(strayDrops);
  const mean = drops.reduce((sum, time) => sum + time, 0) / Math.max(drops.length, 1);
  const x = scaleLinear()
    .domain([0.5, Math.max(drops.length, 1) + 0.5])
    .range([plotLeft, plotRight]);
  const low = Math.min(...drops, mean);
  const high = Math.max(...drops, mean);
  const pad = (high - low || Math.abs(mean) * 0.1 || 1) * 0.15;
  const y = scaleLinear()
    .domain([low - pad, high + pad])
    .nice()
    .range([plotBottom, plotTop]);
  return (
    <ChartFigure
      id={id}
      layout={layout}
      figureRef={ref}
      title={title}
      description={`${counted(drops.length, "drop time", "drop times")} in seconds in the order timed, with their mean ${formatNumber(mean)} s; ${counted(stray.size, "stray drop", "stray drops")} marked as squares.`}
      caption={`Circles: drops; squares: stray drops flagged by the generalized ESD test (kept in the log, reported separately). Line: the mean of all drops, ${formatNumber(mean)} s.`}
      table={
        <table className={chartTableClass}>
          <thead>
            <tr>
              <th scope="col">Drop</th>
              <th scope="col">Time (s)</th>
              <th scope="col">Stray</th>
            </tr>
          </thead>
          <tbody>
            {drops.map((time, index) => (
              <tr key={index}>
                <td>{index + 1}</td>
                <td>{formatNumber(time)}</td>
                <td>{stray.has(index) ? "yes" : ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      }
    >
      <Axes
        layout={layout}
        x={x}
        y={y}
        xTitle="drop, in the order timed"
        yTitle="time (s)"
        xTicks={Math.min(drops.length, layout.narrow ? 6 : 12)}
      />
      <line data-curve="mean" x1={plotLeft} x2={plotRight} y1={y(mean)} y2={y(mean)} stroke="var(--color-ink-700)" strokeDasharray="6 4" />
      {drops.map((time, index) => (
        <g key={index} data-drop={index}>
          <LabelMarker label={stray.has(index) ? "outlier" : "consistent"} x={x(index + 1)} y={y(time)} />
          <title>{`Drop ${index + 1}: ${formatNumber(time)} s${stray.has(index) ? " (stray)" : ""}`}</title>
        </g>
      ))}
    </ChartFigure>
  );
}
