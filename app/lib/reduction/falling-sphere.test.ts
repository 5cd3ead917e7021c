import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ReductionInputError } from "./errors";
import { reduceFallingSphere, type FallingSphereInput, type Reduction } from "./falling-sphere";
import { tooFewDropsMessage } from "./falling-sphere-checks";

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
  it("gives the worked example's drag at its own viscosity: Re = 0.14695 and Stokes' C_D = 24/Re = 163.32", () => {
    // From the example's figures, by hand: Re = 1260·0.039·0.0037/1.237246 = 0.146954 and
    // C_D = 4(ρs − ρf) g d/(3ρf v²) = 4·6469.476·9.80665·0.0037/(3·1260·0.039²) = 163.317.
    const reduction = reduceFallingSphere({ ...WORKED_EXAMPLE, mode: "drag", fluid: { ...WORKED_EXAMPLE.fluid, viscosity: 1.237246215 } });
    expect(reduction.reynolds).toBeCloseTo(0.146954, 5);
    expect(reduction.dragCoefficient).toBeCloseTo(163.317, 2);
    expect(reduction.dragCoefficient * reduction.reynolds).toBeCloseTo(24, 3);
  });

  it("applies the wall factor, v∞ = v/K, with K within 0.01 % of Bohlin's (1960) creeping-flow solution at d/D = 0.05", () => {
    const reduction = reduceFallingSphere(DRAG_LOG);
    // Bohlin (1960), as in wall.test.ts (from memory): 1 − 2.10443·0.05 + 2.08877·0.05³ − … = 0.895039
    expect(Math.abs(reduction.velocity.wallFactor / 0.895039 - 1)).toBeLessThan(1e-4);
    expect(reduction.velocity.wallCorrection).toBe("faxen");
    expect(reduction.velocity.corrected).toBeCloseTo(reduction.velocity.measured / reduction.velocity.wallFactor, 12);
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
      column: { timedDistance: 0.2, innerDiameter: 12e-3, runIn: 0.001, marginBelow: 0.004 },
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
        "margin-below-too-short",
        "wall-factor-outside-creeping-flow",
        "reynolds-outside-wall-model",
        "reynolds-outside-drag-model-range",
        "fluid-temperature-unknown",
      ]),
    );
    expect(reduction.checks.find((check) => check.code === "sphere-lighter-than-fluid")?.level).toBe("error");
    // Regime and range problems are warnings, never notes only (product brief).
    for (const code of ["wall-factor-outside-creeping-flow", "reynolds-outside-wall-model", "reynolds-outside-drag-model-range"]) {
      expect(reduction.checks.find((check) => check.code === code)?.level).toBe("warn");
    }
  });
});

