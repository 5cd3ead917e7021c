import { describe, expect, it } from "vitest";
import { normalisedFigure } from "./class-comparison";
import { reduceFallingSphere, type FallingSphereInput, type Reduction } from "./falling-sphere";
import { BudgetAccumulator } from "./uncertainty-budget";
import { calibrationUncertainty, fitFluidViscosity, viscosityAt, viscosityTemperatureCoefficient } from "./viscosity-model";

describe("BudgetAccumulator — Welch–Satterthwaite (GUM, JCGM 100:2008)", () => {
  it("reproduces GUM G.4.1's example: u_c/y = 1.03 %, ν_eff = 19.0, t₉₅(19) = 2.09", () => {
    // Y = bX₁X₂X₃ with u(xᵢ)/xᵢ = 0.25 %, 0.57 %, 0.82 % from n = 10, 5 and 15 observations (ν = 9, 4, 14).
    const budget = new BudgetAccumulator(1);
    budget.add("X1", 1, "1", 0.0025, "A", 9, 1);
    budget.add("X2", 1, "1", 0.0057, "A", 4, 1);
    budget.add("X3", 1, "1", 0.0082, "A", 14, 1);
    const totals = budget.totals();
    expect(totals.combined).toBeCloseTo(0.0103, 4);
    expect(totals.effectiveDegreesOfFreedom).toBeCloseTo(19.0, 1);
    // GUM Table G.2, p = 95 %, ν = 19: t = 2.09.
    expect(totals.coverageFactor).toBeCloseTo(2.09, 2);
    expect(totals.expanded).toBeCloseTo(totals.coverageFactor * totals.combined, 15);
    expect(totals.coverageProbability).toBe(0.95);
  });

  it("gives ν_eff = ∞ and k = 1.960 (GUM Table G.2, ν = ∞) when every input is type B with ν = ∞", () => {
    const budget = new BudgetAccumulator(2);
    budget.add("a", 1, "1", 0.01, "B", Infinity, 1);
    budget.add("b", 1, "1", 0.02, "B", Infinity, -0.5);
    const totals = budget.totals();
    expect(totals.effectiveDegreesOfFreedom).toBe(Infinity);
    expect(totals.coverageFactor).toBeCloseTo(1.96, 3);
    // contributions 2·1·0.01 = 0.02 and 2·(−0.5)·0.02 = −0.02 → u_c = 0.02·√2
    expect(totals.combined).toBeCloseTo(0.02 * Math.SQRT2, 15);
    expect(budget.rows.map((row) => row.contribution)).toEqual([0.02, -0.02]);
  });

  it("interpolates t between integer ν for a fractional ν_eff, as GUM G.4.1 allows", () => {
    const budget = new BudgetAccumulator(1);
    budget.add("a", 1, "1", 1, "A", 4, 1);
    budget.add("b", 1, "1", 0.5, "B", Infinity, 1);
    // ν_eff = 1.25²/(1/4) = 6.25: between t₉₅(6) = 2.447 and t₉₅(7) = 2.365 (GUM Table G.2: 2.45, 2.36).
    expect(budget.totals().effectiveDegreesOfFreedom).toBeCloseTo(6.25, 12);
    expect(budget.totals().coverageFactor).toBeCloseTo(2.447 + 0.25 * (2.365 - 2.447), 3);
  });
});

// The budget's sensitivities are checked against central differences of the whole reduction: an
// independent route to ∂y/∂xᵢ that does not reuse the exponents the budget is built from.
const DRAG_LOG: FallingSphereInput = {
  mode: "drag",
  sphere: { diameter: 2e-3, mass: 32.7e-6 },
  fluid: { density: 1260, viscosity: 1.2, temperature: 21, viscosityTemperatureCoefficient: -0.097 },
  column: { timedDistance: 0.2, innerDiameter: 12e-3, runIn: 0.05 },
  drops: [20.1, 19.8, 20.3, 20.0, 19.9, 20.2],
  wallCorrection: "haberman-sayre",
  uncertainties: {
    diameter: 3e-6,
    mass: 3e-7,
    fluidDensity: 0.5,
    distance: 3e-4,
    time: 0.003,
    columnDiameter: 5e-5,
    fluidViscosity: 0.006,
    temperature: 0.3,
  },
};

