import { IssueList } from "./errors";
import type { Reduction } from "./falling-sphere";
import { grubbsIterativeSteps, type GrubbsStep } from "./grubbs";
import { quantileType7 } from "./tukey";

export interface ClassComparisonEntry {
  id: string;
  /** Normalised figure: a positive ratio such as measured/reference viscosity or C_D/C_D,ref. */
  figure: number;
}

export type ClassComparisonLabel = "consistent" | "suspect" | "outlier";

export interface ClassComparisonResult {
  id: string;
  figure: number;
  /** figure / class median − 1. */
  relativeToClass: number;
  label: ClassComparisonLabel;
  reason: string;
}

export interface ClassComparisonOptions {
  method: "grubbs" | "iqr";
  /** Grubbs: significance of a removal (default 0.05). */
  alpha?: number;
  /** Grubbs: most removals labelled outlier (default ⌊n/10⌋, at least 1). */
  maxOutliers?: number;
  /** Tukey: inner fence factor (default 1.5); the outer fence is 2k. */
  k?: number;
  /** Word for the figure in the reasons, e.g. "viscosity" or "drag". Default "result". */
  quantity?: string;
}

// Below this a class has no "rest" to compare with; our choice, matching Grubbs' own minimum.
const MINIMUM_CLASS_SIZE = 3;

/**
 * Labels each hand-in of a lab against the rest of the class. Figures are compared in log space (a
 * ratio 2 and a ratio ½ are equally far from 1), and each reason quotes the distance from the class
 * median.
 *
 * - `grubbs`: iterative two-sided Grubbs' test on ln(figure) (NIST/SEMATECH e-Handbook §1.3.5.17.1).
 *   **outlier**: removed at α within the first `maxOutliers` removals. **suspect** (our definition): not
 *   an outlier, but removed when the test is repeated at the looser level 2α with twice the budget —
 *   so it covers both borderline values and values flagged at α beyond the budget.
 * - `iqr`: Tukey's fences on ln(figure) with type-7 quartiles (R's default): beyond Q1 − k·IQR or
 *   Q3 + k·IQR → **suspect**; beyond the outer fences at 2k (3 for k = 1.5) → **outlier**.
 */
