import type { ReactNode } from "react";
import type { DropLogWarning } from "~/lib/drop-logs/reduce-drop-log";
import { dragModelNames, wallCorrectionNames } from "~/lib/labs/lab-input";
import type { Reduction, UncertaintyBudget } from "~/lib/reduction";
import { formatWithUncertainty, roundToUncertainty } from "~/lib/round-to-uncertainty";

/** Significant figures enough for a bench measurement, without pretending to more. */
export function figure(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  return Number(value.toPrecision(digits)).toString();
}

function percent(value: number): string {
  return `${value >= 0 ? "+" : ""}${(value * 100).toFixed(1)} %`;
}

/** "+5.2 ± 3.1 %": a deviation rounded to its expanded uncertainty, in per cent. */
function percentWithUncertainty(value: number, expanded: number | undefined): string {
  const rounded = expanded === undefined ? null : roundToUncertainty(value * 100, expanded * 100);
  if (!rounded) return percent(value);
  return `${value >= 0 ? "+" : ""}${rounded.value} ± ${rounded.uncertainty} %`;
}

/** "k = 2.1, 95 %" beside an expanded uncertainty, so U is never read as a standard uncertainty. */
export function coverageNote(totals: { coverageFactor: number; coverageProbability: number } | null | undefined): string {
  if (!totals) return "uncertainty not computed for this version";
  return `± U with k = ${figure(totals.coverageFactor, 3)}, ${Math.round(totals.coverageProbability * 100)} % coverage`;
}

/** Stored reductions from before budgets were kept have none; JSON also turned their ∞ into null. */
export function budgetOf(reduction: Reduction): UncertaintyBudget | null {
  return (reduction as Partial<Reduction>).uncertaintyBudget ?? null;
}

/** The method's name as the lab form shows it, without the range of validity in brackets. */
function methodName(names: Record<string, string>, id: string): string {
  return (names[id] ?? id).replace(/ \(.*\)$/, "");
}

/** Every wall factor a reduction may apply: the lab's choices, and Di Felice's beyond creeping flow. */
const appliedWallCorrectionNames: Record<string, string> = { ...wallCorrectionNames, "di-felice": "Di Felice" };

/**
 * Which wall factor corrected the velocity, and the lab's choice when another stood in for it (the
 * checks say why). Reductions stored before the applied factor was recorded applied the lab's choice.
 */
function wallCorrectionNote(reduction: Reduction): string {
  const chosen = reduction.method.wallCorrection;
  const applied = (reduction.velocity as Partial<Reduction["velocity"]>).wallCorrection ?? chosen;
  if (applied === "none") return "no wall correction";
  const name = methodName(appliedWallCorrectionNames, applied);
  return applied === chosen ? name : `${name}, standing in for the lab's ${methodName(appliedWallCorrectionNames, chosen)}`;
}

const dragCoefficient = (
  <>
    C<sub>D</sub>
  </>
);

/** The key results of a reduction, the same for the live preview and a stored version. */
export function ReductionSummary({ reduction, normalisedFigure }: { reduction: Reduction; normalisedFigure: number | null }) {
  const budget = budgetOf(reduction);
  const figureBudget = budget?.normalisedFigure ?? null;
  const rows: [key: string, label: ReactNode, value: string, detail?: string][] = [
    ["drops", "Drops", String(reduction.drops.n)],
    [
      "mean",
      "Mean time",
      `${figure(reduction.drops.mean)} s`,
      reduction.drops.ci95 ? `95 % interval ${figure(reduction.drops.ci95[0])}–${figure(reduction.drops.ci95[1])} s` : undefined,
    ],
    [
      "velocity",
      "Velocity",
      `${figure(reduction.velocity.measured * 1000)} mm/s`,
      `wall-corrected ${figure(reduction.velocity.corrected * 1000)} mm/s (${wallCorrectionNote(reduction)}, K = ${figure(reduction.velocity.wallFactor, 3)})`,
    ],
    ["reynolds", "Reynolds number", figure(reduction.reynolds, 3)],
    [
      "drag",
      <>Drag coefficient {dragCoefficient}</>,
      reduction.mode === "drag" ? formatWithUncertainty(reduction.dragCoefficient, budget?.expanded) : figure(reduction.dragCoefficient),
      reduction.mode === "drag" ? coverageNote(budget) : undefined,
    ],
  ];
  if (reduction.mode === "drag") {
    rows.push([
      "reference",
      <>
        Reference {dragCoefficient} ({methodName(dragModelNames, reduction.method.dragModel)})
      </>,
      figure(reduction.referenceDragCoefficient),
      `deviation ${percentWithUncertainty(reduction.deviation, figureBudget?.expanded)}`,
    ]);
    if (normalisedFigure !== null) {
      rows.push([
        "normalised",
        <>
          {dragCoefficient}/{dragCoefficient},ref
        </>,
        formatWithUncertainty(normalisedFigure, figureBudget?.expanded),
        figureBudget ? coverageNote(figureBudget) : undefined,
      ]);
    }
  } else {
    rows.push([
      "viscosity",
      "Viscosity μ (Stokes)",
      `${formatWithUncertainty(reduction.viscosity, budget?.expanded)} Pa·s`,
      [coverageNote(budget), reduction.viscosityOseen !== null ? `Oseen-corrected ${figure(reduction.viscosityOseen)} Pa·s` : null]
        .filter(Boolean)
        .join("; "),
    ]);
    if (normalisedFigure !== null) {
      rows.push([
        "normalised",
        "Measured / reference viscosity μ/μ_ref(T)",
        formatWithUncertainty(normalisedFigure, figureBudget?.expanded),
        figureBudget ? coverageNote(figureBudget) : undefined,
      ]);
    }
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

const levelWords: Record<DropLogWarning["level"], string> = { error: "Error", warn: "Warning", info: "Note" };
const levelStyles: Record<DropLogWarning["level"], string> = {
  error: "border-l-4 border-outlier pl-2 text-outlier",
  warn: "border-l-4 border-amber-600 pl-2 text-amber-800",
  info: "border-l-2 border-dashed border-ink-400 pl-2 text-ink-700",
};

/**
 * Every check, info notes included: a note on the regime or a missing input is part of what a result
 * means. Each level is told apart by its word and its border as well as its colour, never colour alone.
 */
export function WarningList({ warnings }: { warnings: DropLogWarning[] }) {
  if (!warnings.length) return null;
  return (
    <ul className="mt-1 flex flex-col gap-1 text-sm">
      {warnings.map((warning) => (
        <li key={warning.code + warning.message} className={levelStyles[warning.level]}>
          <span className="font-semibold">{levelWords[warning.level]}:</span> {warning.message}
        </li>
      ))}
    </ul>
  );
}
