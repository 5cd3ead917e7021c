import { describe, expect, it } from "vitest";
import { classComparison, normalisedFigure } from "./class-comparison";
import { ReductionInputError } from "./errors";
import { reduceFallingSphere } from "./falling-sphere";

// 37 figures spread evenly (in log space) within ±6 % of 1, plus one planted 31 % high.
const CLASS = Array.from({ length: 37 }, (_, i) => ({ id: `s${i}`, figure: Math.exp(((i - 18) / 18) * 0.06) }));

// NIST/SEMATECH e-Handbook §1.3.5.17.3: Rosner's 54 values (see generalized-esd.test.ts). As figures e^x, the
// comparison's ln(figure) is the published data itself, so the handbook's R_i and λ_i apply unchanged.
const ROSNER = [
  -0.25, 0.68, 0.94, 1.15, 1.2, 1.26, 1.26, 1.34, 1.38, 1.43, 1.49, 1.49, 1.55, 1.56, 1.58, 1.65, 1.69, 1.7, 1.76, 1.77, 1.81, 1.91, 1.94,
  1.96, 1.99, 2.06, 2.09, 2.1, 2.14, 2.15, 2.23, 2.24, 2.26, 2.35, 2.37, 2.4, 2.47, 2.54, 2.62, 2.64, 2.9, 2.92, 2.92, 2.93, 3.21, 3.26,
  3.3, 3.59, 3.68, 4.3, 4.64, 5.34, 5.42, 6.01,
].map((value, i) => ({ id: `r${i}`, figure: Math.exp(value) }));

describe("classComparison — Grubbs", () => {
  it("labels a planted high figure an outlier and says why", () => {
    const [outlier, ...rest] = classComparison([{ id: "late", figure: 1.31 }, ...CLASS], {
      method: "grubbs",
      quantity: "viscosity",
    });
    expect(outlier.label).toBe("outlier");
    // G_crit(38, α = 0.05) = 3.01 by the NIST §1.3.5.17.1 formula, between Grubbs' (1969) tabulated 2.9085 (n = 30)
    // and 3.1282 (n = 50) that grubbs.test.ts checks. By hand, ln 1.31 = 0.270 lies about 4.9 s from the mean.
    expect(outlier.reason).toMatch(/^viscosity 31 % above the class median; Grubbs G = 4\.\d+ > 3\.01 at α = 0\.05, n = 38$/);
    expect(rest.every((entry) => entry.label === "consistent")).toBe(true);
  });

  it("is masked on Rosner's data where the ESD test is not (NIST §1.3.5.17.3: R₁ = 3.118 < λ₁ = 3.158)", () => {
    const results = classComparison(ROSNER, { method: "grubbs", maxOutliers: 10 });
    expect(results.filter((entry) => entry.label === "outlier")).toEqual([]);
  });

  it("labels nothing in a class of six, where Grubbs' test is not used (NIST §1.3.5.17.1)", () => {
    const six = [1, 1.01, 0.99, 1.0, 1.02, 1.6].map((figure, i) => ({ id: `s${i}`, figure }));
    const results = classComparison(six, { method: "grubbs" });
    expect(results.every((entry) => entry.label === "consistent")).toBe(true);
    expect(results[5].reason).toMatch(/too few hand-ins to compare \(n = 6, at least 7\)$/);
  });

  it("labels a figure flagged beyond the removal budget suspect", () => {
    const results = classComparison([{ id: "a", figure: 1.5 }, { id: "b", figure: 0.6 }, ...CLASS], {
      method: "grubbs",
      maxOutliers: 1,
    });
    expect(
      results
        .slice(0, 2)
        .map((entry) => entry.label)
        .sort(),
    ).toEqual(["outlier", "suspect"]);
  });

  it("calls everything consistent in a class too small to compare", () => {
    const results = classComparison(
      [
        { id: "a", figure: 1 },
        { id: "b", figure: 9 },
      ],
      { method: "grubbs" },
    );
    expect(results.map((entry) => entry.label)).toEqual(["consistent", "consistent"]);
  });
});

