import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { fitFluidViscosity, viscosityAt, viscosityTemperatureCoefficient } from "./viscosity-model";

// Water, mPa·s, from the Engineers Edge table "Water — Density Viscosity Specific Weight" (which matches the
// CRC Handbook figures 1.002 at 20 °C, 0.653 at 40 °C, 0.467 at 60 °C, 0.355 at 80 °C).
const WATER = [
  [10, 1.308],
  [20, 1.002],
  [30, 0.7978],
  [40, 0.6531],
  [50, 0.5471],
  [60, 0.4658],
  [70, 0.4044],
  [80, 0.355],
].map(([temperature, milliPascalSeconds]) => ({ temperature, viscosity: milliPascalSeconds / 1000 }));

// Pure glycerol, Pa·s: 20 °C 1.412 (CRC value, quoted in a public worked example, wyzant.com answer 929424,
// and in a public glycerin property class); 25 °C 0.934 (same property class); 30 °C 0.612 and
// 40 °C 0.284 (Segur & Oberstar 1951, Ind. Eng. Chem. 43, 2117 — from memory).
const GLYCEROL = [
  [20, 1.412],
  [25, 0.934],
  [30, 0.612],
  [40, 0.284],
].map(([temperature, viscosity]) => ({ temperature, viscosity }));

describe("fitFluidViscosity", () => {
  it("fits water from 10 to 80 °C to within 4 % (the Andrade form cannot follow water's curvature better)", () => {
    const fit = fitFluidViscosity(WATER);
    expect(fit.kind).toBe("andrade");
    for (const point of WATER) {
      expect(Math.abs(viscosityAt(fit, point.temperature) / point.viscosity - 1)).toBeLessThan(0.04);
    }
    expect(fit.maxRelativeResidual).toBeGreaterThan(0.03); // honest: it is not a 1 % model over this range
  });

  it("fits pure glycerol from 20 to 40 °C to within 1 %", () => {
    const fit = fitFluidViscosity(GLYCEROL);
    for (const point of GLYCEROL) {
      expect(Math.abs(viscosityAt(fit, point.temperature) / point.viscosity - 1)).toBeLessThan(0.01);
    }
    // Glycerol changes by several per cent per kelvin near room temperature (product brief): here about −8 %/K.
    expect(viscosityTemperatureCoefficient(fit, 22)).toBeLessThan(-0.07);
  });

  it("recovers an exact Andrade law", () => {
    const points = [5, 15, 35].map((temperature) => ({
      temperature,
      viscosity: Math.exp(-10 + 2500 / (temperature + 273.15)),
    }));
    const fit = fitFluidViscosity(points);
    expect(fit.a).toBeCloseTo(-10, 9);
    expect(fit.b).toBeCloseTo(2500, 6);
    expect(fit.maxRelativeResidual).toBeLessThan(1e-12);
  });

  it("falls back to a constant with a warning for one point", () => {
    const fit = fitFluidViscosity([{ temperature: 21, viscosity: 0.9 }]);
    expect(fit.kind).toBe("constant");
    expect(fit.warning).toMatch(/constant/);
    expect(viscosityAt(fit, 30)).toBeCloseTo(0.9, 12);
  });

  it("lists every bad point", () => {
    try {
      fitFluidViscosity([
        { temperature: Number.NaN, viscosity: 1 },
        { temperature: 20, viscosity: -1 },
      ]);
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ReductionInputError);
      expect((error as ReductionInputError).issues.map((issue) => issue.path)).toEqual(["points.0.temperature", "points.1.viscosity"]);
    }
  });
});
