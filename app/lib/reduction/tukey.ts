import { ReductionInputError } from "./errors";

/**
 * Quantile of sorted values by linear interpolation between order statistics, Hyndman & Fan (1996)
 * type 7 — the default of R's `quantile()` and NumPy's `percentile()`: h = (n − 1)p,
 * Q(p) = x₍⌊h⌋₎ + (h − ⌊h⌋)(x₍⌊h⌋+1₎ − x₍⌊h⌋₎), with 0-based order statistics.
 */
export function quantileType7(sorted: ArrayLike<number>, probability: number): number {
  const h = (sorted.length - 1) * probability;
  const below = Math.floor(h);
  const above = Math.min(below + 1, sorted.length - 1);
  return sorted[below] + (h - below) * (sorted[above] - sorted[below]);
}

export interface TukeyFences {
  q1: number;
  q3: number;
  iqr: number;
  /** Q1 − k·IQR */
  lower: number;
  /** Q3 + k·IQR */
  upper: number;
  /** Indices of the values strictly outside [lower, upper], in input order. */
  outliers: number[];
}

/**
 * Tukey's fences (Tukey 1977, Exploratory Data Analysis): values outside [Q1 − k·IQR, Q3 + k·IQR].
 * Quartiles are R type 7 (linear interpolation, see {@link quantileType7}). k = 1.5 by default.
 */
export function tukeyFences(values: readonly number[], options: { k?: number } = {}): TukeyFences {
  const { k = 1.5 } = options;
  if (values.length === 0) throw new ReductionInputError([{ path: "values", message: "at least one value is needed" }]);
  const sorted = Float64Array.from(values).sort();
  const q1 = quantileType7(sorted, 0.25);
  const q3 = quantileType7(sorted, 0.75);
  const iqr = q3 - q1;
  const lower = q1 - k * iqr;
  const upper = q3 + k * iqr;
  const outliers: number[] = [];
  for (let i = 0; i < values.length; i++) {
    if (values[i] < lower || values[i] > upper) outliers.push(i);
  }
  return { q1, q3, iqr, lower, upper, outliers };
}
