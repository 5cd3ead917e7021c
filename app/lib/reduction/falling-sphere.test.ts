import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { reduceFallingSphere, type FallingSphereInput, type Reduction } from "./falling-sphere";

// Worked example, wyzant.com answer 929424 ("Viscosity of a liquid"): a 205 mg sphere of radius 1.85 mm
// settles at 3.9 cm/s in glycerol of density 1260 kg/m³, g = 9.80665 m/s² → ρs = 7729.47624 kg/m³ and
// η = 1.237246215 Pa·s. Timed over 0.39 m, 3.9 cm/s is 10 s per drop.
const WORKED_EXAMPLE: FallingSphereInput = {
  mode: "viscometry",
  sphere: { diameter: 3.7e-3, mass: 205e-6 },
  fluid: { density: 1260, temperature: 20 },
  column: { timedDistance: 0.39, runIn: 0.1 },
  drops: [10, 10, 10, 10, 10],
  wallCorrection: "none",
};

const DRAG_LOG: FallingSphereInput = {
  mode: "drag",
  sphere: { diameter: 2e-3, mass: 32.7e-6 },
  fluid: { density: 1260, viscosity: 1.2, temperature: 21 },
  column: { timedDistance: 0.2, innerDiameter: 40e-3, runIn: 0.05 },
  drops: [20.1, 19.8, 20.3, 20.0, 19.9, 20.2],
};

function codes(reduction: Reduction) {
  return reduction.checks.map((check) => check.code);
}

describe("reduceFallingSphere — viscometry", () => {
  it("reproduces the worked example's sphere density and Stokes viscosity", () => {
    const reduction = reduceFallingSphere(WORKED_EXAMPLE);
    expect(reduction.sphereDensity).toBeCloseTo(7729.47624, 4);
    expect(reduction.velocity.measured).toBeCloseTo(0.039, 12);
    if (reduction.mode !== "viscometry") throw new Error("mode");
    expect(reduction.viscosity).toBeCloseTo(1.237246215, 8);
    // Oseen: μ − 3ρf v d/16 = 1.237246 − 3·1260·0.039·0.0037/16 = 1.237246 − 0.034091 = 1.203155
    expect(reduction.viscosityOseen).toBeCloseTo(1.203155, 6);
    // Re = ρf v d/μ = 1260·0.039·0.0037/1.237246 = 0.14695 > 0.1: Stokes' law is 3Re/16 = 2.8 % off, a warning
    expect(reduction.reynolds).toBeCloseTo(0.14695, 5);
    expect(reduction.checks).toContainEqual(expect.objectContaining({ code: "reynolds-too-large-for-stokes", level: "warn" }));
  });

  it("combines relative uncertainties by their exponents: u(μ)/μ = √[(u(Δρ)/Δρ)² + (2u(d)/d)² + (u(t̄)/t̄)² + (u(L)/L)²]", () => {
    const reduction = reduceFallingSphere({
      ...WORKED_EXAMPLE,
      sphere: { diameter: 3.7e-3, density: 7729.47624 },
      drops: [9.9, 10.1, 10.0, 10.2, 9.8],
      uncertainties: { diameter: 3.7e-6, sphereDensity: 0, fluidDensity: 0, distance: 0.39e-3, time: 0 },
    });
    // u(d)/d = 0.001, u(L)/L = 0.001, u(t̄) = s/√n = 0.158114/√5 = 0.070711 → 0.0070711 relative, Δρ exact.
    const expected = Math.sqrt(0.002 ** 2 + 0.0070711 ** 2 + 0.001 ** 2);
    expect(reduction.uncertainty.viscosity).toBeCloseTo(expected, 6);
  });
});

describe("reduceFallingSphere — drag", () => {
  it("is consistent with Stokes' law: C_D·Re = 24 when the fluid viscosity is the Stokes viscosity", () => {
    const viscometry = reduceFallingSphere({ ...DRAG_LOG, mode: "viscometry" });
    if (viscometry.mode !== "viscometry") throw new Error("mode");
    const drag = reduceFallingSphere({ ...DRAG_LOG, fluid: { ...DRAG_LOG.fluid, viscosity: viscometry.viscosity } });
    expect(drag.dragCoefficient * drag.reynolds).toBeCloseTo(24, 10);
    if (drag.mode !== "drag") throw new Error("mode");
    expect(drag.referenceDragCoefficient).toBeCloseTo((24 / drag.reynolds) * (1 + 0.15 * drag.reynolds ** 0.687), 10);
  });

  it("applies the wall factor: v∞ = v/K", () => {
    const reduction = reduceFallingSphere(DRAG_LOG);
    // d/D = 0.05 → Faxén K = 1 − 0.1052 + 0.00026125 − 0.0000003 = 0.8950610
    expect(reduction.velocity.wallFactor).toBeCloseTo(0.895061, 6);
    expect(reduction.velocity.corrected).toBeCloseTo(reduction.velocity.measured / 0.895061, 6);
  });

  it("reports stray drops and the results without them, keeping every drop", () => {
    const reduction = reduceFallingSphere({ ...DRAG_LOG, drops: [...DRAG_LOG.drops, 23.5] });
    expect(reduction.drops.strayDrops).toEqual([6]);
    expect(reduction.drops.n).toBe(7);
    expect(reduction.withoutStrayDrops?.drops.n).toBe(6);
    expect(reduction.withoutStrayDrops?.drops.mean).toBeCloseTo(20.05, 10);
    expect(codes(reduction)).toContain("stray-drops");
    expect(reduceFallingSphere(DRAG_LOG).withoutStrayDrops).toBeNull();
  });

  it("warns about every condition of the product brief", () => {
    const reduction = reduceFallingSphere({
      mode: "drag",
      sphere: { diameter: 8e-3, mass: 0.1e-3, density: 7800 },
      fluid: { density: 1000, viscosity: 1e-3 },
      column: { timedDistance: 0.2, innerDiameter: 12e-3, runIn: 0.001 },
      drops: [0.5, 0.52],
      dragModel: "stokes",
    });
    expect(codes(reduction)).toEqual(
      expect.arrayContaining([
        "too-few-drops",
        "stray-drop-test-not-applicable",
        "sphere-lighter-than-fluid",
        "sphere-density-disagrees-with-kit",
        "run-in-too-short",
        "diameter-ratio-outside-wall-model",
        "wall-factor-outside-creeping-flow",
        "reynolds-outside-drag-model-range",
        "fluid-temperature-unknown",
      ]),
    );
    expect(reduction.checks.find((check) => check.code === "sphere-lighter-than-fluid")?.level).toBe("error");
  });
});

