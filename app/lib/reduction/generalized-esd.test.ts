import { describe, expect, it } from "vitest";
import { generalizedEsd } from "./generalized-esd";
import { grubbsIterative } from "./grubbs";

// NIST/SEMATECH e-Handbook §1.3.5.17.3, the generalized ESD example: Rosner's (1983) 54 values, tested for up
// to 10 outliers at α = 0.05. The values and the handbook's R_i and λ_i were transcribed here and cross-checked
// against the independent transcription in jduguid/code_samples (python/tests/rosner_data.csv and esd_unit_tests.py).
const ROSNER = [
  -0.25, 0.68, 0.94, 1.15, 1.2, 1.26, 1.26, 1.34, 1.38, 1.43, 1.49, 1.49, 1.55, 1.56, 1.58, 1.65, 1.69, 1.7, 1.76, 1.77, 1.81, 1.91, 1.94,
  1.96, 1.99, 2.06, 2.09, 2.1, 2.14, 2.15, 2.23, 2.24, 2.26, 2.35, 2.37, 2.4, 2.47, 2.54, 2.62, 2.64, 2.9, 2.92, 2.92, 2.93, 3.21, 3.26,
  3.3, 3.59, 3.68, 4.3, 4.64, 5.34, 5.42, 6.01,
];
const ROSNER_R = [3.118, 2.942, 3.179, 2.81, 2.815, 2.848, 2.279, 2.31, 2.101, 2.067];
const ROSNER_LAMBDA = [3.158, 3.151, 3.143, 3.136, 3.128, 3.12, 3.111, 3.103, 3.094, 3.085];

describe("generalizedEsd", () => {
  it("reproduces the NIST e-Handbook §1.3.5.17.3 example: R_i and λ_i to the printed 3 decimals, 3 outliers", () => {
    expect(ROSNER).toHaveLength(54);
    const result = generalizedEsd(ROSNER, { alpha: 0.05, maxOutliers: 10 });
    // The handbook cuts its figures to 3 decimals rather than rounding them (R₁ = 3.1189 is printed 3.118).
    const cut = (value: number) => Math.trunc(value * 1000) / 1000;
    expect(result.steps.map((step) => cut(step.statistic))).toEqual(ROSNER_R);
    expect(result.steps.map((step) => cut(step.critical))).toEqual(ROSNER_LAMBDA);
    expect(result.outlierCount).toBe(3);
    // The three largest values, 6.01, 5.42, 5.34, in that order (R₁ < λ₁ but R₃ > λ₃: masking undone).
    expect(result.steps.slice(0, 3).map((step) => ROSNER[step.index])).toEqual([6.01, 5.42, 5.34]);
    // Iterative Grubbs stops at the first step (R₁ = 3.118 < 3.158) and finds nothing: the masking ESD avoids.
    expect(grubbsIterative(ROSNER)).toEqual([]);
  });

  // The issue's masking example. λ₂ is Grubbs' two-sided critical value for n = 11 at α = 0.05, 2.355
  // (Grubbs 1969 table; NIST §1.3.5.17.3 formula with i = 2). R₂ by hand: without 6.20, the mean of the
  // other 11 is 56.12/11 = 5.1018 and s = 0.3314, so R₂ = (6.10 − 5.1018)/0.3314 = 3.01.
  it("flags both late drops of the masking example: R₂ = 3.01 > λ₂ = 2.36 (Rosner 1983)", () => {
    const values = [5.02, 4.98, 5.01, 4.99, 5.0, 5.03, 4.97, 5.02, 4.99, 5.01, 6.1, 6.2];
    const result = generalizedEsd(values, { maxOutliers: 2 });
    expect(result.outlierCount).toBe(2);
    expect(result.steps.map((step) => step.index)).toEqual([11, 10]);
    expect(result.steps[1].statistic).toBeCloseTo(3.01, 2);
    expect(result.steps[1].critical).toBeCloseTo(2.355, 3);
    expect(result.steps[0].statistic).toBeLessThan(result.steps[0].critical);
  });

  it("keeps its precision next to a huge value: 11 values of 10 ± 0.02, 10.5 and 1e8 lose both (common practice)", () => {
    const values = [10, 10.02, 9.98, 10.01, 9.99, 10, 10.02, 9.98, 10.01, 9.99, 10, 10.5, 1e8];
    const result = generalizedEsd(values, { maxOutliers: 3 });
    expect(result.steps.slice(0, result.outlierCount).map((step) => step.index)).toEqual([12, 11]);
    expect(grubbsIterative(values)).toEqual([12, 11]);
  });

  it("never removes a value within the resolution of the mean of the rest", () => {
    // Nine 6.62 s and one 6.63 s (the tie case): G would be (n − 1)/√n = 2.85 > 2.29, yet the stopwatch cannot tell them apart.
    const values = [...new Array<number>(9).fill(6.62), 6.63];
    expect(generalizedEsd(values, { resolution: 0.01 }).outlierCount).toBe(0);
    expect(generalizedEsd(values).outlierCount).toBe(1);
  });
});
