import { IssueList } from "./errors";
import type { Reduction } from "./falling-sphere";
import { generalizedEsdOfSorted } from "./generalized-esd";
import { grubbsIterativeStepsOfSorted, type GrubbsStep } from "./grubbs";
import { MINIMUM_DROPS_FOR_STRAY_TEST } from "./stray-drops";
import { quantileType7 } from "./tukey";
import { counted } from "../plural";

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
  method: "grubbs" | "esd" | "iqr";
  /** Grubbs and ESD: significance level (default 0.05). */
  alpha?: number;
  /** Grubbs: most removals labelled outlier; ESD: the upper bound r (default ⌊n/10⌋, at least 1). */
  maxOutliers?: number;
  /** Tukey: inner fence factor (default 1.5); the outer fence is 2k. */
  k?: number;
  /** Word for the figure in the reasons, e.g. "viscosity" or "drag". Default "result". */
  quantity?: string;
}

// Below this a class has no "rest" to compare with; our choice, matching Grubbs' own minimum.
const MINIMUM_CLASS_SIZE = 3;
// Grubbs' and the ESD test are not used on six values or fewer (NIST/SEMATECH e-Handbook §1.3.5.17.1),
// the same limit as for the drops of a log; Tukey's fences keep the smaller minimum.
const MINIMUM_CLASS_SIZE_FOR_DEVIATE_TESTS = MINIMUM_DROPS_FOR_STRAY_TEST;

/**
 * Labels each hand-in of a lab against the rest of the class. Figures are compared in log space (a
 * ratio 2 and a ratio ½ are equally far from 1), and each reason quotes the distance from the class
 * median.
 *
 * - `grubbs`: iterative two-sided Grubbs' test on ln(figure) (NIST/SEMATECH e-Handbook §1.3.5.17.1).
 *   **outlier**: removed at α within the first `maxOutliers` removals. **suspect** (our definition): not
 *   an outlier, but removed when the test is repeated at the looser level 2α with twice the budget —
 *   so it covers both borderline values and values flagged at α beyond the budget.
 * - `esd`: the generalized ESD test on ln(figure) with r = `maxOutliers` (Rosner 1983; NIST/SEMATECH
 *   e-Handbook §1.3.5.17.3), which a second outlier cannot mask. **outlier**: among the first k removals,
 *   k the largest i with Rᵢ > λᵢ at α. **suspect**: not an outlier, but an outlier of the same test at 2α
 *   with 2r.
 * - Grubbs and ESD label nothing in a class of six or fewer (NIST §1.3.5.17.1 caution).
 * - `iqr`: Tukey's fences on ln(figure) with type-7 quartiles (R's default): beyond Q1 − k·IQR or
 *   Q3 + k·IQR → **suspect**; beyond the outer fences at 2k (3 for k = 1.5) → **outlier**.
 */