type Perturbation = (input: FallingSphereInput, h: number) => FallingSphereInput;
const perturbations: Record<string, Perturbation> = {
  "Sphere diameter d": (input, h) => ({ ...input, sphere: { ...input.sphere, diameter: input.sphere.diameter + h } }),
  "Sphere mass m": (input, h) => ({ ...input, sphere: { ...input.sphere, mass: (input.sphere.mass as number) + h } }),
  "Sphere material density ρs": (input, h) => ({ ...input, sphere: { ...input.sphere, density: (input.sphere.density as number) + h } }),
  "Fluid density ρf": (input, h) => ({ ...input, fluid: { ...input.fluid, density: input.fluid.density + h } }),
  "Timed distance L": (input, h) => ({ ...input, column: { ...input.column, timedDistance: input.column.timedDistance + h } }),
  // Shifting every drop by h moves the mean by h and leaves the scatter as it is.
  "Timing, common to all drops (resolution)": (input, h) => ({ ...input, drops: input.drops.map((time) => time + h) }),
  "Column bore D": (input, h) => ({ ...input, column: { ...input.column, innerDiameter: (input.column.innerDiameter as number) + h } }),
  "Fluid viscosity at T from the lot's calibration": (input, h) => ({
    ...input,
    fluid: { ...input.fluid, viscosity: (input.fluid.viscosity as number) + h },
  }),
};

function numericSensitivity(input: FallingSphereInput, perturb: Perturbation, h: number, result: (reduction: Reduction) => number): number {
  return (result(reduceFallingSphere(perturb(input, h))) - result(reduceFallingSphere(perturb(input, -h)))) / (2 * h);
}

function expectSensitivitiesToMatch(input: FallingSphereInput, result: (reduction: Reduction) => number) {
  const reduction = reduceFallingSphere(input);
  const budget = reduction.uncertaintyBudget;
  let checked = 0;
  for (const row of budget.rows) {
    const perturb = perturbations[row.input];
    if (!perturb) continue;
    const numeric = numericSensitivity(input, perturb, row.value * 1e-6, result);
    expect(row.sensitivity / numeric, row.input).toBeCloseTo(1, 5);
    checked++;
  }
  return checked;
}

