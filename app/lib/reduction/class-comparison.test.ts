import { describe, expect, it } from "vitest";
import { classComparison, normalisedFigure } from "./class-comparison";
import { ReductionInputError } from "./errors";
import { reduceFallingSphere } from "./falling-sphere";

// 37 figures spread evenly (in log space) within ±6 % of 1, plus one planted 31 % high.
const CLASS = Array.from({ length: 37 }, (_, i) => ({ id: `s${i}`, figure: Math.exp(((i - 18) / 18) * 0.06) }));

describe("classComparison — Grubbs", () => {
  it("labels a planted high figure an outlier and says why", () => {
    const [outlier, ...rest] = classComparison([{ id: "late", figure: 1.31 }, ...CLASS], {
      method: "grubbs",
      quantity: "viscosity",
    });
    expect(outlier.label).toBe("outlier");
    expect(outlier.reason).toMatch(/^viscosity 31 % above the class median; Grubbs G = [\d.]+ > [\d.]+ at α = 0\.05, n = 38$/);
    expect(rest.every((entry) => entry.label === "consistent")).toBe(true);
  });

  it("labels a figure flagged beyond the removal budget suspect", () => {
    const results = classComparison([{ id: "a", figure: 1.5 }, { id: "b", figure: 0.6 }, ...CLASS], {
      method: "grubbs",
      maxOutliers: 1,
    });
    expect(results.slice(0, 2).map((entry) => entry.label).sort()).toEqual(["outlier", "suspect"]);
  });

  it("calls everything consistent in a class too small to compare", () => {
    const results = classComparison([{ id: "a", figure: 1 }, { id: "b", figure: 9 }], { method: "grubbs" });
    expect(results.map((entry) => entry.label)).toEqual(["consistent", "consistent"]);
  });
});

describe("classComparison — Tukey", () => {
  // ln figures of CLASS run evenly from −0.06 to 0.06 (37 values, step 1/300):
  // type-7 Q1 at h = 36·0.25 = 9 → −0.06 + 9/300 = −0.03; Q3 = +0.03; IQR = 0.06.
  // Inner fences ln = ±(0.03 + 1.5·0.06) = ±0.12; outer ±(0.03 + 3·0.06) = ±0.21.
  // Adding two figures moves the quartiles slightly; e^0.15 = 1.16 and e^0.30 = 1.35 stay clear of both.
  it("labels a figure beyond the inner fence suspect and beyond the outer fence outlier", () => {
    const results = classComparison([{ id: "mid", figure: 1.16 }, { id: "far", figure: 1.35 }, ...CLASS], { method: "iqr" });
    expect(results[0].label).toBe("suspect");
    expect(results[1].label).toBe("outlier");
    expect(results[1].reason).toMatch(/above the upper fence .* \(Q3 \+ 3·IQR of ln figure, type-7 quartiles, n = 39\)/);
    expect(results.slice(2).every((entry) => entry.label === "consistent")).toBe(true);
  });

  it("is symmetric in log space: half the median is as far as twice it", () => {
    const results = classComparison([{ id: "low", figure: 0.74 }, { id: "high", figure: 1.35 }, ...CLASS], { method: "iqr" });
    expect(results[0].label).toBe(results[1].label);
  });
});

describe("classComparison — input", () => {
  it("refuses figures that are not positive", () => {
    expect(() => classComparison([{ id: "a", figure: 0 }, { id: "b", figure: Number.NaN }], { method: "iqr" })).toThrow(
      ReductionInputError,
    );
  });
});

describe("normalisedFigure", () => {
  it("is measured/reference viscosity in viscometry and C_D/C_D,ref in drag mode", () => {
    const base = {
      sphere: { diameter: 2e-3, mass: 32.7e-6 },
      column: { timedDistance: 0.2, runIn: 0.05 },
      drops: [20.1, 19.8, 20.3, 20.0],
    };
    const viscometry = reduceFallingSphere({ ...base, mode: "viscometry", fluid: { density: 1260 } });
    if (viscometry.mode !== "viscometry") throw new Error("mode");
    expect(normalisedFigure(viscometry, { referenceViscosity: viscometry.viscosity / 1.1 })).toBeCloseTo(1.1, 12);
    expect(() => normalisedFigure(viscometry)).toThrow(ReductionInputError);
    const drag = reduceFallingSphere({ ...base, mode: "drag", fluid: { density: 1260, viscosity: 1.2 } });
    if (drag.mode !== "drag") throw new Error("mode");
    expect(normalisedFigure(drag)).toBeCloseTo(1 + drag.deviation, 12);
  });
});
