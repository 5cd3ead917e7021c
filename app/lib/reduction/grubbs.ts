import { ReductionInputError } from "./errors";
import { studentTQuantile } from "./statistics";

export type GrubbsSides = 1 | 2;

// One array of critical values per (α, sides), indexed by n: a class comparison or a batch of drop logs
// asks for the same few sizes thousands of times, and the t quantile is the expensive part.
const criticalValueCache = new Map<number, number[]>();

/**
 * Critical value of Grubbs' statistic G = max|xᵢ − x̄|/s for n values at significance α, after Grubbs
 * (1969, Technometrics 11, 1–21) as given in the NIST/SEMATECH e-Handbook of Statistical Methods,
 * §1.3.5.17.1:
 *
 *   G_crit = ((n − 1)/√n) · √( t² / (n − 2 + t²) ),  t = t(1 − α/(2n), n − 2) two-sided, t(1 − α/n, n − 2) one-sided.
 *
 * Cached by n, α and sides. Needs n ≥ 3.
 */
export function grubbsCriticalValue(n: number, alpha = 0.05, sides: GrubbsSides = 2): number {
  if (!Number.isInteger(n) || n < 3) {
    throw new ReductionInputError([{ path: "n", message: "Grubbs' test needs at least 3 values" }]);
  }
  if (!(alpha > 0 && alpha < 1)) {
    throw new ReductionInputError([{ path: "alpha", message: "must be between 0 and 1" }]);
  }
  const cacheKey = sides === 1 ? -alpha : alpha;
  let bySize = criticalValueCache.get(cacheKey);
  if (!bySize) {
    bySize = [];
    criticalValueCache.set(cacheKey, bySize);
  }
  let critical = bySize[n];
  if (critical === undefined) {
    const t = studentTQuantile(1 - alpha / (sides * n), n - 2);
    critical = ((n - 1) / Math.sqrt(n)) * Math.sqrt((t * t) / (n - 2 + t * t));
    bySize[n] = critical;
  }
  return critical;
}

export interface GrubbsTestOptions {
  alpha?: number;
  sides?: GrubbsSides;
  /** For a one-sided test: is the largest (`upper`, default) or the smallest (`lower`) value suspected? */
  tail?: "upper" | "lower";
}

export interface GrubbsTestResult {
  n: number;
  mean: number;
  sd: number;
  /** G = |x_index − x̄| / s (0 when all values are equal). */
  statistic: number;
  critical: number;
  /** Index of the tested (most extreme) value; −1 when all values are equal. */
  index: number;
  isOutlier: boolean;
}

/** Grubbs' test for one outlier (NIST/SEMATECH e-Handbook §1.3.5.17.1). Needs n ≥ 3. */
export function grubbsTest(values: readonly number[], options: GrubbsTestOptions = {}): GrubbsTestResult {
  const { alpha = 0.05, sides = 2, tail = "upper" } = options;
  const n = values.length;
  const critical = grubbsCriticalValue(n, alpha, sides);
  let sum = 0;
  let smallest = values[0];
  let largest = values[0];
  for (let i = 0; i < n; i++) {
    sum += values[i];
    if (values[i] < smallest) smallest = values[i];
    if (values[i] > largest) largest = values[i];
  }
  const mean = sum / n;
  // Equal values have no spread, even when the mean is off by a rounding error: nothing can stand out.
  if (smallest === largest) return { n, mean, sd: 0, statistic: 0, critical, index: -1, isOutlier: false };
  let index = -1;
  let largestDeviation = 0;
  let scale = 0;
  for (let i = 0; i < n; i++) {
    const deviation = values[i] - mean;
    scale = Math.max(scale, Math.abs(deviation));
    const tested = sides === 2 ? Math.abs(deviation) : tail === "upper" ? deviation : -deviation;
    if (tested > largestDeviation) {
      largestDeviation = tested;
      index = i;
    }
  }
  // Deviations are scaled before squaring so that tiny (or huge) magnitudes neither underflow nor overflow.
  let scaledSumOfSquares = 0;
  for (let i = 0; i < n; i++) {
    const scaled = (values[i] - mean) / scale;
    scaledSumOfSquares += scaled * scaled;
  }
  const scaledSd = Math.sqrt(scaledSumOfSquares / (n - 1));
  const sd = scale * scaledSd;
  const statistic = index >= 0 ? largestDeviation / scale / scaledSd : 0;
  if (statistic === 0) index = -1;
  return { n, mean, sd, statistic, critical, index, isOutlier: statistic > critical };
}

export interface GrubbsIterativeOptions {
  alpha?: number;
  /** Stop after this many removals; by default the test runs until nothing is flagged or n < 3. */
  maxOutliers?: number;
}

