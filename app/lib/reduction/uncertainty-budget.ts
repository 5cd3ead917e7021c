import { tQuantile975 } from "./statistics";
import { wallFactor, type WallCorrectionMethod } from "./wall";

/**
 * A GUM uncertainty budget (JCGM 100:2008): one row per input quantity, combined in quadrature under
 * the law of propagation of uncertainty for uncorrelated inputs (GUM 5.1.2), with the effective degrees
 * of freedom of Welch–Satterthwaite (GUM G.4.1, eq. G.2b) and a Student-t coverage factor for 95 %
 * (GUM G.3, G.4.1). Pure: no I/O.
 */
export interface UncertaintyBudgetRow {
  /** What the input is, in words a student reads ("Sphere diameter d"). */
  input: string;
  /** Its estimate, in SI (the unit named in `unit`). */
  value: number;
  unit: string;
  /** Its standard uncertainty u(xᵢ), same unit as `value`. */
  standardUncertainty: number;
  /** Type A: evaluated from a series of observations; type B: by other means (GUM 4.2, 4.3). */
  type: "A" | "B";
  /** νᵢ: n − 1 for a mean of n readings; `Infinity` for a type B input taken as exactly known in its u. */
  degreesOfFreedom: number;
  /** cᵢ = ∂y/∂xᵢ, in the result's unit per the input's unit. */
  sensitivity: number;
  /** cᵢ·u(xᵢ), in the result's unit; the contributions combine in quadrature to `combined`. */
  contribution: number;
}

export interface UncertaintyTotals {
  /** u_c(y) = √Σ (cᵢ u(xᵢ))² (GUM 5.1.2). */
  combined: number;
  /** ν_eff = u_c⁴ / Σ (cᵢ u(xᵢ))⁴/νᵢ (GUM G.4.1); `Infinity` when every contribution is type B with ν = ∞. */
  effectiveDegreesOfFreedom: number;
  /** k = t₀.₉₇₅(ν_eff), interpolated between integer ν as GUM G.4.1 allows. */
  coverageFactor: number;
  /** U = k·u_c. */
  expanded: number;
  coverageProbability: number;
}

export interface UncertaintyBudget extends UncertaintyTotals {
  /** The result the budget is for: "dragCoefficient" (drag mode) or "viscosity" (viscometry, Stokes). */
  result: "dragCoefficient" | "viscosity";
  /** Its value and unit, so the budget reads on its own. */
  value: number;
  unit: string;
  rows: UncertaintyBudgetRow[];
  /**
   * The normalised figure (C_D/C_D,ref in drag mode, μ/μ_ref(T) in viscometry) and so the deviation
   * from the reference (figure − 1) carry this uncertainty: the same inputs, plus what the reference
   * depends on (the fluid's viscosity from its calibration and the temperature). Totals only; null in
   * viscometry without a reference viscosity.
   */
  normalisedFigure: (UncertaintyTotals & { value: number }) | null;
}

export const COVERAGE_PROBABILITY = 0.95;
/** t₀.₉₇₅(∞), the normal quantile; beyond this ν the t quantile differs from it by under 10⁻⁴. */
const NORMAL_QUANTILE_975 = 1.959963984540054;
const LARGE_DEGREES_OF_FREEDOM = 10_000;

/**
 * Collects the rows of y, or only their sums when `keepRows` is false (the normalised figure needs its
 * totals, and building rows for it would double the allocation per drop log). A row that does not move
 * the result is left out: the table lists only what does.
 */
export class BudgetAccumulator {
  readonly rows: UncertaintyBudgetRow[] = [];
  private sumOfSquares = 0;
  private welchSatterthwaiteDenominator = 0;

  constructor(
    private readonly y: number,
    private readonly keepRows = true,
  ) {}

  /** One input; its sensitivity is given as ∂ln y/∂xᵢ, so a power law reads as exponent/xᵢ. */
  add(input: string, value: number, unit: string, standardUncertainty: number, type: "A" | "B", degreesOfFreedom: number, logSensitivity: number): void {
    const sensitivity = this.y * logSensitivity;
    const contribution = sensitivity * standardUncertainty;
    if (contribution === 0 || !Number.isFinite(contribution)) return;
    const square = contribution * contribution;
    this.sumOfSquares += square;
    this.welchSatterthwaiteDenominator += (square * square) / degreesOfFreedom;
    if (this.keepRows) this.rows.push({ input, value, unit, standardUncertainty, type, degreesOfFreedom, sensitivity, contribution });
  }

  totals(): UncertaintyTotals {
    return totalsOf(Math.sqrt(this.sumOfSquares), this.welchSatterthwaiteDenominator);
  }
}

/**
 * t₀.₉₇₅(ν) for a fractional ν, interpolated linearly between the cached integer quantiles, as GUM G.4.1
 * allows for a ν_eff that is not an integer (truncating instead would turn its own example's 18.99 into
 * 18 and k = 2.10 where the GUM gives t₉₅(19) = 2.09).
 */
