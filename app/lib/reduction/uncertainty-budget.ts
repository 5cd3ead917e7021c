import { tQuantile975 } from "./statistics";

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
  add(
    input: string,
    value: number,
    unit: string,
    standardUncertainty: number,
    type: "A" | "B",
    degreesOfFreedom: number,
    logSensitivity: number,
  ): void {
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
  return {
    combined,
    effectiveDegreesOfFreedom,
    coverageFactor,
    expanded: coverageFactor * combined,
    coverageProbability: COVERAGE_PROBABILITY,
  };
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
  /**
   * The applied wall factor's partial log-derivatives: ∂ln K/∂ln λ and ∂ln K/∂ln Re∞ (0 for a
   * creeping-flow factor), with Re∞ ∝ v∞ (drag) or v∞² (viscometry): its `reynoldsPower`.
   */
  wall: { byDiameterRatio: number; byReynolds: number; reynoldsPower: 1 | 2 };
  temperature: { value: number; u: number } | null;
  /** Drag mode: Re and d ln C_D,ref/d ln Re, the fluid viscosity and its calibration uncertainty. Viscometry: μ_ref(T). */
  reference:
    { kind: "drag"; ratio: number; slope: number; viscosity: LotViscosity } | { kind: "viscometry"; viscosity: LotViscosity } | null;
}

/** The lot's viscosity at T from its calibration, with what carries its uncertainty. */
interface LotViscosity {
  value: number;
  u: number;
  degreesOfFreedom: number;
  /** d ln μ/dT (1/K). */
  temperatureCoefficient: number;
}

/**
 * The budget of a falling-sphere result. Both results are products of powers of the inputs, so each
 * sensitivity is y·e/x with e the exponent (C_D ∝ Δρ ρf⁻¹ d L⁻² t̄² K², μ ∝ Δρ d² t̄ K L⁻¹), the density
 * difference Δρ = |ρs − ρf| split between ρs and ρf.
 *
 * The wall factor K depends on λ = d/D and, beyond creeping flow (Di Felice's factor), on Re∞ of the
 * corrected velocity, which depends on K in turn: Re∞ = Re₀ K^(−p) with Re₀ the Reynolds number of the
 * measured velocity (p = 1 in drag mode, Re₀ ∝ ρf d L t̄⁻¹ μ⁻¹; p = 2 in viscometry, Re₀ ∝ ρf L² t̄⁻²
 * Δρ⁻¹ d⁻¹). Solving d ln K = ε_λ d ln λ + ε_R (d ln Re₀ − p d ln K) gives K's total dependence,
 * d ln K = (ε_λ d ln λ + ε_R d ln Re₀)/(1 + p ε_R), which is folded into the exponents of the inputs.
 *
 * Correlation: the type B term of a timing (stopwatch resolution and reaction) is treated as fully
 * correlated between the drops, so the mean time carries it undivided, u_B(t̄) = u_B(t), not u_B(t)/√n.
 * The part of each reading's error that varies from drop to drop already shows in the scatter and so in
 * the type A term s/√n; what remains for type B is what the scatter cannot show, the part common to
 * every drop timed by the same hand on the same watch. Dividing it by √n would count the random part
 * twice and claim the common part averages away.
 */