describe("uncertaintyBudget of a drag-mode reduction (C_D), mass route", () => {
  const reduction = reduceFallingSphere(DRAG_LOG);
  const budget = reduction.uncertaintyBudget;

  it("is for C_D, with contributions that combine in quadrature to u_c and U = k·u_c", () => {
    expect(budget.result).toBe("dragCoefficient");
    expect(budget.value).toBe(reduction.dragCoefficient);
    const sumOfSquares = budget.rows.reduce((sum, row) => sum + row.contribution ** 2, 0);
    expect(budget.combined).toBeCloseTo(Math.sqrt(sumOfSquares), 12);
    expect(budget.expanded).toBeCloseTo(budget.coverageFactor * budget.combined, 12);
    for (const row of budget.rows) expect(row.contribution).toBeCloseTo(row.sensitivity * row.standardUncertainty, 12);
  });

  it("has each sensitivity equal to a central difference of C_D (d, m, ρf, L, t, D)", () => {
    expect(expectSensitivitiesToMatch(DRAG_LOG, (r) => r.dragCoefficient)).toBe(6);
  });

  it("gives the mean time's scatter as type A with n − 1 degrees of freedom, the rest type B with ν = ∞", () => {
    const typeA = budget.rows.filter((row) => row.type === "A");
    expect(typeA).toHaveLength(1);
    expect(typeA[0].degreesOfFreedom).toBe(5);
    // s of [20.1, 19.8, 20.3, 20.0, 19.9, 20.2] = 0.18708, s/√6 = 0.076376
    expect(typeA[0].standardUncertainty).toBeCloseTo(0.076376, 6);
    for (const row of budget.rows.filter((row) => row.type === "B")) expect(row.degreesOfFreedom).toBe(Infinity);
    // ν_eff lies between the type A input's ν and ∞.
    expect(budget.effectiveDegreesOfFreedom).toBeGreaterThan(5);
  });

  it("includes the wall factor's dependence on d: C_D moves more with d than without a column", () => {
    const withoutColumn = reduceFallingSphere({ ...DRAG_LOG, column: { ...DRAG_LOG.column, innerDiameter: undefined } });
    const dRow = (r: Reduction) => r.uncertaintyBudget.rows.find((row) => row.input === "Sphere diameter d")!;
    // Haberman–Sayre at λ = 1/6: K falls with d, and C_D ∝ K², so ∂ln C_D/∂ln d gains 2·d ln K/d ln λ < 0.
    expect(dRow(reduction).sensitivity / reduction.dragCoefficient).toBeLessThan(
      dRow(withoutColumn).sensitivity / withoutColumn.dragCoefficient,
    );
    expect(withoutColumn.uncertaintyBudget.rows.some((row) => row.input === "Column bore D")).toBe(false);
  });

  it("gives the normalised figure C_D/C_D,ref the viscosity and temperature inputs too, matching a central difference in μ", () => {
    const figure = budget.normalisedFigure!;
    expect(figure.value).toBeCloseTo(normalisedFigure(reduction), 12);
    const h = 1.2e-6;
    const at = (viscosity: number) => normalisedFigure(reduceFallingSphere({ ...DRAG_LOG, fluid: { ...DRAG_LOG.fluid, viscosity } }));
    const byViscosity = (at(1.2 + h) - at(1.2 - h)) / (2 * h);
    const viscosityTerm = byViscosity * 0.006;
    const temperatureTerm = byViscosity * 1.2 * -0.097 * 0.3;
    // The figure's u² is C_D's (relative) plus the reference's: Re through d, ρf, L, t, D and μ.
    expect(figure.combined).toBeGreaterThan(Math.hypot(viscosityTerm, temperatureTerm));
    const withExactViscosity = reduceFallingSphere({
      ...DRAG_LOG,
      uncertainties: { ...DRAG_LOG.uncertainties, fluidViscosity: 0, temperature: 0 },
    });
    expect(figure.combined ** 2 - withExactViscosity.uncertaintyBudget.normalisedFigure!.combined ** 2).toBeCloseTo(
      viscosityTerm ** 2 + temperatureTerm ** 2,
      10,
    );
  });
});