describe("reduceFallingSphere — wall effects and regimes", () => {
  // The issue's case: a 10 mm sphere in a 50 mm column (d/D = 0.2), measured at 0.288 m/s in a fluid of
  // ν = 2·10⁻⁵ m²/s, so Re = 144 at the measured velocity and about 168 at the corrected one.
  const FAST: FallingSphereInput = {
    mode: "drag",
    sphere: { diameter: 0.01, density: 2500 },
    fluid: { density: 1000, viscosity: 0.02, temperature: 20 },
    column: { timedDistance: 0.5, innerDiameter: 0.05, runIn: 0.4 },
    drops: [0.5 / 0.288],
    wallCorrection: "faxen",
  };

  it("uses Di Felice (1996) beyond creeping flow and says so, naming the factor Faxén would have given", () => {
    const reduction = reduceFallingSphere(FAST);
    expect(reduction.velocity.wallCorrection).toBe("di-felice");
    expect(reduction.reynolds).toBeCloseTo(167.9, 0);
    // Di Felice at Re∞ = 167.9: α = 0.9879, K = (0.8/0.934)^0.9879 = 0.8582 (see wall.test.ts).
    expect(reduction.velocity.wallFactor).toBeCloseTo(0.8582, 3);
    const check = reduction.checks.find((entry) => entry.code === "wall-factor-outside-creeping-flow");
    expect(check?.level).toBe("warn");
    expect(check?.message).toMatch(/Di Felice's \(1996\).*K = 0\.858; Faxén's series would give K = 0\.596/);
    expect(reduction.method.wallCorrection).toBe("faxen");
  });

  it("refits Di Felice's factor for the results without stray drops, whose velocity differs", () => {
    const drops = [1.73, 1.74, 1.735, 1.738, 1.732, 1.736, 1.734, 2.1];
    const reduction = reduceFallingSphere({ ...FAST, drops });
    expect(reduction.drops.strayDrops).toEqual([7]);
    const kept = reduction.withoutStrayDrops!;
    expect(kept.velocity.wallFactor).not.toBe(reduction.velocity.wallFactor);
    expect(kept.velocity.corrected).toBeCloseTo(kept.velocity.measured / kept.velocity.wallFactor, 12);
  });

  it("stands in Haberman–Sayre for Faxén at d/D = 0.8 (0.0204, not Faxén's 0.0756), with a warning naming both", () => {
    const reduction = reduceFallingSphere({
      ...WORKED_EXAMPLE,
      column: { ...WORKED_EXAMPLE.column, innerDiameter: 3.7e-3 / 0.8 },
      drops: [2000, 2001],
      wallCorrection: "faxen",
    });
    expect(reduction.velocity.wallCorrection).toBe("haberman-sayre");
    expect(reduction.velocity.wallFactor).toBeCloseTo(0.0204, 4);
    const check = reduction.checks.find((entry) => entry.code === "wall-correction-substituted");
    expect(check?.level).toBe("warn");
    expect(check?.message).toMatch(/Faxén's series .* would give K = 0\.0756: Haberman–Sayre's factor .* was used instead, K = 0\.0204/);
  });

  it("flags as an error a d/D no model covers, even without a correction (d/D = 0.99, `none`)", () => {
    const reduction = reduceFallingSphere({
      ...WORKED_EXAMPLE,
      column: { ...WORKED_EXAMPLE.column, innerDiameter: 3.7e-3 / 0.99 },
      drops: [4000, 4001],
      wallCorrection: "none",
    });
    expect(reduction.velocity.wallFactor).toBe(1);
    expect(reduction.checks.find((entry) => entry.code === "diameter-ratio-outside-wall-model")?.level).toBe("error");
    expect(reduction.checks.find((entry) => entry.code === "wall-effect-neglected")?.level).toBe("warn");
  });

  it("says how much the wall slows the sphere when no correction was chosen, and stays quiet when it is under 1 %", () => {
    const wide = reduceFallingSphere({ ...DRAG_LOG, wallCorrection: "none" });
    // d/D = 0.05: Haberman–Sayre's K = 0.895, a velocity 10 % below v∞.
    expect(wide.checks.find((entry) => entry.code === "wall-effect-neglected")?.message).toMatch(/K = 0\.895 .*10 % below v∞/);
    const thin = reduceFallingSphere({ ...DRAG_LOG, column: { ...DRAG_LOG.column, innerDiameter: 0.5 }, wallCorrection: "none" });
    expect(codes(thin)).not.toContain("wall-effect-neglected");
  });

  it("warns when the lower band is less than one column radius above the bottom (Tanner 1963)", () => {
    const near = reduceFallingSphere({ ...DRAG_LOG, column: { ...DRAG_LOG.column, marginBelow: 0.015 } });
    expect(near.checks.find((entry) => entry.code === "margin-below-too-short")?.message).toMatch(
      /one column radius \(0\.02 m\).*Tanner 1963/,
    );
    expect(codes(reduceFallingSphere({ ...DRAG_LOG, column: { ...DRAG_LOG.column, marginBelow: 0.025 } }))).not.toContain(
      "margin-below-too-short",
    );
    expect(codes(reduceFallingSphere(DRAG_LOG))).not.toContain("margin-below-too-short");
  });
});