export function fallingSphereBudget(context: FallingSphereBudgetContext): UncertaintyBudget {
  const { mode, reference } = context;
  const drag = mode === "drag";
  const sign = context.sphereDensity >= context.fluidDensity.value ? 1 : -1;
  const densityExcess = Math.abs(context.sphereDensity - context.fluidDensity.value);
  const split: DensitySplit = {
    // ∂ln Δρ/∂ln ρs and ∂ln Δρ/∂ln ρf, and ∂ln ρs/∂ln d (−3 on the mass route, ρs = 6m/(πd³)).
    bySphere: (sign * context.sphereDensity) / densityExcess,
    byFluid: (-sign * context.fluidDensity.value) / densityExcess,
    sphereByDiameter: context.sphere.source === "mass" ? -3 : 0,
  };
  const main: Exponents = drag ? { d: 1, Δρ: 1, ρf: -1, L: -2, t: 2, K: 2, μ: 0 } : { d: 2, Δρ: 1, ρf: 0, L: -1, t: 1, K: 1, μ: 0 };
  const viscosity = reference?.viscosity ?? null;

  const mainBudget = new BudgetAccumulator(context.value);
  addInputs(mainBudget, context, split, main, viscosity);
  const totals = mainBudget.totals();
  let normalisedFigure: UncertaintyBudget["normalisedFigure"] = null;
  if (reference && viscosity) {
    const value = reference.kind === "drag" ? reference.ratio : context.value / viscosity.value;
    const budget = new BudgetAccumulator(value, false);
    // Drag: C_D/C_D,ref(Re) with Re ∝ ρf d L t̄⁻¹ K⁻¹ μ⁻¹, so each exponent is e(C_D) − s·e(Re). Viscometry: μ/μ_ref.
    const s = reference.kind === "drag" ? reference.slope : 0;
    const figure: Exponents =
      reference.kind === "drag"
        ? { d: main.d - s, Δρ: main.Δρ, ρf: main.ρf - s, L: main.L - s, t: main.t + s, K: main.K + s, μ: s }
        : { d: main.d, Δρ: main.Δρ, ρf: main.ρf, L: main.L, t: main.t, K: main.K, μ: -1 };
    addInputs(budget, context, split, figure, viscosity);
    const figureTotals = budget.totals();
    normalisedFigure = {
      value,
      combined: figureTotals.combined,
      effectiveDegreesOfFreedom: figureTotals.effectiveDegreesOfFreedom,
      coverageFactor: figureTotals.coverageFactor,
      expanded: figureTotals.expanded,
      coverageProbability: figureTotals.coverageProbability,
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

/**
 * Exponents of a result in d (as a length, without ρs's or K's dependence on it), Δρ, ρf (without Δρ's),
 * L, t̄, the wall factor K and the lot's viscosity μ (the input in drag mode, μ_ref in viscometry).
 */
interface Exponents {
  d: number;
  Δρ: number;
  ρf: number;
  L: number;
  t: number;
  K: number;
  μ: number;
}

interface DensitySplit {
  bySphere: number;
  byFluid: number;
  sphereByDiameter: number;
}

/**
 * The rows every result shares, with K's dependence on d, D and (through Re∞) on the other inputs
 * folded in. A module function rather than a closure in {@link fallingSphereBudget}: the bundler names
 * each closure it creates, which cost more per drop log than the rows themselves.
 */
function addInputs(
  budget: BudgetAccumulator,
  context: FallingSphereBudgetContext,
  split: DensitySplit,
  e: Exponents,
  viscosity: LotViscosity | null,
): void {
  const { diameter, sphere, fluidDensity, distance, meanTime, column, temperature, wall } = context;
  const feedback = 1 + wall.reynoldsPower * wall.byReynolds;
  const byλ = (e.K * wall.byDiameterRatio) / feedback;
  const byRe = (e.K * wall.byReynolds) / feedback;
  // Exponents of Re₀, the Reynolds number of the measured velocity (see fallingSphereBudget).
  const viscometryRe = wall.reynoldsPower === 2;
  const d = e.d + byλ + byRe * (viscometryRe ? -1 : 1);
  const Δρ = e.Δρ - (viscometryRe ? byRe : 0);
  const ρf = e.ρf + byRe;
  const L = e.L + byRe * (viscometryRe ? 2 : 1);
  const t = e.t - byRe * (viscometryRe ? 2 : 1);
  const μ = e.μ - (viscometryRe ? 0 : byRe);
  const byFluidDensity = (ρf + Δρ * split.byFluid) / fluidDensity.value;

  budget.add(
    "Sphere diameter d",
    diameter.value,
    "m",
    diameter.u,
    "B",
    Infinity,
    (d + Δρ * split.bySphere * split.sphereByDiameter) / diameter.value,
  );
  if (sphere.source === "mass")
    budget.add("Sphere mass m", sphere.value, "kg", sphere.u, "B", Infinity, (Δρ * split.bySphere) / sphere.value);
  else budget.add("Sphere material density ρs", sphere.value, "kg/m³", sphere.u, "B", Infinity, (Δρ * split.bySphere) / sphere.value);
  budget.add("Fluid density ρf", fluidDensity.value, "kg/m³", fluidDensity.u, "B", Infinity, byFluidDensity);
  budget.add("Timed distance L", distance.value, "m", distance.u, "B", Infinity, L / distance.value);
  if (meanTime.typeA !== null) {
    budget.add("Mean time t̄, scatter of the drops (s/√n)", meanTime.value, "s", meanTime.typeA, "A", meanTime.n - 1, t / meanTime.value);
  }
  budget.add("Timing, common to all drops (resolution)", meanTime.value, "s", meanTime.typeB, "B", Infinity, t / meanTime.value);
  if (column) budget.add("Column bore D", column.value, "m", column.u, "B", Infinity, -byλ / column.value);
  // T moves ρf through the lot's coefficient, and the lot's viscosity through d ln μ/dT.
  if (temperature) {
    const byTemperature = byFluidDensity * fluidDensity.temperatureCoefficient + (viscosity ? μ * viscosity.temperatureCoefficient : 0);
    budget.add("Fluid temperature T", temperature.value, "°C", temperature.u, "B", Infinity, byTemperature);
  }
  if (viscosity) {
    // The Andrade fit's residual standard error is a type A evaluation with N − 2 degrees of freedom.
    const type = Number.isFinite(viscosity.degreesOfFreedom) ? "A" : "B";
    budget.add(
      "Fluid viscosity at T from the lot's calibration",
      viscosity.value,
      "Pa·s",
      viscosity.u,
      type,
      viscosity.degreesOfFreedom,
      μ / viscosity.value,
    );
  }
}