describe("uncertaintyBudget of a viscometry reduction (μ)", () => {
  const VISCOMETRY_LOG: FallingSphereInput = {
    ...DRAG_LOG,
    mode: "viscometry",
    fluid: {
      density: 1260,
      temperature: 21,
      referenceViscosity: 1.2,
      viscosityTemperatureCoefficient: -0.097,
      densityTemperatureCoefficient: -0.65,
    },
  };

  it("has each sensitivity equal to a central difference of μ, on the mass route", () => {
    const reduction = reduceFallingSphere(VISCOMETRY_LOG);
    expect(reduction.uncertaintyBudget.result).toBe("viscosity");
    expect(reduction.uncertaintyBudget.unit).toBe("Pa·s");
    expect(expectSensitivitiesToMatch(VISCOMETRY_LOG, (r) => (r.mode === "viscometry" ? r.viscosity : NaN))).toBe(6);
  });

  it("has each sensitivity equal to a central difference of μ, on the material-density route", () => {
    const byDensity: FallingSphereInput = {
      ...VISCOMETRY_LOG,
      sphere: { diameter: 2e-3, density: 7800 },
      uncertainties: { ...VISCOMETRY_LOG.uncertainties, sphereDensity: 20 },
    };
    const reduction = reduceFallingSphere(byDensity);
    expect(reduction.uncertaintyBudget.rows.map((row) => row.input)).toContain("Sphere material density ρs");
    expect(expectSensitivitiesToMatch(byDensity, (r) => (r.mode === "viscometry" ? r.viscosity : NaN))).toBe(6);
  });

  it("carries u(T) into μ through ρf(T), and into μ/μ_ref(T) through both ρf(T) and μ_ref(T)", () => {
    // A lot calibrated at 15, 20, 25 and 30 °C (invented, near glycerol's 1.4 → 0.6 Pa·s).
    const fit = fitFluidViscosity([
      { temperature: 15, viscosity: 2.2 },
      { temperature: 20, viscosity: 1.41 },
      { temperature: 25, viscosity: 0.95 },
      { temperature: 30, viscosity: 0.61 },
    ]);
    const densityAt = (T: number) => 1261 - 0.65 * (T - 20);
    const inputAt = (T: number): FallingSphereInput => ({
      ...VISCOMETRY_LOG,
      fluid: {
        density: densityAt(T),
        temperature: T,
        referenceViscosity: viscosityAt(fit, T),
        viscosityTemperatureCoefficient: viscosityTemperatureCoefficient(fit, T),
        densityTemperatureCoefficient: -0.65,
      },
    });
    const figureAt = (T: number) => normalisedFigure(reduceFallingSphere(inputAt(T)), { referenceViscosity: viscosityAt(fit, T) });
    const viscosityAtT = (T: number) => (reduceFallingSphere(inputAt(T)) as { viscosity: number }).viscosity;
    const h = 1e-4;
    const reduction = reduceFallingSphere(inputAt(21));
    const temperatureRow = reduction.uncertaintyBudget.rows.find((row) => row.input === "Fluid temperature T")!;
    expect(temperatureRow.sensitivity / ((viscosityAtT(21 + h) - viscosityAtT(21 - h)) / (2 * h))).toBeCloseTo(1, 5);
    const figure = reduction.uncertaintyBudget.normalisedFigure!;
    expect(figure.value).toBeCloseTo(figureAt(21), 12);
    const byTemperature = (figureAt(21 + h) - figureAt(21 - h)) / (2 * h);
    const withoutT = reduceFallingSphere({ ...inputAt(21), uncertainties: { ...VISCOMETRY_LOG.uncertainties, temperature: 0 } });
    expect(figure.combined ** 2 - withoutT.uncertaintyBudget.normalisedFigure!.combined ** 2).toBeCloseTo((byTemperature * 0.3) ** 2, 10);
  });

  it("has no normalised figure without a reference viscosity", () => {
    const reduction = reduceFallingSphere({ ...VISCOMETRY_LOG, fluid: { density: 1260, temperature: 21 } });
    expect(reduction.uncertaintyBudget.normalisedFigure).toBeNull();
  });

  it("leaves the type A row out for a single drop", () => {
    const reduction = reduceFallingSphere({ ...VISCOMETRY_LOG, drops: [20] });
    expect(reduction.uncertaintyBudget.rows.some((row) => row.type === "A")).toBe(false);
    expect(reduction.uncertaintyBudget.effectiveDegreesOfFreedom).toBe(Infinity);
  });
});

