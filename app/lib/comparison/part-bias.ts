/**
 * Kit-part quality: is a part's record biased? The normalised figures of the hand-ins that used the part
 * should scatter around 1; a sphere whose recorded diameter is off shifts all of them the same way.
 * Pure: the server feeds it the figures.
 */
import { studentTQuantile } from "~/lib/reduction";

/** At least this many hand-ins before a part can be flagged (a t-test on two values says little). */
export const MINIMUM_HAND_INS_FOR_BIAS = 3;

export type PartBias = {
  n: number;
  /** exp(mean ln figure) − 1: the geometric-mean bias as a fraction. */
  meanBias: number;
  /** t = mean / (s/√n) of ln figure; null when n < 3 or the figures do not vary. */
  t: number | null;
  /** t(1 − α/2, n − 1), two-sided. */
  criticalT: number | null;
  flagged: boolean;
};

/**
 * One-sample two-sided Student t-test of ln(figure) against 0 (no bias), at significance α. A part is
 * flagged when |t| > t(1 − α/2, n − 1) with n ≥ 3.
 */
export function partBias(figures: readonly number[], alpha: number): PartBias {
  const n = figures.length;
  let sum = 0;
  for (const figure of figures) sum += Math.log(figure);
  const mean = n > 0 ? sum / n : 0;
  const meanBias = Math.exp(mean) - 1;
  if (n < MINIMUM_HAND_INS_FOR_BIAS) return { n, meanBias, t: null, criticalT: null, flagged: false };
  let squares = 0;
  for (const figure of figures) squares += (Math.log(figure) - mean) ** 2;
  const sd = Math.sqrt(squares / (n - 1));
  const criticalT = studentTQuantile(1 - alpha / 2, n - 1);
  if (!(sd > 0)) return { n, meanBias, t: null, criticalT, flagged: false };
  const t = mean / (sd / Math.sqrt(n));
  return { n, meanBias, t, criticalT, flagged: Math.abs(t) > criticalT };
}