describe("reduceFallingSphere — run-in", () => {
  // A 5 mm steel sphere (7800 kg/m³) in water at 20 °C (998.2 kg/m³, 1.002 mPa·s; CRC figures, see
  // viscosity-model.test.ts), timed at 1.00 m/s: Re = 4981, Newton's regime of nearly constant C_D.
  const STEEL_IN_WATER: FallingSphereInput = {
    mode: "drag",
    sphere: { diameter: 5e-3, density: 7800 },
    fluid: { density: 998.2, viscosity: 1.002e-3, temperature: 20 },
    column: { timedDistance: 1, runIn: 0.5 },
    drops: [1, 1, 1, 1, 1],
  };

  it("gives a 5 mm steel sphere in water a run-in of decimetres, not the 58 m of five Stokes relaxation lengths", () => {
    const reduction = reduceFallingSphere(STEEL_IN_WATER);
    // τ = (ρs + ½ρf) d²/(18μ) = 8299.1 · 25·10⁻⁶/(18 · 1.002·10⁻³) = 11.503 s: five v∞τ would be 57.5 m.
    expect(reduction.relaxationTime).toBeCloseTo(11.503, 2);
    // With constant C_D the motion (ρs + ½ρf) dv/dt = Δρ g − k v² gives v = v∞ tanh(a₀t/v∞), a₀ = Δρ g/(ρs + ½ρf)
    // = 6801.8 · 9.80665/8299.1 = 8.0373 m/s², so 99 % of v∞ is reached after (v∞²/a₀)·½ ln(1/(1 − 0.99²)) = 0.2437 m.
    expect(reduction.runInNeeded).toBeCloseTo(0.2437, 3);
    expect(codes(reduction)).not.toContain("run-in-too-short");
    const short = reduceFallingSphere({ ...STEEL_IN_WATER, column: { timedDistance: 1, runIn: 0.1 } });
    expect(short.checks.find((entry) => entry.code === "run-in-too-short")?.message).toMatch(/0\.244 m .*99 %/);
  });

  it("in Stokes flow needs v∞τ(ln 100 − 0.99) ≈ 3.6 relaxation lengths, τ with the added mass", () => {
    const reduction = reduceFallingSphere(DRAG_LOG);
    // ρs = 6m/(πd³) = 7806.6 kg/m³; τ = (7806.6 + 630) · 4·10⁻⁶/(18 · 1.2) = 1.56232·10⁻³ s; the exponential
    // approach v = v∞(1 − e^(−t/τ)) covers v∞τ(ln 100 − 0.99) by 99 % of v∞.
    expect(reduction.relaxationTime).toBeCloseTo(1.56232e-3, 7);
    expect(reduction.runInNeeded / (reduction.velocity.corrected * reduction.relaxationTime)).toBeCloseTo(Math.log(100) - 0.99, 10);
    expect(reduction.checks.find((entry) => entry.code === "run-in-unknown")).toBeUndefined();
    const unknown = reduceFallingSphere({ ...DRAG_LOG, column: { timedDistance: 0.2 } });
    expect(unknown.checks.find((entry) => entry.code === "run-in-unknown")?.level).toBe("info");
  });
});

