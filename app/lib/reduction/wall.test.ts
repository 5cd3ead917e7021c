import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { CREEPING_FLOW_WALL_TOLERANCE, diFeliceWallFactor, inertialWallShift, resolveWallCorrection, wallFactor } from "./wall";

/**
 * The creeping-flow velocity ratio of a sphere on the axis of a cylinder to higher order in λ, from
 * Bohlin (1960), Trans. Roy. Inst. Technol. Stockholm 155, as quoted in the wall-effect literature
 * (coefficients from memory): K = 1 − 2.10443λ + 2.08877λ³ − 0.94813λ⁵ − 1.372λ⁶ + 3.87λ⁸ − 4.19λ¹⁰,
 * usually trusted to λ ≈ 0.6. It is an independent published solution, not the coefficients the code
 * transcribes: a slip in any of Faxén's or Haberman–Sayre's coefficients moves them off it.
 */
function bohlin(λ: number): number {
  return 1 - 2.10443 * λ + 2.08877 * λ ** 3 - 0.94813 * λ ** 5 - 1.372 * λ ** 6 + 3.87 * λ ** 8 - 4.19 * λ ** 10;
}

const relativeGap = (a: number, b: number) => Math.abs(a / b - 1);

describe("wallFactor — creeping flow, against Bohlin's (1960) solution", () => {
  it.each([0.05, 0.1, 0.2, 0.3])("Faxén's series is within 0.3 per cent of it at λ = %s, inside its usual range (λ ≤ 0.3)", (λ) => {
    expect(relativeGap(wallFactor(λ, "faxen"), bohlin(λ))).toBeLessThan(0.003);
  });

  it("Faxén's truncated series drifts away beyond that range: 6 % high at λ = 0.5", () => {
    expect(wallFactor(0.5, "faxen") / bohlin(0.5) - 1).toBeGreaterThan(0.05);
  });

  it.each([0.1, 0.2, 0.3, 0.4])("Haberman & Sayre (1958) is within 0.3 per cent of it at λ = %s", (λ) => {
    expect(relativeGap(wallFactor(λ, "haberman-sayre"), bohlin(λ))).toBeLessThan(0.003);
  });

  it("Haberman & Sayre is within 1 % of it at λ = 0.5", () => {
    expect(relativeGap(wallFactor(0.5, "haberman-sayre"), bohlin(0.5))).toBeLessThan(0.01);
  });

  // Francis (1933) fitted his own falling-sphere experiments, not the creeping-flow theory: close to it
  // for a thin sphere and a few per cent above it (a weaker wall effect) as λ grows.
  it("Francis (1933) is within 1 % of it at λ = 0.1 and above it, by under 10 %, to λ = 0.4", () => {
    expect(relativeGap(wallFactor(0.1, "francis"), bohlin(0.1))).toBeLessThan(0.01);
    for (const λ of [0.2, 0.3, 0.4]) {
      const ratio = wallFactor(λ, "francis") / bohlin(λ);
      expect(ratio).toBeGreaterThan(1);
      expect(ratio).toBeLessThan(1.1);
    }
  });

  it("every method starts with Faxén's exact first-order term, K ≈ 1 − 2.104λ", () => {
    for (const method of ["faxen", "haberman-sayre", "francis"] as const) {
      // Francis' (1 − λ)⁴/(1 − 0.475λ)⁴ ≈ 1 − 2.100λ: within 0.01 % of 1 − 2.104λ at λ = 10⁻³.
      expect(relativeGap(wallFactor(1e-3, method), 1 - 2.10443e-3)).toBeLessThan(1e-4);
    }
  });

  it("is 1 without correction and refuses a sphere that does not fit", () => {
    expect(wallFactor(0.4, "none")).toBe(1);
    expect(() => wallFactor(1, "francis")).toThrow(ReductionInputError);
  });
});

describe("diFeliceWallFactor — Di Felice (1996), Int. J. Multiphase Flow 22, 527–533", () => {
  it("tends to the creeping-flow solution at small Re: within 1 % of Bohlin's at λ ≤ 0.2", () => {
    for (const λ of [0.1, 0.2]) expect(relativeGap(diFeliceWallFactor(λ, 1e-4), bohlin(λ))).toBeLessThan(0.01);
  });

  it("weakens with inertia: at λ = 0.2 and Re = 168 it is 0.858, where Faxén's creeping-flow series gives 0.596", () => {
    // The case: d = 10 mm in a 50 mm column. α = (3.3 + 0.085·168)/(1 + 0.1·168) = 0.98764 and
    // (0.8/0.934)^0.98764 = 0.85817.
    expect(diFeliceWallFactor(0.2, 168)).toBeCloseTo(0.85817, 4);
    expect(wallFactor(0.2, "faxen")).toBeCloseTo(0.596, 3);
  });
});

