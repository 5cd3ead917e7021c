import { sortedCopy, studentizedDeviateSteps, type StudentizedDeviateStep } from "./grubbs";

export interface GeneralizedEsdOptions {
  /** Significance level of the whole procedure (default 0.05). */
  alpha?: number;
  /** Upper bound r on the number of outliers (default 1, which is Grubbs' test). */
  maxOutliers?: number;
  /** Readings within this distance of the mean of the rest are never outliers (default 0). */
  resolution?: number;
  /** The smallest set still tested (default 3); the sequence stops before the set gets smaller. */
  minimumSize?: number;
}

export interface GeneralizedEsdResult {
  /** Every computed step, R₁…R_r with λ₁…λ_r, in the order of removal (input indices). */
  steps: StudentizedDeviateStep[];
  /** The number of outliers: the largest i with Rᵢ > λᵢ (0 when none). The first that many steps are the outliers. */
  outlierCount: number;
}

/**
 * Generalized extreme studentized deviate test for up to r outliers (Rosner 1983, Technometrics 25,
 * 165–172; NIST/SEMATECH e-Handbook §1.3.5.17.3). Removes the most extreme value r times, recording
 * Rᵢ = max|x − x̄|/s of what remains and λᵢ = (n − i)·t / √((n − i − 1 + t²)(n − i + 1)),
 * t = t(1 − α/(2(n − i + 1)), n − i − 1); the number of outliers is the largest i with Rᵢ > λᵢ. Unlike
 * iterative Grubbs, a second outlier that masks the first (two late drops together) is still found,
 * because a step that is not significant does not end the sequence.
 */
export function generalizedEsd(values: readonly number[], options: GeneralizedEsdOptions = {}): GeneralizedEsdResult {
  if (values.length < Math.max(3, options.minimumSize ?? 3)) return { steps: [], outlierCount: 0 };
  return generalizedEsdOfSorted(values, sortedCopy(values), options);
}

/** {@link generalizedEsd} for a caller that already holds the values sorted ascending. Not part of the public exports. */
export function generalizedEsdOfSorted(
  values: ArrayLike<number>,
  sorted: ArrayLike<number>,
  options: GeneralizedEsdOptions = {},
): GeneralizedEsdResult {
  const steps = studentizedDeviateSteps(values, sorted, {
    alpha: options.alpha ?? 0.05,
    maxSteps: options.maxOutliers ?? 1,
    minimumSize: options.minimumSize ?? 3,
    resolution: options.resolution ?? 0,
    untilNotSignificant: false,
  });
  let outlierCount = 0;
  for (let i = 0; i < steps.length; i++) if (steps[i].statistic > steps[i].critical) outlierCount = i + 1;
  return { steps, outlierCount };
}