export function classComparison(entries: readonly ClassComparisonEntry[], options: ClassComparisonOptions): ClassComparisonResult[] {
  const issues = new IssueList();
  if (options.method !== "grubbs" && options.method !== "esd" && options.method !== "iqr")
    issues.add("method", 'must be "grubbs", "esd" or "iqr"');
  const n = entries.length;
  // Each figure is checked inline; its path string is only built for one that fails.
  for (let i = 0; i < n; i++) {
    const figure = entries[i].figure;
    if (!(typeof figure === "number" && figure > 0 && figure < Number.POSITIVE_INFINITY)) {
      issues.positive(`entries.${i}.figure`, figure);
    }
  }
  const { alpha = 0.05, k = 1.5, quantity = "result" } = options;
  if (!(alpha > 0 && alpha < 0.5)) issues.add("alpha", "must be between 0 and 0.5");
  if (!(k > 0)) issues.add("k", "must be greater than zero");
  issues.throwIfAny();

  const logs = new Float64Array(n);
  for (let i = 0; i < n; i++) logs[i] = Math.log(entries[i].figure);
  // Sorted once: the median, the quartiles and both Grubbs runs all read this copy.
  const sortedLogs = logs.slice().sort();
  const medianLog = n > 0 ? quantileType7(sortedLogs, 0.5) : 0;
  const result = (i: number, label: ClassComparisonLabel, reason: string): ClassComparisonResult => ({
    id: entries[i].id,
    figure: entries[i].figure,
    relativeToClass: Math.exp(logs[i] - medianLog) - 1,
    label,
    reason,
  });
  const results: ClassComparisonResult[] = new Array(n);

  const minimumSize = options.method === "iqr" ? MINIMUM_CLASS_SIZE : MINIMUM_CLASS_SIZE_FOR_DEVIATE_TESTS;
  if (n < minimumSize) {
    const describer = new MedianDistanceDescriber(quantity, `; too few hand-ins to compare (n = ${n}, at least ${minimumSize})`);
    for (let i = 0; i < n; i++) results[i] = result(i, "consistent", describer.consistentReason(logs[i] - medianLog));
    return results;
  }

  if (options.method === "iqr") {
    const q1 = quantileType7(sortedLogs, 0.25);
    const q3 = quantileType7(sortedLogs, 0.75);
    const iqr = q3 - q1;
    const fenceText = (figure: number, factor: number, side: "lower" | "upper") => {
      const fence = Math.exp(side === "lower" ? q1 - factor * iqr : q3 + factor * iqr);
      return `${format(figure)} is ${side === "lower" ? "below" : "above"} the ${side} fence ${format(fence)} (${side === "lower" ? "Q1 −" : "Q3 +"} ${factor}·IQR of ln figure, type-7 quartiles, n = ${n})`;
    };
    const describer = new MedianDistanceDescriber(quantity, `; within Tukey's fences (k = ${k}, n = ${n})`);
    for (let i = 0; i < n; i++) {
      const x = logs[i];
      const side = x < q1 ? "lower" : "upper";
      const beyondOuter = side === "lower" ? x < q1 - 2 * k * iqr : x > q3 + 2 * k * iqr;
      const beyondInner = side === "lower" ? x < q1 - k * iqr : x > q3 + k * iqr;
      const distance = x - medianLog;
      if (beyondOuter) {
        results[i] = result(i, "outlier", `${describer.describe(distance)}; ${fenceText(entries[i].figure, 2 * k, side)}`);
      } else if (beyondInner) {
        results[i] = result(i, "suspect", `${describer.describe(distance)}; ${fenceText(entries[i].figure, k, side)}`);
      } else {
        results[i] = result(i, "consistent", describer.consistentReason(distance));
      }
    }
    return results;
  }

  const maxOutliers = options.maxOutliers ?? Math.max(1, Math.floor(n / 10));
  const looseAlpha = Math.min(2 * alpha, 0.5);
  const budgetText =
    options.method === "esd"
      ? ` (not an outlier at α = ${alpha} with r = ${maxOutliers})`
      : ` (not removed at α = ${alpha} within ${counted(maxOutliers, "removal", "removals")})`;
  let outlierSteps: GrubbsStep[];
  let looseSteps: GrubbsStep[];
  let stepText: (step: GrubbsStep, level: number, steps: readonly GrubbsStep[]) => string;
  let describer: MedianDistanceDescriber;
  if (options.method === "esd") {
    const testAt = (level: number, bound: number) => {
      const { steps, outlierCount } = generalizedEsdOfSorted(logs, sortedLogs, { alpha: level, maxOutliers: bound, minimumSize });
      return steps.slice(0, outlierCount);
    };
    outlierSteps = testAt(alpha, maxOutliers);
    looseSteps = testAt(looseAlpha, 2 * maxOutliers);
    // The decision rests on the last significant step, Rₖ > λₖ; each outlier also quotes its own Rᵢ.
    stepText = (step, level, steps) => {
      const k = steps.length;
      const deciding = steps[k - 1];
      const i = steps.indexOf(step) + 1;
      return `generalized ESD: removal ${i} of ${k} (R${i} = ${format(step.statistic)}), R${k} = ${format(deciding.statistic)} > λ${k} = ${format(deciding.critical)} at α = ${level}, n = ${n}`;
    };
    describer = new MedianDistanceDescriber(quantity, `; not flagged by the generalized ESD test at α = ${looseAlpha} (n = ${n})`);
  } else {
    outlierSteps = grubbsIterativeStepsOfSorted(logs, sortedLogs, { alpha, maxOutliers, minimumSize });
    looseSteps = grubbsIterativeStepsOfSorted(logs, sortedLogs, { alpha: looseAlpha, maxOutliers: 2 * maxOutliers, minimumSize });
    stepText = (step, level) => `Grubbs G = ${format(step.statistic)} > ${format(step.critical)} at α = ${level}, n = ${step.n}`;
    describer = new MedianDistanceDescriber(quantity, `; not flagged by Grubbs' test at α = ${looseAlpha} (n = ${n})`);
  }
  const outlierStepByIndex = new Map<number, GrubbsStep>();
  for (const step of outlierSteps) outlierStepByIndex.set(step.index, step);
  const suspectStepByIndex = new Map<number, GrubbsStep>();
  for (const step of looseSteps) if (!outlierStepByIndex.has(step.index)) suspectStepByIndex.set(step.index, step);

  for (let i = 0; i < n; i++) {
    const distance = logs[i] - medianLog;
    const outlierStep = outlierSteps.length > 0 ? outlierStepByIndex.get(i) : undefined;
    const suspectStep = looseSteps.length > 0 && !outlierStep ? suspectStepByIndex.get(i) : undefined;
    if (outlierStep) {
      results[i] = result(i, "outlier", `${describer.describe(distance)}; ${stepText(outlierStep, alpha, outlierSteps)}`);
    } else if (suspectStep) {
      results[i] = result(i, "suspect", `${describer.describe(distance)}; ${stepText(suspectStep, looseAlpha, looseSteps)}${budgetText}`);
    } else {
      results[i] = result(i, "consistent", describer.consistentReason(distance));
    }
  }
  return results;
}

