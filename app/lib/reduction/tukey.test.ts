import { describe, expect, it } from "vitest";
import { quantileType7, tukeyFences } from "./tukey";

describe("tukeyFences", () => {
  it("matches a hand calculation with type-7 quartiles", () => {
    // Sorted: 1 2 3 4 5 6 7 8 9 30 (n = 10).
    // Q1: h = 9 × 0.25 = 2.25 → x[2] + 0.25(x[3] − x[2]) = 3 + 0.25 = 3.25
    // Q3: h = 9 × 0.75 = 6.75 → x[6] + 0.75(x[7] − x[6]) = 7 + 0.75 = 7.75
    // IQR = 4.5; fences 3.25 − 6.75 = −3.5 and 7.75 + 6.75 = 14.5 → only 30 is outside.
    // (R: quantile(c(1:9, 30), c(.25, .75)) gives the same 3.25 and 7.75 with its default type 7.)
    const fences = tukeyFences([7, 30, 1, 9, 2, 8, 3, 6, 4, 5]);
    expect(fences).toEqual({ q1: 3.25, q3: 7.75, iqr: 4.5, lower: -3.5, upper: 14.5, outliers: [1] });
  });

  it("widens with k", () => {
    // k = 6: fences 3.25 − 27 = −23.75 and 7.75 + 27 = 34.75, so 30 is inside.
    expect(tukeyFences([7, 30, 1, 9, 2, 8, 3, 6, 4, 5], { k: 6 }).outliers).toEqual([]);
  });

  it("interpolates the median of an even count halfway", () => {
    expect(quantileType7([1, 2, 3, 4], 0.5)).toBe(2.5);
  });
});