describe("resolveWallCorrection", () => {
  // Drag mode, Re∞ = scale·v∞: the scale of a 10 mm sphere in a fluid of ν = 2·10⁻⁵ m²/s is 500 s/m.
  const scale = 500;

  it("keeps the chosen creeping-flow factor while inertia moves K by at most 1 % (by Di Felice's Re-dependence)", () => {
    // At λ = 0.2 that is Re∞ ≤ 0.27: |ln(0.8/0.934)| · 0.245 Re/(1 + 0.1Re) = 0.01.
    expect(inertialWallShift(0.2, 0.2707)).toBeCloseTo(CREEPING_FLOW_WALL_TOLERANCE, 4);
    const creeping = resolveWallCorrection(0.2, "faxen", (0.26 * wallFactor(0.2, "faxen")) / scale, scale, 1);
    expect(creeping.applied).toBe("faxen");
    expect(creeping.factor).toBe(wallFactor(0.2, "faxen"));
    expect(creeping.byReynolds).toBe(0);
    expect(resolveWallCorrection(0.2, "faxen", (0.28 * wallFactor(0.2, "faxen")) / scale, scale, 1).applied).toBe("di-felice");
    // A thinner sphere stays in creeping flow to a higher Re: the wall, and so inertia's effect on it, is smaller.
    expect(resolveWallCorrection(0.05, "faxen", (1 * wallFactor(0.05, "faxen")) / scale, scale, 1).applied).toBe("faxen");
  });

  it("solves Di Felice's implicit relation beyond creeping flow: (3.3 − α)/(α − 0.85) = 0.1 Re∞, Re∞ on v∞ = v/K", () => {
    // Measured 0.288 m/s at λ = 0.2: Re of the measured velocity 144, of the corrected one about 168.
    const wall = resolveWallCorrection(0.2, "faxen", 0.288, scale, 1);
    expect(wall.applied).toBe("di-felice");
    // The published relation in its own form: α from K, then both sides of Di Felice's equation.
    const α = Math.log(wall.factor) / Math.log(0.8 / (1 - 0.33 * 0.2));
    expect((3.3 - α) / (α - 0.85)).toBeCloseTo(0.1 * wall.reynolds, 8);
    expect(wall.reynolds).toBeCloseTo((scale * 0.288) / wall.factor, 8);
    expect(wall.reynolds).toBeCloseTo(167.9, 0);
    expect(wall.iterations).toBeLessThan(15);
  });

  it("settles in viscometry too, where Re∞ ∝ v∞² doubles the iteration's slope, even at a large λ", () => {
    const wall = resolveWallCorrection(0.7, "haberman-sayre", 0.02, 30_000, 2);
    const α = Math.log(wall.factor) / Math.log(0.3 / (1 - 0.33 * 0.7));
    expect((3.3 - α) / (α - 0.85)).toBeCloseTo(0.1 * wall.reynolds, 8);
    expect(wall.reynolds).toBeCloseTo(30_000 * (0.02 / wall.factor) ** 2, 6);
  });

  it("stands in Haberman–Sayre for Faxén past λ = 0.3, and Francis past 0.8 (creeping flow)", () => {
    const slow = 1e-9;
    const atEight = resolveWallCorrection(0.8, "faxen", slow, scale, 1);
    expect(atEight.applied).toBe("haberman-sayre");
    // The figures: Faxén's series would give 0.0756 here, Haberman–Sayre 0.0204.
    expect(wallFactor(0.8, "faxen")).toBeCloseTo(0.0756, 4);
    expect(atEight.factor).toBeCloseTo(0.0204, 4);
    expect(resolveWallCorrection(0.9, "haberman-sayre", slow, scale, 1).applied).toBe("francis");
    expect(resolveWallCorrection(0.5, "francis", slow, scale, 1).applied).toBe("francis");
  });

  it("applies nothing for `none`", () => {
    expect(resolveWallCorrection(0.5, "none", 1, scale, 1)).toMatchObject({ factor: 1, applied: "none" });
  });

  it("refuses, saying why, when the iteration cannot settle (an infinite Reynolds number here)", () => {
    expect(() => resolveWallCorrection(0.2, "faxen", 0.3, Number.POSITIVE_INFINITY, 1)).toThrow(/did not settle/);
  });
});
