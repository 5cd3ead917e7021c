import type { ReductionCheck } from "./falling-sphere";
import { format } from "./format";
import { generalizedEsd } from "./generalized-esd";
import type { StudentizedDeviateStep } from "./grubbs";
import { counted } from "../plural";

/**
 * Fewest drops the stray-drop test is made on. The NIST/SEMATECH e-Handbook §1.3.5.17.1 warns that
 * Grubbs' test "should not be used for sample sizes of six or less since it frequently tags most of the
 * points as outliers"; the generalized ESD test is Grubbs' test repeated, so the same limit applies,
 * and no set of six or fewer is ever tested (the number of candidates is capped at n − 6).
 */
export const MINIMUM_DROPS_FOR_STRAY_TEST = 7;

/**
 * From this many drops the generalized ESD test is run at α itself. The NIST/SEMATECH e-Handbook
 * §1.3.5.17.3 reports Rosner's approximation of λᵢ as very accurate from n = 25 only; below it, with
 * r ≥ 2, the test flags more clean logs than α (our Monte Carlo: 0.069 at n = 10, r = 2), so each λᵢ is
 * taken at α/r instead (Bonferroni), which keeps the size at or below α whatever r is.
 */
export const ROSNER_ACCURATE_FROM = 25;

/** Common practice for a hand-held stopwatch: times read to 0.01 s. */
export const DEFAULT_TIME_RESOLUTION_S = 0.01;

export interface StrayDropOptions {
  alpha?: number;
  /** Upper bound r of the generalized ESD test; ⌊n/5⌋ (at least 1) by default. */
  maxStrayDrops?: number;
  /** Reading resolution of the times (s); a drop within it of the mean of the rest is never stray. */
  timeResolution?: number;
}

export interface StrayDropFinding {
  /** Indices of the stray drops, in order of removal. */
  strayDrops: number[];
  /** The steps of the stray drops (Rᵢ, λᵢ, n), for the report. */
  steps: StudentizedDeviateStep[];
  /** The info note (test not made) or the warning (stray drops found); null when the test found nothing. */
  check: ReductionCheck | null;
}

/**
 * Stray drops of one log: the generalized ESD test (Rosner 1983; NIST/SEMATECH e-Handbook §1.3.5.17.3)
 * at α with at most r candidates (λ at α/r below 25 drops), only from seven drops on, and never a drop whose deviation from the
 * mean of the others is within the timing resolution (readings rounded to 0.01 s that differ by one
 * step are equal as far as the stopwatch can tell).
 */
export function findStrayDrops(times: readonly number[], options: StrayDropOptions = {}): StrayDropFinding {
  const n = times.length;
  const alpha = options.alpha ?? 0.05;
  const resolution = options.timeResolution ?? DEFAULT_TIME_RESOLUTION_S;
  if (n < MINIMUM_DROPS_FOR_STRAY_TEST) {
    return {
      strayDrops: [],
      steps: [],
      check: {
        code: "stray-drop-test-not-applicable",
        level: "info",
        message: `No stray-drop test with ${counted(n, "drop", "drops")}: the test needs at least ${MINIMUM_DROPS_FOR_STRAY_TEST}, because Grubbs-type tests tag too many points at six or fewer (NIST/SEMATECH e-Handbook §1.3.5.17.1). Look over the drop times yourself.`,
      },
    };
  }
  const maxStrayDrops = Math.min(options.maxStrayDrops ?? Math.max(1, Math.floor(n / 5)), n - MINIMUM_DROPS_FOR_STRAY_TEST + 1);
  const stepAlpha = n < ROSNER_ACCURATE_FROM ? alpha / maxStrayDrops : alpha;
  const { steps, outlierCount } = generalizedEsd(times, {
    alpha: stepAlpha,
    maxOutliers: maxStrayDrops,
    resolution,
    minimumSize: MINIMUM_DROPS_FOR_STRAY_TEST,
  });
  if (outlierCount === 0) return { strayDrops: [], steps: [], check: null };
  const stray = steps.slice(0, outlierCount);
  const deciding = stray[outlierCount - 1];
  let listed = "";
  for (const step of stray) {
    if (listed !== "") listed += ", ";
    listed += `drop ${step.index + 1} (${format(times[step.index])} s)`;
  }
  return {
    strayDrops: stray.map((step) => step.index),
    steps: stray,
    check: {
      code: "stray-drops",
      level: "warn",
      message: `The generalized ESD test (Rosner 1983) at α = ${alpha}${stepAlpha === alpha ? "" : ` (λ at α/${maxStrayDrops} below ${ROSNER_ACCURATE_FROM} drops)`}, up to ${counted(maxStrayDrops, "stray drop", "stray drops")}, flags ${listed}: R${outlierCount} = ${format(deciding.statistic)} > λ${outlierCount} = ${format(deciding.critical)} (n = ${deciding.n}). Deviations within the timing resolution (${format(resolution)} s) are never flagged. Results are given with all drops and without the stray ones.`,
    },
  };
}
