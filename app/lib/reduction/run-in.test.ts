import { describe, expect, it } from "vitest";
import { relaxationTime, runInLength } from "./run-in";

// A steel sphere in water: a₀ = Δρ g/(ρs + ½ρf) = 6800 · 9.80665/8300 = 8.0344 m/s².
const STEEL = { sphereDensity: 7800, fluidDensity: 1000, g: 9.80665 };
const initialAcceleration = (6800 * 9.80665) / 8300;

describe("runInLength", () => {
  it("matches the closed form of Newton's regime, where C_D is constant: x = (v∞²/a₀)·½ ln(1/(1 − 0.99²))", () => {
    // (ρs + ½ρf) dv/dt = Δρ g − k v² integrates to v = v∞ tanh(a₀t/v∞) and x = (v∞²/a₀) ln cosh(a₀t/v∞).
    const closedForm = (1 / initialAcceleration) * 0.5 * Math.log(1 / (1 - 0.99 ** 2));
    const x = runInLength({ ...STEEL, terminalVelocity: 1, reynolds: 1e5, relaxationTime: relaxationTime(7800, 1000, 5e-3, 1e-3) });
    expect(x / closedForm).toBeCloseTo(1, 4);
  });

  it("joins the Stokes closed form v∞τ(ln 100 − 0.99) to within 2 % where it takes over (Re = 0.1)", () => {
    // A sphere whose v∞ is Stokes' own, v∞ = Δρ g d²/(18μ), so that v∞/a₀ = τ.
    const d = 1e-4;
    const μ = 1;
    const τ = relaxationTime(7800, 1000, d, μ);
    const v = (6800 * 9.80665 * d * d) / (18 * μ);
    expect(v / initialAcceleration / τ).toBeCloseTo(1, 12);
    const stokes = runInLength({ ...STEEL, terminalVelocity: v, reynolds: 0.1, relaxationTime: τ });
    expect(stokes / (v * τ)).toBeCloseTo(Math.log(100) - 0.99, 12);
    const justBeyond = runInLength({ ...STEEL, terminalVelocity: v, reynolds: 0.1000001, relaxationTime: τ });
    expect(Math.abs(justBeyond / stokes - 1)).toBeLessThan(0.02);
  });

  it("shortens as inertia grows: the drag rises faster than v, so the approach is quicker than Stokes' (in v∞²/a₀)", () => {
    const lengths = [1, 10, 100, 1000].map(
      (reynolds) => runInLength({ ...STEEL, terminalVelocity: 1, reynolds, relaxationTime: 1 }) * initialAcceleration,
    );
    for (let i = 1; i < lengths.length; i++) expect(lengths[i]).toBeLessThan(lengths[i - 1]);
    expect(lengths[0]).toBeLessThan(Math.log(100) - 0.99);
  });
});
