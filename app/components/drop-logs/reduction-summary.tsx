import type { ReactNode } from "react";
import type { DropLogWarning } from "~/lib/drop-logs/reduce-drop-log";
import { dragModelNames, wallCorrectionNames } from "~/lib/labs/lab-input";
import type { Reduction } from "~/lib/reduction";

/** Significant figures enough for a bench measurement, without pretending to more. */
export function figure(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return Number(value.toPrecision(digits)).toString();
}

function percent(value: number): string {
  return `${value >= 0 ? "+" : ""}${(value * 100).toFixed(1)} %`;
}

/** The method's name as the lab form shows it, without the range of validity in brackets. */
function methodName(names: Record<string, string>, id: string): string {
  return (names[id] ?? id).replace(/ \(.*\)$/, "");
}

const dragCoefficient = (
  <>
    C<sub>D</sub>
  </>
);

/** The key results of a reduction, the same for the live preview and a stored version. */
export function ReductionSummary({ reduction, normalisedFigure }: { reduction: Reduction; normalisedFigure: number | null }) {
  const wallCorrection = methodName(wallCorrectionNames, reduction.method.wallCorrection);
  const rows: [key: string, label: ReactNode, value: string, detail?: string][] = [
    ["drops", "Drops", String(reduction.drops.n)],
    ["mean", "Mean time", `${figure(reduction.drops.mean)} s`, reduction.drops.ci95 ? `95 % interval ${figure(reduction.drops.ci95[0])}–${figure(reduction.drops.ci95[1])} s` : undefined],
    [
      "velocity",
      "Velocity",
      `${figure(reduction.velocity.measured * 1000)} mm/s`,
      `wall-corrected ${figure(reduction.velocity.corrected * 1000)} mm/s (${reduction.method.wallCorrection === "none" ? "no wall correction" : wallCorrection})`,
    ],
    ["reynolds", "Reynolds number", figure(reduction.reynolds, 3)],
    ["drag", <>Drag coefficient {dragCoefficient}</>, figure(reduction.dragCoefficient)],
  ];
  if (reduction.mode === "drag") {
    rows.push([
      "reference",
      <>
        Reference {dragCoefficient} ({methodName(dragModelNames, reduction.method.dragModel)})
      </>,
      figure(reduction.referenceDragCoefficient),
      `deviation ${percent(reduction.deviation)}`,
    ]);
  } else {
    rows.push(["viscosity", "Viscosity μ (Stokes)", `${figure(reduction.viscosity)} Pa·s`, reduction.viscosityOseen !== null ? `Oseen-corrected ${figure(reduction.viscosityOseen)} Pa·s` : undefined]);
    if (normalisedFigure !== null) rows.push(["normalised", "Measured / reference viscosity", figure(normalisedFigure, 3)]);
  }
  return (
    <dl className="grid grid-cols-1 gap-x-4 gap-y-1 text-sm sm:grid-cols-[auto_1fr]">
      {rows.map(([key, label, value, detail]) => (
        <div key={key} className="contents">
          <dt className="text-ink-700">{label}</dt>
          <dd className="font-medium tabular-nums">
            {value}
            {detail ? <span className="ml-2 font-normal text-ink-600">{detail}</span> : null}
          </dd>
        </div>
      ))}
    </dl>
  );
}

export function WarningList({ warnings }: { warnings: DropLogWarning[] }) {
  const shown = warnings.filter((warning) => warning.level !== "info");
  if (!shown.length) return null;
  return (
    <ul className="mt-1 flex flex-col gap-1 text-sm">
      {shown.map((warning) => (
        <li key={warning.code + warning.message} className={warning.level === "error" ? "text-outlier" : "text-amber-800"}>
          {warning.message}
        </li>
      ))}
    </ul>
  );
}
