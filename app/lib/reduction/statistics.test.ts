import { describe, expect, it } from "vitest";
import { describeDrops, studentTQuantile } from "./statistics";

describe("studentTQuantile", () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7.2, upper critical values of Student's t, column 0.025.
  it.each([
    [1, 12.706],
    [2, 4.303],
    [10, 2.228],
    [30, 2.042],
    [100, 1.984],
  ])("t(0.975, %i) = %f (NIST e-Handbook table 1.3.6.7.2)", (degreesOfFreedom, tabulated) => {
    expect(studentTQuantile(0.975, degreesOfFreedom)).toBeCloseTo(tabulated, 3);
  });
});

describe("describeDrops", () => {
  it("gives the hand-computed mean, s, s/√n and 95 % interval", () => {
    // Times 10, 11, 12: mean 11; s² = (1 + 0 + 1)/2 = 1; s/√3 = 0.57735; t(0.975, 2) = 4.303 (NIST table)
    // → half-width 2.4843.
    const stats = describeDrops([10, 11, 12]);
    expect(stats.n).toBe(3);
    expect(stats.mean).toBe(11);
    expect(stats.sd).toBeCloseTo(1, 12);
    expect(stats.se).toBeCloseTo(0.57735, 5);
    expect(stats.ci95?.[0]).toBeCloseTo(11 - 2.4843, 3);
    expect(stats.ci95?.[1]).toBeCloseTo(11 + 2.4843, 3);
  });

  it("leaves the scatter undefined for a single drop instead of returning NaN", () => {
    expect(describeDrops([4.2])).toEqual({ n: 1, mean: 4.2, sd: null, se: null, ci95: null });
  });

  it("skips the excluded drops", () => {
    expect(describeDrops([10, 11, 12, 40], Uint8Array.from([0, 0, 0, 1])).mean).toBe(11);
  });
});