describe("reduceFallingSphere — near-neutral buoyancy", () => {
  // An acrylic sphere (1190 kg/m³ from the kit record) in water.
  const ACRYLIC: FallingSphereInput = {
    mode: "drag",
    sphere: { diameter: 6e-3, density: 1190 },
    fluid: { density: 998.2, viscosity: 1.002e-3, temperature: 20 },
    column: { timedDistance: 0.3, runIn: 0.3 },
    drops: [3, 3.02, 2.98, 3.01, 2.99],
  };

  it("warns when Δρ is known to worse than 10 %", () => {
    const warned = reduceFallingSphere({ ...ACRYLIC, uncertainties: { sphereDensity: 20 } });
    // Δρ = 191.8 kg/m³ with u = 20 kg/m³: 10.4 %.
    expect(warned.checks.find((entry) => entry.code === "near-neutral-buoyancy")?.message).toMatch(
      /ρs − ρf = 192 kg\/m³ .* 20 kg\/m³ \(10 %\)/,
    );
    expect(codes(reduceFallingSphere({ ...ACRYLIC, uncertainties: { sphereDensity: 5 } }))).not.toContain("near-neutral-buoyancy");
  });

  it("counts the fluid's density and its temperature dependence in u(Δρ)", () => {
    const withTemperature = (temperature: number) =>
      reduceFallingSphere({
        ...ACRYLIC,
        fluid: { ...ACRYLIC.fluid, densityTemperatureCoefficient: -0.21 },
        uncertainties: { sphereDensity: 12, fluidDensity: 12, temperature },
      });
    // u(Δρ) = √(12² + 12² + (0.21 · 50)²) = 19.96 kg/m³, 10.4 % of Δρ; without u(T), 16.97 kg/m³ (8.8 %).
    expect(codes(withTemperature(50))).toContain("near-neutral-buoyancy");
    expect(codes(withTemperature(0))).not.toContain("near-neutral-buoyancy");
  });

  it("refuses when the sign of Δρ is uncertain, |Δρ| < 2u (about 95 % coverage)", () => {
    expect(() =>
      reduceFallingSphere({ ...ACRYLIC, sphere: { diameter: 6e-3, density: 1030 }, uncertainties: { sphereDensity: 20 } }),
    ).toThrow(/ρs − ρf = 31\.8 kg\/m³ is within twice its standard uncertainty \(2u = 40 kg\/m³, about 95 % coverage\)/);
  });
});

describe("reduceFallingSphere — uncertainties by central differences", () => {
  // u(y)/y = √Σ(∂y/∂xᵢ · u(xᵢ))²/y with each ∂y/∂xᵢ from the whole reduction: an independent route to
  // the exponents the code combines. No column, so the wall factor does not enter.
  const LOG: FallingSphereInput = {
    mode: "drag",
    sphere: { diameter: 2e-3, mass: 32.7e-6 },
    fluid: { density: 1260, viscosity: 1.2, temperature: 21, viscosityTemperatureCoefficient: -0.097 },
    column: { timedDistance: 0.2, runIn: 0.05 },
    drops: [20.1, 19.8, 20.3, 20.0, 19.9, 20.2],
    uncertainties: { diameter: 3e-6, mass: 3e-7, fluidDensity: 0.5, distance: 3e-4, time: 0.003, fluidViscosity: 0.006, temperature: 0.3 },
  };
  const perturb: Record<string, (input: FallingSphereInput, h: number) => FallingSphereInput> = {
    d: (input, h) => ({ ...input, sphere: { ...input.sphere, diameter: input.sphere.diameter + h } }),
    m: (input, h) => ({ ...input, sphere: { ...input.sphere, mass: (input.sphere.mass as number) + h } }),
    ρf: (input, h) => ({ ...input, fluid: { ...input.fluid, density: input.fluid.density + h } }),
    L: (input, h) => ({ ...input, column: { ...input.column, timedDistance: input.column.timedDistance + h } }),
    t: (input, h) => ({ ...input, drops: input.drops.map((time) => time + h) }),
    μ: (input, h) => ({ ...input, fluid: { ...input.fluid, viscosity: (input.fluid.viscosity as number) + h } }),
  };
  const base = reduceFallingSphere(LOG);
  // u(t̄)² = (s/√n)² + u_B² and u(μ)² = u_cal² + (μ · d ln μ/dT · u(T))².
  const standard: Record<string, number> = {
    d: 3e-6,
    m: 3e-7,
    ρf: 0.5,
    L: 3e-4,
    t: Math.hypot(base.drops.se!, 0.003),
    μ: Math.hypot(0.006, 1.2 * 0.097 * 0.3),
  };
  const value: Record<string, number> = { d: 2e-3, m: 32.7e-6, ρf: 1260, L: 0.2, t: base.drops.mean, μ: 1.2 };

  function numericRelative(result: (reduction: Reduction) => number, inputs: string[]): number {
    let sum = 0;
    for (const name of inputs) {
      const h = value[name] * 1e-6;
      const derivative =
        (result(reduceFallingSphere(perturb[name](LOG, h))) - result(reduceFallingSphere(perturb[name](LOG, -h)))) / (2 * h);
      sum += (derivative * standard[name]) ** 2;
    }
    return Math.sqrt(sum) / result(base);
  }

  it("gives u(ρs)/ρs on the mass route from m and d (ρs = 6m/(πd³))", () => {
    expect(base.uncertainty.sphereDensity / numericRelative((r) => r.sphereDensity, ["d", "m"])).toBeCloseTo(1, 6);
  });

  it("gives u(F)/F, u(C_D)/C_D and u(Re)/Re of a drag-mode log", () => {
    expect(base.uncertainty.dragForce / numericRelative((r) => r.dragForce, ["d", "m", "ρf"])).toBeCloseTo(1, 6);
    expect(base.uncertainty.dragCoefficient / numericRelative((r) => r.dragCoefficient, ["d", "m", "ρf", "L", "t"])).toBeCloseTo(1, 6);
    expect(base.uncertainty.reynolds / numericRelative((r) => r.reynolds, ["d", "ρf", "L", "t", "μ"])).toBeCloseTo(1, 6);
  });

  it("gives u(C_D/C_D,ref) of a drag-mode log, the reference moving with Re", () => {
    const figure = (r: Reduction) => (r.mode === "drag" ? r.dragCoefficient / r.referenceDragCoefficient : NaN);
    expect(base.uncertainty.dragRatio! / numericRelative(figure, ["d", "m", "ρf", "L", "t", "μ"])).toBeCloseTo(1, 6);
  });
});