/** One removal of the iterative test, with the figures that justified it. */
export interface GrubbsStep {
  index: number;
  statistic: number;
  critical: number;
  /** Number of values still in the set when this one was tested. */
  n: number;
}

/**
 * Iterative two-sided Grubbs' test: remove the most extreme value while it is significant at α, then
 * test the rest again (the repeated use the NIST e-Handbook §1.3.5.17.1 describes). Returns the steps
 * in the order of removal, each with its G, critical value and n, so a report can quote them.
 *
 * Two-sided only: a one-sided critical value applied to whichever tail is farther has size 2α, so the
 * iterative test offers no one-sided variant ({@link grubbsTest} tests one named tail correctly).
 */
export function grubbsIterativeSteps(values: readonly number[], options: GrubbsIterativeOptions = {}): GrubbsStep[] {
  if (values.length < 3 || (options.maxOutliers ?? Number.POSITIVE_INFINITY) < 1) return [];
  return grubbsIterativeStepsOfSorted(values, sortedCopy(values), options);
}

/**
 * {@link grubbsIterativeSteps} for a caller that already holds the values sorted ascending (the class
 * comparison sorts once for its median and runs the test twice), so nothing is sorted again here.
 * `minimumSize` (default 3) is the smallest set still tested. Not part of the public exports.
 */
export function grubbsIterativeStepsOfSorted(
  values: ArrayLike<number>,
  sorted: ArrayLike<number>,
  options: GrubbsIterativeOptions & { minimumSize?: number } = {},
): GrubbsStep[] {
  return studentizedDeviateSteps(values, sorted, {
    alpha: options.alpha ?? 0.05,
    maxSteps: options.maxOutliers ?? Number.POSITIVE_INFINITY,
    minimumSize: options.minimumSize ?? 3,
    resolution: 0,
    untilNotSignificant: true,
  });
}

/** One step of the extreme studentized deviate sequence: the value removed and its deviation |x − x̄|. */
export interface StudentizedDeviateStep extends GrubbsStep {
  deviation: number;
}

export interface StudentizedDeviateOptions {
  alpha: number;
  maxSteps: number;
  /** The smallest set still tested (at least 3). */
  minimumSize: number;
  /**
   * Reading resolution (0 for none): a value within it of the mean of the rest is never removed, and R
   * is taken from |x − x̄| less half of it, the nearest the true value can lie.
   */
  resolution: number;
  /** Iterative Grubbs stops at the first step that is not significant; the generalized ESD test does not. */
  untilNotSignificant: boolean;
}

// A downdate that loses more than three digits of the sum of squares is redone by two passes.
const PRECISION_LOSS_LIMIT = 1e-3;
// Readings rounded to the resolution deviate by it up to a rounding error of the mean; not more.
const RESOLUTION_TOLERANCE = 1 + 1e-9;

/**
 * The sequence both Grubbs' iterative test and the generalized ESD test read (NIST/SEMATECH e-Handbook
 * §1.3.5.17.1 and §1.3.5.17.3): R = max|xᵢ − x̄|/s of the remaining values, the most extreme removed,
 * repeated; each step carries Grubbs' critical value for the remaining n, which equals Rosner's λᵢ.
 *
 * Values are sorted once, so the extreme value is always at one end of the remaining range. The mean
 * and the sum of squared deviations start from two passes and are downdated per removal (Welford);
 * when a removal cancels most of the sum of squares (a value far out, such as 1e8 among values near
 * 10) they are recomputed by two passes over what is left, so no precision is lost and a class of
 * thousands still costs O(n log n).
 */
export function studentizedDeviateSteps(
  values: ArrayLike<number>,
  sorted: ArrayLike<number>,
  options: StudentizedDeviateOptions,
): StudentizedDeviateStep[] {
  const { alpha, maxSteps, resolution, untilNotSignificant } = options;
  const minimumSize = Math.max(3, options.minimumSize);
  const n = values.length;
  const steps: StudentizedDeviateStep[] = [];
  if (n < minimumSize || maxSteps < 1) return steps;
  let low = 0;
  let high = n - 1;
  let { mean, sumOfSquares } = twoPass(sorted, low, high);
  const resolutionLimit = resolution * RESOLUTION_TOLERANCE;
  while (high - low + 1 >= minimumSize && steps.length < maxSteps) {
    const remaining = high - low + 1;
    if (sorted[high] === sorted[low] || !(sumOfSquares > 0)) break;
    const highDeviation = sorted[high] - mean;
    const lowDeviation = mean - sorted[low];
    const highSide = highDeviation >= lowDeviation;
    const deviation = highSide ? highDeviation : lowDeviation;
    // Within the reading resolution nothing stands out, however small the spread of the rest.
    if (deviation <= resolutionLimit) break;
    // A reading rounded to the resolution may lie half a step closer to the mean than it reads: the
    // deviation it can be sure of is |x − x̄| − resolution/2 (0 resolution: the textbook R).
    const statistic = (deviation - resolution / 2) / Math.sqrt(sumOfSquares / (remaining - 1));
    const critical = grubbsCriticalValue(remaining, alpha);
    if (untilNotSignificant && !(statistic > critical)) break;
    // For now `index` holds the position in sorted order; it is turned into the input index below.
    steps.push({ index: highSide ? high : low, statistic, critical, n: remaining, deviation });
    const removed = highSide ? sorted[high--] : sorted[low++];
    const nextMean = mean + (mean - removed) / (remaining - 1);
    const nextSumOfSquares = sumOfSquares - (removed - mean) * (removed - nextMean);
    if (nextSumOfSquares > sumOfSquares * PRECISION_LOSS_LIMIT) {
      mean = nextMean;
      sumOfSquares = nextSumOfSquares;
    } else {
      ({ mean, sumOfSquares } = twoPass(sorted, low, high));
    }
  }
  if (steps.length > 0) replacePositionsByIndices(values, sorted, steps, low, n - 1 - high);
  return steps;
}