describe("reduceFallingSphere — invalid input", () => {
  it("lists every problem in one typed error", () => {
    const input = {
      mode: "drag",
      sphere: { diameter: -1 },
      fluid: { density: Number.NaN },
      column: { timedDistance: 0 },
      drops: [],
    } as unknown as FallingSphereInput;
    try {
      reduceFallingSphere(input);
      expect.unreachable();
    } catch (error) {
      expect(error).toBeInstanceOf(ReductionInputError);
      expect((error as ReductionInputError).issues.map((issue) => issue.path)).toEqual([
        "sphere.diameter",
        "sphere",
        "fluid.density",
        "fluid.viscosity",
        "column.timedDistance",
        "drops",
      ]);
    }
  });

  it("names the bad drops and a sphere too wide for the column", () => {
    const attempt = () =>
      reduceFallingSphere({ ...DRAG_LOG, drops: [20, Number.NaN, -3], column: { timedDistance: 0.2, innerDiameter: 1e-3 } });
    expect(attempt).toThrow(ReductionInputError);
    try {
      attempt();
    } catch (error) {
      expect((error as ReductionInputError).issues.map((issue) => issue.path)).toEqual(["drops.1", "drops.2"]);
    }
    expect(() => reduceFallingSphere({ ...DRAG_LOG, column: { timedDistance: 0.2, innerDiameter: 1e-3 } })).toThrow(
      /larger than the sphere diameter/,
    );
  });
});

// Degrees of freedom are the one place ∞ is a value (a type B input, GUM G.4.2), never NaN.
const DEGREES_OF_FREEDOM_KEYS = new Set(["degreesOfFreedom", "effectiveDegreesOfFreedom"]);

function allNumbersFinite(value: unknown, key = ""): boolean {
  if (typeof value === "number") return Number.isFinite(value) || (DEGREES_OF_FREEDOM_KEYS.has(key) && value === Infinity);
  if (value === null || typeof value !== "object") return true;
  return Object.entries(value).every(([childKey, child]) => allNumbersFinite(child, Array.isArray(value) ? key : childKey));
}

const positive = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });
const dropTimes = fc.array(positive(0.1, 100), { minLength: 1, maxLength: 20 });

describe("reduceFallingSphere — invariants", () => {
  it("does not depend on the order of the drops", () => {
    fc.assert(
      fc.property(dropTimes, fc.integer(), (times, seed) => {
        const shuffled = [...times].sort((a, b) => Math.sin(a * seed) - Math.sin(b * seed));
        const a = reduceFallingSphere({ ...DRAG_LOG, drops: times });
        const b = reduceFallingSphere({ ...DRAG_LOG, drops: shuffled });
        expect(b.velocity.corrected).toBeCloseTo(a.velocity.corrected, 10);
        expect(b.dragCoefficient / a.dragCoefficient).toBeCloseTo(1, 10);
        expect(b.drops.strayDrops.map((i) => shuffled[i]).sort()).toEqual(a.drops.strayDrops.map((i) => times[i]).sort());
      }),
    );
  });

  it("scales the velocity by 1/c when every time is scaled by c", () => {
    fc.assert(
      fc.property(dropTimes, positive(0.01, 100), (times, c) => {
        const a = reduceFallingSphere({ ...DRAG_LOG, drops: times });
        const b = reduceFallingSphere({ ...DRAG_LOG, drops: times.map((time) => time * c) });
        expect((b.velocity.measured * c) / a.velocity.measured).toBeCloseTo(1, 10);
      }),
    );
  });

  it("gives finite output or a listed error for any finite positive input, never NaN", () => {
    fc.assert(
      fc.property(
        fc.constantFrom("drag" as const, "viscometry" as const),
        positive(1e-5, 1),
        positive(1e-9, 10),
        positive(1, 20_000),
        positive(1e-5, 1e3),
        positive(1e-3, 10),
        fc.option(positive(1e-4, 2), { nil: undefined }),
        fc.constantFrom("faxen" as const, "haberman-sayre" as const, "francis" as const, "none" as const),
        dropTimes,
        (mode, diameter, mass, fluidDensity, viscosity, timedDistance, innerDiameter, wallCorrection, drops) => {
          try {
            const reduction = reduceFallingSphere({
              mode,
              sphere: { diameter, mass },
              fluid: { density: fluidDensity, viscosity },
              column: { timedDistance, innerDiameter, runIn: 0.05 },
              drops,
              wallCorrection,
            });
            expect(allNumbersFinite(reduction)).toBe(true);
          } catch (error) {
            expect(error).toBeInstanceOf(ReductionInputError);
            expect((error as ReductionInputError).issues.length).toBeGreaterThan(0);
          }
        },
      ),
    );
  });
});
