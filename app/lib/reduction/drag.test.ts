import { describe, expect, it } from "vitest";
import { DRAG_MODEL_RANGES, referenceDragCoefficient, referenceDragLogSlope } from "./drag";

/**
 * The standard drag curve of a smooth sphere, Clift, Grace & Weber (1978) "Bubbles, Drops, and
 * Particles" Table 5.2 (correlations as transcribed in CalebBell/fluids drag.py and pychemqt
 * lib/drag.py), evaluated by hand with w = log10 Re:
 *   Re = 0.1:  24/Re (1 + 0.1315 Re^(0.82 − 0.05w)) = 240 (1 + 0.1315 · 0.1^0.87) = 244.26
 *   Re = 1:    24 (1 + 0.1315) = 27.156
 *   Re = 5:    4.8 (1 + 0.1315 · 5^0.78505) = 4.8 · 1.46521 = 7.033
 *   Re = 10:   2.4 (1 + 0.1315 · 10^0.77) = 2.4 · 1.774330 = 4.2584
 *   Re = 100:  24/Re (1 + 0.1935 Re^0.6305) = 0.24 (1 + 0.1935 · 18.2390) = 1.0870
 *   Re = 500:  log10 C_D = 1.6435 − 1.1242w + 0.1558w² = −0.25576 → 0.5549
 *   Re = 800:  the same with w = 2.90309 → −0.30708 → 0.4930
 */
const STANDARD_CURVE: Record<number, number> = { 0.1: 244.26, 1: 27.156, 5: 7.033, 10: 4.2584, 100: 1.087, 500: 0.5549, 800: 0.493 };
const deviation = (reynolds: number, model: "stokes" | "oseen" | "schiller-naumann") =>
  referenceDragCoefficient(reynolds, model) / STANDARD_CURVE[reynolds] - 1;

describe("referenceDragCoefficient against the standard drag curve", () => {
  // Schiller–Naumann is quoted to lie within about −4 %…+5 % of that curve below Re ≈ 800
  // (Clift, Grace & Weber 1978, Table 5.1 — from memory); allow 5 %.
  it.each([0.1, 1, 10, 100, 500, 800])("Schiller–Naumann at Re = %s is within 5 per cent of it", (reynolds) => {
    expect(Math.abs(deviation(reynolds, "schiller-naumann"))).toBeLessThan(0.05);
  });

  it("Stokes' law is 1.7 % low at Re = 0.1 and 12 % low at Re = 1, the ends of its note and warning range", () => {
    expect(deviation(0.1, "stokes")).toBeCloseTo(-0.017, 3);
    expect(deviation(1, "stokes")).toBeCloseTo(-0.116, 3);
    expect(DRAG_MODEL_RANGES.stokes).toMatchObject({ infoAbove: 0.1, warnAbove: 1 });
  });

  it("Oseen's law tracks the curve to 0.2 % at Re = 0.1 and 5 % at Re = 1, and is 32 % high by Re = 5", () => {
    expect(Math.abs(deviation(0.1, "oseen"))).toBeLessThan(0.002);
    expect(Math.abs(deviation(1, "oseen"))).toBeLessThan(0.05);
    expect(deviation(5, "oseen")).toBeGreaterThan(0.3);
    expect(DRAG_MODEL_RANGES.oseen).toMatchObject({ infoAbove: 1, warnAbove: 5 });
  });
});

describe("referenceDragLogSlope", () => {
  // An independent route to d ln C_D/d ln Re: a central difference of the coefficient itself.
  it.each([
    [0.3, "stokes"],
    [0.3, "oseen"],
    [2, "oseen"],
    [0.3, "schiller-naumann"],
    [150, "schiller-naumann"],
  ] as const)("at Re = %s (%s) matches a central difference of ln C_D in ln Re", (reynolds, model) => {
    const h = 1e-5;
    const numeric =
      (Math.log(referenceDragCoefficient(reynolds * Math.exp(h), model)) -
        Math.log(referenceDragCoefficient(reynolds * Math.exp(-h), model))) /
      (2 * h);
    expect(referenceDragLogSlope(reynolds, model)).toBeCloseTo(numeric, 8);
  });
});