describe("classComparison — generalized ESD", () => {
  it("labels the three outliers of the NIST e-Handbook §1.3.5.17.3 example (Rosner 1983) and quotes R₃ > λ₃", () => {
    const results = classComparison(ROSNER, { method: "esd", maxOutliers: 10, quantity: "viscosity" });
    const outliers = results.filter((entry) => entry.label === "outlier").map((entry) => entry.id);
    expect(outliers.sort()).toEqual(["r51", "r52", "r53"]);
    expect(results[53].reason).toMatch(/generalized ESD: removal 1 of 3 \(R1 = 3\.12\), R3 = 3\.18 > λ3 = 3\.14 at α = 0\.05, n = 54$/);
  });

  it("finds both figures of a masked pair that Grubbs' test misses (the issue's masking example as figures)", () => {
    const masked = [5.02, 4.98, 5.01, 4.99, 5.0, 5.03, 4.97, 5.02, 4.99, 5.01, 6.1, 6.2].map((value, i) => ({
      id: `m${i}`,
      figure: Math.exp(value),
    }));
    const esd = classComparison(masked, { method: "esd", maxOutliers: 2 });
    expect(esd.slice(10).map((entry) => entry.label)).toEqual(["outlier", "outlier"]);
    expect(esd.slice(0, 10).every((entry) => entry.label === "consistent")).toBe(true);
    const grubbs = classComparison(masked, { method: "grubbs", maxOutliers: 2 });
    expect(grubbs.slice(10).some((entry) => entry.label === "outlier")).toBe(false);
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
    expect(() =>
      classComparison(
        [
          { id: "a", figure: 0 },
          { id: "b", figure: Number.NaN },
        ],
        { method: "iqr" },
      ),
    ).toThrow(ReductionInputError);
  });
});

describe("normalisedFigure", () => {
  // Worked example, wyzant.com answer 929424 (as in falling-sphere.test.ts): a 205 mg sphere of radius
  // 1.85 mm settling at 3.9 cm/s in glycerol of 1260 kg/m³ gives η = 1.237246 Pa·s (Stokes).
  const example = {
    sphere: { diameter: 3.7e-3, mass: 205e-6 },
    column: { timedDistance: 0.39, runIn: 0.1 },
    drops: [10, 10, 10, 10, 10],
    wallCorrection: "none" as const,
  };

  it("in viscometry is the example's η over a handbook μ_ref: 1.237246/1.412 (glycerol at 20 °C, CRC) = 0.87624", () => {
    const viscometry = reduceFallingSphere({ ...example, mode: "viscometry", fluid: { density: 1260 } });
    expect(normalisedFigure(viscometry, { referenceViscosity: 1.412 })).toBeCloseTo(0.87624, 5);
    expect(() => normalisedFigure(viscometry)).toThrow(ReductionInputError);
  });

  it("in drag mode is 1 against Stokes' law at the example's own viscosity, which it was worked out with", () => {
    const drag = reduceFallingSphere({ ...example, mode: "drag", fluid: { density: 1260, viscosity: 1.237246215 }, dragModel: "stokes" });
    expect(normalisedFigure(drag)).toBeCloseTo(1, 8);
  });

  it("reads the results without stray drops when asked, and all drops when none was flagged", () => {
    const drops = [10, 10.02, 9.98, 10.01, 9.99, 10, 10.02, 11.5];
    const drag = reduceFallingSphere({
      ...example,
      drops,
      mode: "drag",
      fluid: { density: 1260, viscosity: 1.237246215 },
      dragModel: "stokes",
    });
    if (drag.mode !== "drag" || !drag.withoutStrayDrops) throw new Error("expected a stray drop");
    const kept = drag.withoutStrayDrops;
    expect(normalisedFigure(drag, { withoutStrayDrops: true })).toBe(kept.dragCoefficient / kept.referenceDragCoefficient);
    expect(normalisedFigure(drag, { withoutStrayDrops: true })).not.toBe(normalisedFigure(drag));
  });
});
