/**
 * A fluid lot's calibration drawn as plain SVG on the server (no script needed): the points and the
 * fitted Andrade curve with viscosity on a log axis, where the Andrade form is nearly straight, and a
 * strip of the residuals in per cent below. The page gives the same numbers as a table beside it.
 */
import { scaleLinear, scaleLog } from "d3-scale";
import { viscosityAt } from "~/lib/reduction/viscosity-model";
import type { FluidLotCalibration } from "~/lib/kits/fluid-lot-fit";
import { formatNumber } from "~/lib/kits/part-display";
import { useMeasuredWidth } from "~/components/ui/use-measured-width";
import { chartFontSize } from "~/components/comparison/chart-parts";
import { counted } from "~/lib/plural";

const plotHeight = 240;
const stripHeight = 90;
const margin = { top: 12, right: 16, bottom: 36, left: 64 };
const gap = 28;
const height = margin.top + plotHeight + gap + stripHeight + margin.bottom;
const tickNumber = new Intl.NumberFormat("en", { maximumSignificantDigits: 6 });

export function ViscosityChart({ calibration, title }: { calibration: FluidLotCalibration; title: string }) {
  // Drawn at its rendered width so the labels keep their size on a phone (see useMeasuredWidth).
  const { ref, width } = useMeasuredWidth<HTMLDivElement>(560);
  const narrow = width < 420;
  const { fit, points } = calibration;
  const temperatures = points.map((point) => point.temperatureC);
  // The axis always covers the quoted room temperatures (15–30 °C) so every lot's chart reads alike.
  const x = scaleLinear()
    .domain([Math.min(15, ...temperatures) - 2, Math.max(30, ...temperatures) + 2])
    .nice()
    .range([margin.left, width - margin.right]);
  const [low, high] = x.domain();
  const curve = Array.from({ length: 61 }, (_, i) => low + ((high - low) * i) / 60).map((temperatureC) => ({
    temperatureC,
    viscosityPaS: viscosityAt(fit, temperatureC),
  }));
  const viscosities = [...points.map((point) => point.viscosityPaS), ...curve.map((point) => point.viscosityPaS)];
  const y = scaleLog()
    .domain([Math.min(...viscosities) * 0.9, Math.max(...viscosities) * 1.1])
    .range([margin.top + plotHeight, margin.top]);
  // Plain decimals, not "1e+1"; the scale's format still leaves out the ticks that would crowd.
  const shownTick = y.tickFormat(6);
  const yLabel = (tick: number) => (shownTick(tick) === "" ? "" : tickNumber.format(tick));
  const largestResidual = Math.max(1, ...points.map((point) => Math.abs(point.residualPercent)));
  const stripTop = margin.top + plotHeight + gap;
  const residual = scaleLinear()
    .domain([-largestResidual * 1.2, largestResidual * 1.2])
    .nice(4)
    .range([stripTop + stripHeight, stripTop]);
  const path = curve
    .map((point, i) => `${i === 0 ? "M" : "L"}${x(point.temperatureC).toFixed(1)},${y(point.viscosityPaS).toFixed(1)}`)
    .join("");

  return (
    <div ref={ref} className="w-full max-w-2xl">
      <svg
        viewBox={`0 0 ${width} ${height}`}
        className="h-auto w-full"
        role="img"
        aria-labelledby="viscosity-chart-title viscosity-chart-desc"
      >
        <title id="viscosity-chart-title">{title}</title>
        <desc id="viscosity-chart-desc">
          {counted(points.length, "calibration point", "calibration points")} and the fitted curve, viscosity in Pa·s on a logarithmic axis
          against temperature in °C; below, each point's residual in per cent. The table that follows lists the same values.
        </desc>
        <g className="text-ink-600" fontSize={chartFontSize} fill="currentColor">
          {y.ticks().map((tick) =>
            yLabel(tick) ? (
              <g key={`y${tick}`}>
                <line x1={margin.left} x2={width - margin.right} y1={y(tick)} y2={y(tick)} stroke="currentColor" strokeOpacity="0.15" />
                <text x={margin.left - 6} y={y(tick)} dy="0.32em" textAnchor="end">
                  {yLabel(tick)}
                </text>
              </g>
            ) : null,
          )}
          <text transform={`translate(14 ${margin.top + plotHeight / 2}) rotate(-90)`} textAnchor="middle">
            viscosity (Pa·s, log)
          </text>
          {residual.ticks(4).map((tick) => (
            <g key={`r${tick}`}>
              <line
                x1={margin.left}
                x2={width - margin.right}
                y1={residual(tick)}
                y2={residual(tick)}
                stroke="currentColor"
                strokeOpacity={tick === 0 ? 0.5 : 0.15}
              />
              <text x={margin.left - 6} y={residual(tick)} dy="0.32em" textAnchor="end">
                {tick > 0 ? `+${tick}` : tick} %
              </text>
            </g>
          ))}
          <text transform={`translate(14 ${stripTop + stripHeight / 2}) rotate(-90)`} textAnchor="middle">
            residual
          </text>
          {x.ticks(narrow ? 4 : 8).map((tick) => (
            <text key={`x${tick}`} x={x(tick)} y={height - margin.bottom + 16} textAnchor="middle">
              {tick}
            </text>
          ))}
          <text x={margin.left + (width - margin.left - margin.right) / 2} y={height - 4} textAnchor="middle">
            temperature (°C)
          </text>
        </g>
        <path d={path} fill="none" stroke="var(--color-ink-600)" strokeWidth="2" />
        {points.map((point) => (
          <g key={point.temperatureC} fill="var(--color-amber-500)" stroke="var(--color-ink-900)">
            <circle cx={x(point.temperatureC)} cy={y(point.viscosityPaS)} r="4.5" />
            <line
              x1={x(point.temperatureC)}
              x2={x(point.temperatureC)}
              y1={residual(0)}
              y2={residual(point.residualPercent)}
              strokeWidth="1.5"
            />
            <rect x={x(point.temperatureC) - 4} y={residual(point.residualPercent) - 4} width="8" height="8">
              <title>{`${point.temperatureC} °C: ${formatNumber(point.residualPercent, 2)} %`}</title>
            </rect>
          </g>
        ))}
      </svg>
    </div>
  );
}