describe("uncertaintyBudget beyond creeping flow, with Di Felice's wall factor", () => {
  // A 10 mm glass sphere (m = 1.309 g, ρs ≈ 2500 kg/m³) in a 50 mm column at Re∞ ≈ 170: K depends on
  // Re∞ and so on every input of Re, the fluid viscosity included, through the fixed point v∞ = v/K(Re∞).
  const FAST: FallingSphereInput = {
    mode: "drag",
    sphere: { diameter: 0.01, mass: 1.309e-3 },
    fluid: { density: 1000, viscosity: 0.02, temperature: 20, viscosityTemperatureCoefficient: -0.03 },
    column: { timedDistance: 0.5, innerDiameter: 0.05, runIn: 0.4 },
    drops: [1.73, 1.74, 1.735, 1.738, 1.732, 1.736],
    wallCorrection: "haberman-sayre",
    uncertainties: {
      diameter: 5e-6,
      mass: 1e-6,
      fluidDensity: 0.5,
      distance: 5e-4,
      time: 0.003,
      columnDiameter: 5e-5,
      fluidViscosity: 4e-4,
      temperature: 0,
    },
  };

  it("has each sensitivity of C_D equal to a central difference, the viscosity's too (d, m, ρf, L, t, D, μ)", () => {
    expect(reduceFallingSphere(FAST).velocity.wallCorrection).toBe("di-felice");
    expect(expectSensitivitiesToMatch(FAST, (r) => r.dragCoefficient)).toBe(7);
  });

  it("gives C_D/C_D,ref the combined uncertainty of central differences over every input", () => {
    const reduction = reduceFallingSphere(FAST);
    const figure = (r: Reduction) => normalisedFigure(r);
    const u = FAST.uncertainties!;
    const typeA = reduction.drops.se!;
    const terms: [Perturbation, number, number][] = [
      [perturbations["Sphere diameter d"], 0.01, u.diameter!],
      [perturbations["Sphere mass m"], 1.309e-3, u.mass!],
      [perturbations["Fluid density ρf"], 1000, u.fluidDensity!],
      [perturbations["Timed distance L"], 0.5, u.distance!],
      [perturbations["Timing, common to all drops (resolution)"], reduction.drops.mean, Math.hypot(typeA, u.time!)],
      [perturbations["Column bore D"], 0.05, u.columnDiameter!],
      [perturbations["Fluid viscosity at T from the lot's calibration"], 0.02, u.fluidViscosity!],
    ];
    const numeric = Math.sqrt(
      terms.reduce((sum, [perturb, value, standard]) => sum + (numericSensitivity(FAST, perturb, value * 1e-6, figure) * standard) ** 2, 0),
    );
    expect(reduction.uncertaintyBudget.normalisedFigure!.combined / numeric).toBeCloseTo(1, 5);
  });

  it("has each sensitivity of the Stokes μ equal to a central difference in viscometry, where Re∞ ∝ v∞²", () => {
    const viscometry: FallingSphereInput = {
      ...FAST,
      mode: "viscometry",
      fluid: { density: 1000, temperature: 20, referenceViscosity: 0.02 },
    };
    const reduction = reduceFallingSphere(viscometry);
    expect(reduction.velocity.wallCorrection).toBe("di-felice");
    expect(expectSensitivitiesToMatch(viscometry, (r) => (r.mode === "viscometry" ? r.viscosity : NaN))).toBe(6);
  });
});

describe("calibrationUncertainty — the Andrade fit's residual standard error at T", () => {
  // Exact on ln μ = A + B/T but for ±δ alternating: s = δ·√(4/2) at N = 4, ν = 2.
  const kelvin = (t: number) => t + 273.15;
  const points = [15, 20, 25, 30].map((t, i) => ({
    temperature: t,
    viscosity: Math.exp(-17 + 5000 / kelvin(t) + (i % 2 === 0 ? 0.01 : -0.01)),
  }));
  const fit = fitFluidViscosity(points);

  it("has N − 2 degrees of freedom and is smallest at the centre of the calibration (1/T = mean of 1/Tᵢ)", () => {
    expect(fit.residual?.degreesOfFreedom).toBe(2);
    const centre = 1 / fit.residual!.meanInverseTemperature - 273.15;
    const atCentre = calibrationUncertainty(fit, centre);
    // At x̄ the line's standard error is s/√N (ordinary least squares).
    expect(atCentre.relative).toBeCloseTo(fit.residual!.standardError / 2, 12);
    expect(calibrationUncertainty(fit, 40).relative).toBeGreaterThan(atCentre.relative);
  });

  it("is zero with two calibration points: nothing left to estimate the scatter with", () => {
    const two = fitFluidViscosity(points.slice(0, 2));
    expect(two.residual).toBeNull();
    expect(calibrationUncertainty(two, 20)).toEqual({ relative: 0, degreesOfFreedom: Infinity });
  });
});