/** Mean and sum of squared deviations of sorted[low..high], by two passes. */
function twoPass(sorted: ArrayLike<number>, low: number, high: number): { mean: number; sumOfSquares: number } {
  let sum = 0;
  for (let i = low; i <= high; i++) sum += sorted[i];
  const mean = sum / (high - low + 1);
  let sumOfSquares = 0;
  for (let i = low; i <= high; i++) {
    const deviation = sorted[i] - mean;
    sumOfSquares += deviation * deviation;
  }
  return { mean, sumOfSquares };
}

/**
 * The removed values are the `lowCount` smallest and the `highCount` largest. One pass finds their input
 * indices; equal values are ordered by index, as a stable sort of the indices would order them.
 */
function replacePositionsByIndices(
  values: ArrayLike<number>,
  sorted: ArrayLike<number>,
  steps: GrubbsStep[],
  lowCount: number,
  highCount: number,
): void {
  const n = values.length;
  const lowLimit = lowCount > 0 ? sorted[lowCount - 1] : Number.NEGATIVE_INFINITY;
  const highLimit = highCount > 0 ? sorted[n - highCount] : Number.POSITIVE_INFINITY;
  const lowIndices: number[] = [];
  const highIndices: number[] = [];
  for (let i = 0; i < n; i++) {
    if (lowCount > 0 && values[i] <= lowLimit) lowIndices.push(i);
    else if (highCount > 0 && values[i] >= highLimit) highIndices.push(i);
  }
  sortIndicesByValue(lowIndices, values);
  sortIndicesByValue(highIndices, values);
  for (const step of steps) {
    const position = step.index;
    step.index = position < lowCount ? lowIndices[position] : highIndices[highIndices.length - (n - position)];
  }
}

/**
 * Sorts indices (collected in ascending order) by their values, keeping equal values in index order.
 * A handful is the usual case, so insertion sort; Array.prototype.sort (also stable) beyond that.
 */
function sortIndicesByValue(indices: number[], values: ArrayLike<number>): void {
  if (indices.length > 32) {
    indices.sort((a, b) => values[a] - values[b]);
    return;
  }
  for (let i = 1; i < indices.length; i++) {
    const index = indices[i];
    let j = i - 1;
    while (j >= 0 && values[indices[j]] > values[index]) {
      indices[j + 1] = indices[j];
      j--;
    }
    indices[j + 1] = index;
  }
}

/** Iterative Grubbs' test: the indices removed, in the order they were removed. */
export function grubbsIterative(values: readonly number[], options: GrubbsIterativeOptions = {}): number[] {
  return grubbsIterativeSteps(values, options).map((step) => step.index);
}

// Reused for drop-log sizes, so reducing a batch of logs does not allocate a sorted copy per log.
// Safe because nothing here calls back into user code while the copy is in use.
const smallSortScratch = new Float64Array(32);

/**
 * The values sorted ascending. Up to 32 values (a drop log) go by insertion sort into a reused buffer,
 * which beats a typed-array sort at that size; larger sets get their own copy and the native sort.
 * The small buffer is reused by the next call: read it before sorting again. Not part of the public exports.
 */
export function sortedCopy(values: readonly number[]): Float64Array {
  const n = values.length;
  if (n > smallSortScratch.length) return Float64Array.from(values).sort();
  const sorted = smallSortScratch;
  for (let i = 0; i < n; i++) {
    const value = values[i];
    let j = i - 1;
    while (j >= 0 && sorted[j] > value) {
      sorted[j + 1] = sorted[j];
      j--;
    }
    sorted[j + 1] = value;
  }
  return sorted;
}
