import studentTQuantileFromStdlib from "@stdlib/stats-base-dists-t-quantile";

/**
 * Student-t quantile t(p, ν), taken from stdlib (`@stdlib/stats-base-dists-t-quantile`) rather than
 * written by hand. Uncached; prefer {@link tQuantile975} for the 95 % interval, which is cached.
 */
export function studentTQuantile(probability: number, degreesOfFreedom: number): number {
  return studentTQuantileFromStdlib(probability, degreesOfFreedom);
}

// Drop logs have a handful of sizes, so the 95 % quantile is computed once per degrees of freedom.
const quantile975ByDegreesOfFreedom: number[] = [];

/** t(0.975, ν), the two-sided 95 % coverage factor, cached by ν. */
export function tQuantile975(degreesOfFreedom: number): number {
  let quantile = quantile975ByDegreesOfFreedom[degreesOfFreedom];
  if (quantile === undefined) {
    quantile = studentTQuantileFromStdlib(0.975, degreesOfFreedom);
    quantile975ByDegreesOfFreedom[degreesOfFreedom] = quantile;
  }
  return quantile;
}

/** Summary of a set of timed drops (seconds). */
export interface DropStatistics {
  n: number;
  /** Mean drop time t̄ (s). */
  mean: number;
  /** Sample standard deviation s (n − 1 in the denominator); null with a single drop. */
  sd: number | null;
  /** Standard error of the mean s/√n; null with a single drop. */
  se: number | null;
  /** t̄ ± t(0.975, n − 1)·s/√n; null with a single drop. */
  ci95: [number, number] | null;
}

/**
 * n, mean, sample standard deviation, standard error and the Student-t 95 % interval of the values,
 * skipping the indices flagged in `excluded` (when given). Two passes over the data, so the
 * deviation is not spoiled by cancellation when drops are long and close together.
 */
export function describeDrops(times: readonly number[], excluded?: Uint8Array): DropStatistics {
  let n = 0;
  let sum = 0;
  for (let i = 0; i < times.length; i++) {
    if (excluded?.[i]) continue;
    n++;
    sum += times[i];
  }
  const mean = sum / n;
  if (n < 2) return { n, mean, sd: null, se: null, ci95: null };
  let sumOfSquares = 0;
  for (let i = 0; i < times.length; i++) {
    if (excluded?.[i]) continue;
    const deviation = times[i] - mean;
    sumOfSquares += deviation * deviation;
  }
  const sd = Math.sqrt(sumOfSquares / (n - 1));
  const se = sd / Math.sqrt(n);
  const halfWidth = tQuantile975(n - 1) * se;
  return { n, mean, sd, se, ci95: [mean - halfWidth, mean + halfWidth] };
}