export function coverageFactor95(degreesOfFreedom: number): number {
  if (degreesOfFreedom >= LARGE_DEGREES_OF_FREEDOM) return NORMAL_QUANTILE_975;
  const below = Math.max(1, Math.floor(degreesOfFreedom));
  const low = tQuantile975(below);
  const fraction = degreesOfFreedom - below;
  return fraction > 0 ? low + fraction * (tQuantile975(below + 1) - low) : low;
}

/** ν_eff by Welch–Satterthwaite (GUM G.4.1, eq. G.2b), then k = t₀.₉₇₅(ν_eff) and U = k·u_c. */
function totalsOf(combined: number, welchSatterthwaiteDenominator: number): UncertaintyTotals {
  const combinedSquared = combined * combined;
  const effectiveDegreesOfFreedom =
    welchSatterthwaiteDenominator > 0 ? (combinedSquared * combinedSquared) / welchSatterthwaiteDenominator : Number.POSITIVE_INFINITY;
  const coverageFactor = coverageFactor95(effectiveDegreesOfFreedom);
  return { combined, effectiveDegreesOfFreedom, coverageFactor, expanded: coverageFactor * combined, coverageProbability: COVERAGE_PROBABILITY };
}

/** What {@link fallingSphereBudget} needs of a reduction, all SI (temperature in °C, its u in K). */
export interface FallingSphereBudgetContext {
  mode: "drag" | "viscometry";
  /** C_D (drag) or the Stokes μ (viscometry), with all drops. */
  value: number;
  diameter: { value: number; u: number };
  /** The mass (mass route) or the material density; ρs ∝ m d⁻³ on the mass route. */
  sphere: { source: "mass" | "material"; value: number; u: number };
  sphereDensity: number;
  fluidDensity: { value: number; u: number; temperatureCoefficient: number };
  distance: { value: number; u: number };
  meanTime: { value: number; typeA: number | null; typeB: number; n: number };
  /** Column bore; null without one (no wall correction). */
  column: { value: number; u: number } | null;
  /** d ln K/d ln λ of the wall factor at d/D; 0 without a correction. */
  wallElasticity: number;
  temperature: { value: number; u: number } | null;
  /** Drag mode: Re and d ln C_D,ref/d ln Re, the fluid viscosity and its calibration uncertainty. Viscometry: μ_ref(T). */
  reference:
    | { kind: "drag"; ratio: number; slope: number; viscosity: { value: number; u: number; degreesOfFreedom: number; temperatureCoefficient: number } }
    | { kind: "viscometry"; viscosity: { value: number; u: number; degreesOfFreedom: number; temperatureCoefficient: number } }
    | null;
}

/**
 * The budget of a falling-sphere result. Both results are products of powers of the inputs, so each
 * sensitivity is y·e/x with e the exponent (C_D ∝ Δρ ρf⁻¹ d L⁻² t̄² K², μ ∝ Δρ d² t̄ K L⁻¹), the density
 * difference Δρ = |ρs − ρf| split between ρs and ρf, and the wall factor's dependence on d and D through
 * λ = d/D (d ln K/d ln λ, taken numerically by {@link wallFactorElasticity}).
 *
 * Correlation: the type B term of a timing (stopwatch resolution and reaction) is treated as fully
 * correlated between the drops, so the mean time carries it undivided, u_B(t̄) = u_B(t), not u_B(t)/√n.
 * The part of each reading's error that varies from drop to drop already shows in the scatter and so in
 * the type A term s/√n; what remains for type B is what the scatter cannot show, the part common to
 * every drop timed by the same hand on the same watch. Dividing it by √n would count the random part
 * twice and claim the common part averages away.
 */