export function classComparison(
  entries: readonly ClassComparisonEntry[],
  options: ClassComparisonOptions,
): ClassComparisonResult[] {
  const issues = new IssueList();
  if (options.method !== "grubbs" && options.method !== "iqr") issues.add("method", 'must be "grubbs" or "iqr"');
  entries.forEach((entry, i) => issues.positive(`entries.${i}.figure`, entry.figure));
  const { alpha = 0.05, k = 1.5, quantity = "result" } = options;
  if (!(alpha > 0 && alpha < 0.5)) issues.add("alpha", "must be between 0 and 0.5");
  if (!(k > 0)) issues.add("k", "must be greater than zero");
  issues.throwIfAny();

  const n = entries.length;
  const logs = new Array<number>(n);
  for (let i = 0; i < n; i++) logs[i] = Math.log(entries[i].figure);
  const sortedLogs = Float64Array.from(logs).sort();
  const medianLog = n > 0 ? quantileType7(sortedLogs, 0.5) : 0;
  const relative = (i: number) => Math.exp(logs[i] - medianLog) - 1;
  const describe = (i: number) => {
    const percent = Math.round(relative(i) * 100);
    if (percent === 0) return `${quantity} at the class median`;
    return `${quantity} ${Math.abs(percent)} % ${percent > 0 ? "above" : "below"} the class median`;
  };
  const result = (i: number, label: ClassComparisonLabel, reason: string): ClassComparisonResult => ({
    id: entries[i].id,
    figure: entries[i].figure,
    relativeToClass: relative(i),
    label,
    reason,
  });

  if (n < MINIMUM_CLASS_SIZE) {
    return entries.map((_, i) => result(i, "consistent", `${describe(i)}; too few hand-ins to compare (n = ${n})`));
  }

  if (options.method === "iqr") {
    const q1 = quantileType7(sortedLogs, 0.25);
    const q3 = quantileType7(sortedLogs, 0.75);
    const iqr = q3 - q1;
    const fence = (factor: number, side: "lower" | "upper") =>
      Math.exp(side === "lower" ? q1 - factor * iqr : q3 + factor * iqr);
    return entries.map((entry, i) => {
      const x = logs[i];
      const side = x < q1 ? "lower" : "upper";
      const beyond = (factor: number) => (side === "lower" ? x < q1 - factor * iqr : x > q3 + factor * iqr);
      const fenceText = (factor: number) =>
        `${format(entry.figure)} is ${side === "lower" ? "below" : "above"} the ${side} fence ${format(fence(factor, side))} (${side === "lower" ? "Q1 −" : "Q3 +"} ${factor}·IQR of ln figure, type-7 quartiles, n = ${n})`;
      if (beyond(2 * k)) return result(i, "outlier", `${describe(i)}; ${fenceText(2 * k)}`);
      if (beyond(k)) return result(i, "suspect", `${describe(i)}; ${fenceText(k)}`);
      return result(i, "consistent", `${describe(i)}; within Tukey's fences (k = ${k}, n = ${n})`);
    });
  }

  const maxOutliers = options.maxOutliers ?? Math.max(1, Math.floor(n / 10));
  const outlierSteps = grubbsIterativeSteps(logs, { alpha, maxOutliers });
  const looseAlpha = Math.min(2 * alpha, 0.5);
  const looseSteps = grubbsIterativeSteps(logs, { alpha: looseAlpha, maxOutliers: 2 * maxOutliers });
  const outlierStepByIndex = new Map<number, GrubbsStep>();
  for (const step of outlierSteps) outlierStepByIndex.set(step.index, step);
  const suspectStepByIndex = new Map<number, GrubbsStep>();
  for (const step of looseSteps) if (!outlierStepByIndex.has(step.index)) suspectStepByIndex.set(step.index, step);
  const grubbsText = (step: GrubbsStep, level: number) =>
    `Grubbs G = ${format(step.statistic)} > ${format(step.critical)} at α = ${level}, n = ${step.n}`;

  return entries.map((_, i) => {
    const outlierStep = outlierStepByIndex.get(i);
    if (outlierStep) return result(i, "outlier", `${describe(i)}; ${grubbsText(outlierStep, alpha)}`);
    const suspectStep = suspectStepByIndex.get(i);
    if (suspectStep) {
      return result(
        i,
        "suspect",
        `${describe(i)}; ${grubbsText(suspectStep, looseAlpha)} (not removed at α = ${alpha} within ${maxOutliers} removal${maxOutliers === 1 ? "" : "s"})`,
      );
    }
    return result(i, "consistent", `${describe(i)}; not flagged by Grubbs' test at α = ${looseAlpha} (n = ${n})`);
  });
}

export interface NormalisedFigureOptions {
  /** Viscometry: the fluid's reference viscosity at the drop temperature (Pa·s), e.g. from `viscosityAt`. */
  referenceViscosity?: number;
  /** Use the results without stray drops when the reduction has them (default false: all drops). */
  withoutStrayDrops?: boolean;
}

/**
 * The figure a reduction contributes to the class comparison: measured/reference viscosity in
 * viscometry, C_D/C_D,ref(Re) in drag mode. Comparable across kits and temperatures because each
 * hand-in is divided by its own reference.
 */
export function normalisedFigure(reduction: Reduction, options: NormalisedFigureOptions = {}): number {
  if (reduction.mode === "drag") {
    const results = (options.withoutStrayDrops && reduction.withoutStrayDrops) || reduction;
    return results.dragCoefficient / results.referenceDragCoefficient;
  }
  const issues = new IssueList();
  issues.positive("referenceViscosity", options.referenceViscosity);
  issues.throwIfAny();
  const results = (options.withoutStrayDrops && reduction.withoutStrayDrops) || reduction;
  return results.viscosity / (options.referenceViscosity as number);
}

function format(value: number): string {
  return Number(value.toPrecision(3)).toString();
}
