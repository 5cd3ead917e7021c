import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { grubbsCriticalValue, grubbsIterative, grubbsIterativeSteps, grubbsTest } from "./grubbs";

// NIST/SEMATECH e-Handbook §1.3.5.17.1: Tietjen & Moore's eight mass-spectrometer measurements on a uranium isotope.
const URANIUM_ISOTOPE = [199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57];

describe("grubbsCriticalValue", () => {
  // Two-sided, α = 0.05: Grubbs (1969) Technometrics 11, 1–21, as tabulated in haniibrahim/octave-samplestat
  // grubbs_crit.m (4 decimals); the same figures follow from the NIST e-Handbook §1.3.5.17.1 formula.
  it.each([
    [3, 1.1543],
    [5, 1.715],
    [8, 2.1266],
    [10, 2.29],
    [12, 2.4116],
    [20, 2.7082],
    [30, 2.9085],
    [50, 3.1282],
    [100, 3.3841],
  ])("n = %i → %f (Grubbs 1969 table)", (n, tabulated) => {
    expect(grubbsCriticalValue(n, 0.05, 2)).toBeCloseTo(tabulated, 4);
  });

  it("gives the NIST e-Handbook §1.3.5.17.1 one-sided critical value 2.032 for n = 8", () => {
    expect(grubbsCriticalValue(8, 0.05, 1)).toBeCloseTo(2.032, 3);
  });

  it("needs at least three values", () => {
    expect(() => grubbsCriticalValue(2)).toThrow(ReductionInputError);
  });
});

describe("grubbsTest", () => {
  it("reproduces the NIST e-Handbook §1.3.5.17.1 example: G = 2.4687, 245.57 is an outlier", () => {
    // The handbook prints 2.4687; the exact value is 2.468765, so compare to 4 decimals of that.
    const result = grubbsTest(URANIUM_ISOTOPE, { sides: 1, tail: "upper" });
    expect(result.statistic).toBeCloseTo(2.4687, 3);
    expect(result.critical).toBeCloseTo(2.032, 3);
    expect(result.index).toBe(7);
    expect(result.isOutlier).toBe(true);
  });

  it("tests the low tail when asked", () => {
    const result = grubbsTest(URANIUM_ISOTOPE, { sides: 1, tail: "lower" });
    expect(result.index).toBe(0);
    expect(result.isOutlier).toBe(false);
  });

  it("never flags anything in a set of identical values", () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.integer({ min: 3, max: 60 }), (value, n) => {
        const values = new Array<number>(n).fill(value);
        const single = grubbsTest(values);
        expect(single.isOutlier).toBe(false);
        expect(single.statistic).toBe(0);
        expect(grubbsIterative(values)).toEqual([]);
      }),
    );
  });
});

describe("grubbsIterative", () => {
  it("removes the NIST example's outlier and stops", () => {
    expect(grubbsIterative(URANIUM_ISOTOPE)).toEqual([7]);
  });

  it("removes two planted outliers in order, most extreme first, and honours maxOutliers", () => {
    const values = [10.1, 9.9, 10.0, 10.2, 9.8, 10.05, 9.95, 10.1, 9.9, 10.0, 14.0, 6.5];
    // 14.0 lies 4.0 from the mean of 9.96, 6.5 lies 3.5 from it: 14.0 goes first.
    expect(grubbsIterative(values)).toEqual([10, 11]);
    expect(grubbsIterative(values, { maxOutliers: 1 })).toEqual([10]);
  });

  it("agrees with repeated single tests (it is the same procedure, computed faster)", () => {
    // Readings to 0.001 between 0 and 100: measurement-like values, not subnormal floats.
    const reading = fc.integer({ min: 0, max: 100_000 }).map((count) => count / 1000);
    fc.assert(
      fc.property(fc.array(reading, { minLength: 3, maxLength: 40 }), (values) => {
        const steps = grubbsIterativeSteps(values);
        const remaining = values.map((value, index) => ({ value, index }));
        for (const step of steps) {
          const single = grubbsTest(remaining.map((entry) => entry.value));
          expect(single.isOutlier).toBe(true);
          expect(single.statistic).toBeCloseTo(step.statistic, 6);
          expect(remaining[single.index].index).toBe(step.index);
          remaining.splice(single.index, 1);
        }
        if (remaining.length >= 3) expect(grubbsTest(remaining.map((entry) => entry.value)).isOutlier).toBe(false);
      }),
    );
  });
});