/**
 * "viscosity 3 % above the class median", from a distance in log space. A class of thousands has only
 * a few dozen distinct whole percentages, so each phrase, and each full reason of the common consistent
 * label, is built once per comparison and shared instead of once per hand-in.
 */
class MedianDistanceDescriber {
  private readonly phraseByPercent = new Map<number, string>();
  private readonly consistentReasonByPercent = new Map<number, string>();

  constructor(
    private readonly quantity: string,
    /** What follows the phrase in a consistent entry's reason, e.g. "; within Tukey's fences (…)". */
    private readonly consistentSuffix: string,
  ) {}

  describe(logDistance: number): string {
    const percent = percentFromMedian(logDistance);
    let phrase = this.phraseByPercent.get(percent);
    if (phrase === undefined) {
      phrase =
        percent === 0
          ? `${this.quantity} at the class median`
          : `${this.quantity} ${Math.abs(percent)} % ${percent > 0 ? "above" : "below"} the class median`;
      this.phraseByPercent.set(percent, phrase);
    }
    return phrase;
  }

  consistentReason(logDistance: number): string {
    const percent = percentFromMedian(logDistance);
    let reason = this.consistentReasonByPercent.get(percent);
    if (reason === undefined) {
      reason = this.describe(logDistance) + this.consistentSuffix;
      this.consistentReasonByPercent.set(percent, reason);
    }
    return reason;
  }
}

function percentFromMedian(logDistance: number): number {
  return Math.round((Math.exp(logDistance) - 1) * 100);
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
  const referenceViscosity = options.referenceViscosity;
  // The issue list is only built for a bad reference: this runs once per hand-in of a class.
  if (!(typeof referenceViscosity === "number" && referenceViscosity > 0 && referenceViscosity < Number.POSITIVE_INFINITY)) {
    const issues = new IssueList();
    issues.positive("referenceViscosity", referenceViscosity);
    issues.throwIfAny();
  }
  const results = (options.withoutStrayDrops && reduction.withoutStrayDrops) || reduction;
  return results.viscosity / (referenceViscosity as number);
}

function format(value: number): string {
  return Number(value.toPrecision(3)).toString();
}