describe("reduceFallingSphere — Oseen-corrected viscosity", () => {
  // Viscometry of a 3 mm steel sphere in a water-like fluid, timed fast enough that Re_Stokes = 18ρf v²/(Δρ g d)
  // is 5 or 5.5, either side of 16/3 where Oseen's correction μ_S − 3ρf v d/16 reaches zero.
  const atStokesReynolds = (reynolds: number): FallingSphereInput => {
    const velocity = Math.sqrt((reynolds * 6800 * 9.80665 * 3e-3) / (18 * 1000));
    return {
      mode: "viscometry",
      sphere: { diameter: 3e-3, density: 7800 },
      fluid: { density: 1000, temperature: 20 },
      column: { timedDistance: 0.2, runIn: 1 },
      drops: [0.2 / velocity],
    };
  };

  it("balances the weight with Oseen's (1910) drag 3πμdv(1 + 3Re/16) below Re_Stokes = 16/3", () => {
    const reduction = reduceFallingSphere(atStokesReynolds(5));
    if (reduction.mode !== "viscometry" || reduction.viscosityOseen === null) throw new Error("expected an Oseen viscosity");
    const μ = reduction.viscosityOseen;
    const v = reduction.velocity.corrected;
    const reynolds = (1000 * v * 3e-3) / μ;
    expect((3 * Math.PI * μ * 3e-3 * v * (1 + (3 * reynolds) / 16)) / reduction.dragForce).toBeCloseTo(1, 10);
    expect(reduction.uncertainty.viscosityOseen).toBeGreaterThan(0);
    expect(codes(reduction)).not.toContain("oseen-correction-not-applicable");
  });

  it("gives no Oseen viscosity, no uncertainty for it, and a warning beyond Re_Stokes = 16/3", () => {
    const reduction = reduceFallingSphere(atStokesReynolds(5.5));
    if (reduction.mode !== "viscometry") throw new Error("mode");
    expect(reduction.viscosityOseen).toBeNull();
    expect(reduction.uncertainty.viscosityOseen).toBeUndefined();
    expect(reduction.checks.find((entry) => entry.code === "oseen-correction-not-applicable")?.level).toBe("warn");
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

describe("the too-few-drops warning", () => {
  it("agrees with the drops timed at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => tooFewDropsMessage(n, 5))).toEqual([
      "0 drops timed; the lab asks for at least 5.",
      "1 drop timed; the lab asks for at least 5.",
      "2 drops timed; the lab asks for at least 5.",
    ]);
  });
});