export function fallingSphereBudget(context: FallingSphereBudgetContext): UncertaintyBudget {
  const { mode, sphere, fluidDensity, reference } = context;
  const densityExcess = Math.abs(context.sphereDensity - fluidDensity.value);
  const sign = context.sphereDensity >= fluidDensity.value ? 1 : -1;
  // Exponents of Δρ's two parts: ∂ln Δρ/∂ln ρs and ∂ln Δρ/∂ln ρf.
  const bySphere = (sign * context.sphereDensity) / densityExcess;
  const byFluid = (-sign * fluidDensity.value) / densityExcess;
  const sphereByDiameter = sphere.source === "mass" ? -3 : 0;
  // Exponents of the main result in d (without the wall factor), ρf, L, t̄ and K.
  const drag = mode === "drag";
  const main: Exponents = { d: (drag ? 1 : 2) + bySphere * sphereByDiameter, ρf: drag ? byFluid - 1 : byFluid, L: drag ? -2 : -1, t: drag ? 2 : 1, K: drag ? 2 : 1 };

  const mainBudget = new BudgetAccumulator(context.value);
  addInputs(mainBudget, context, bySphere, main, 0);
  const totals = mainBudget.totals();
  let normalisedFigure: UncertaintyBudget["normalisedFigure"] = null;
  if (reference) {
    const { viscosity } = reference;
    const drag = reference.kind === "drag";
    const value = drag ? reference.ratio : context.value / viscosity.value;
    const budget = new BudgetAccumulator(value, false);
    if (reference.kind === "drag") {
      // C_D/C_D,ref(Re) with Re ∝ ρf d L t̄⁻¹ K⁻¹ μ⁻¹: each exponent is e(C_D) − s·e(Re).
      const s = reference.slope;
      addInputs(budget, context, bySphere, { d: main.d - s, ρf: main.ρf - s, L: main.L - s, t: main.t + s, K: main.K + s }, s * viscosity.temperatureCoefficient);
      addCalibration(budget, viscosity, s / viscosity.value);
    } else {
      addInputs(budget, context, bySphere, main, -viscosity.temperatureCoefficient);
      addCalibration(budget, viscosity, -1 / viscosity.value);
    }
    const figure = budget.totals();
    normalisedFigure = {
      value,
      combined: figure.combined,
      effectiveDegreesOfFreedom: figure.effectiveDegreesOfFreedom,
      coverageFactor: figure.coverageFactor,
      expanded: figure.expanded,
      coverageProbability: figure.coverageProbability,
    };
  }
  // Literals rather than spreads: this runs once per drop log of a class page.
  return {
    result: drag ? "dragCoefficient" : "viscosity",
    value: context.value,
    unit: drag ? "1" : "Pa·s",
    rows: mainBudget.rows,
    combined: totals.combined,
    effectiveDegreesOfFreedom: totals.effectiveDegreesOfFreedom,
    coverageFactor: totals.coverageFactor,
    expanded: totals.expanded,
    coverageProbability: totals.coverageProbability,
    normalisedFigure,
  };
}

/** Exponents of a result in d (without the wall factor), ρf, L, t̄ and the wall factor K. */
interface Exponents {
  d: number;
  ρf: number;
  L: number;
  t: number;
  K: number;
}

/**
 * The rows every result shares. A module function rather than a closure in {@link fallingSphereBudget}:
 * the bundler names each closure it creates, which cost more per drop log than the rows themselves.
 * `viscosity` is ∂ln y/∂T through the reference viscosity (0 for the main result).
 */
function addInputs(budget: BudgetAccumulator, context: FallingSphereBudgetContext, bySphere: number, e: Exponents, viscosity: number): void {
  const { diameter, sphere, fluidDensity, distance, meanTime, column, temperature } = context;
  const ε = context.wallElasticity;
  budget.add("Sphere diameter d", diameter.value, "m", diameter.u, "B", Infinity, (e.d + e.K * ε) / diameter.value);
  if (sphere.source === "mass") budget.add("Sphere mass m", sphere.value, "kg", sphere.u, "B", Infinity, bySphere / sphere.value);
  else budget.add("Sphere material density ρs", sphere.value, "kg/m³", sphere.u, "B", Infinity, bySphere / sphere.value);
  budget.add("Fluid density ρf", fluidDensity.value, "kg/m³", fluidDensity.u, "B", Infinity, e.ρf / fluidDensity.value);
  budget.add("Timed distance L", distance.value, "m", distance.u, "B", Infinity, e.L / distance.value);
  if (meanTime.typeA !== null) {
    budget.add("Mean time t̄, scatter of the drops (s/√n)", meanTime.value, "s", meanTime.typeA, "A", meanTime.n - 1, e.t / meanTime.value);
  }
  budget.add("Timing, common to all drops (resolution)", meanTime.value, "s", meanTime.typeB, "B", Infinity, e.t / meanTime.value);
  if (column) budget.add("Column bore D", column.value, "m", column.u, "B", Infinity, (-e.K * ε) / column.value);
  // T moves ρf through the lot's coefficient, and the reference viscosity through d ln μ/dT.
  if (temperature) {
    const byTemperature = (e.ρf / fluidDensity.value) * fluidDensity.temperatureCoefficient + viscosity;
    budget.add("Fluid temperature T", temperature.value, "°C", temperature.u, "B", Infinity, byTemperature);
  }
}

function addCalibration(budget: BudgetAccumulator, viscosity: { value: number; u: number; degreesOfFreedom: number }, logSensitivity: number): void {
  // The Andrade fit's residual standard error is a type A evaluation with N − 2 degrees of freedom.
  const type = Number.isFinite(viscosity.degreesOfFreedom) ? "A" : "B";
  budget.add("Fluid viscosity at T from the lot's calibration", viscosity.value, "Pa·s", viscosity.u, type, viscosity.degreesOfFreedom, logSensitivity);
}

/** d ln K/d ln λ by a central difference in ln λ, step 10⁻⁶ (λ > 0: a column is given). */
export function wallFactorElasticity(method: WallCorrectionMethod, diameterRatio: number): number {
  return Math.log(wallFactor(diameterRatio * (1 + ELASTICITY_STEP), method) / wallFactor(diameterRatio * (1 - ELASTICITY_STEP), method)) / LOG_STEP_WIDTH;
}

const ELASTICITY_STEP = 1e-6;
const LOG_STEP_WIDTH = Math.log((1 + ELASTICITY_STEP) / (1 - ELASTICITY_STEP));
