import { DRAG_MODEL_RANGES, referenceDragCoefficient, referenceDragLogSlope, type DragModel } from "./drag";
import { IssueList, ReductionInputError } from "./errors";
import { relaxationTime as relaxationTimeOf, RUN_IN_VELOCITY_FRACTION, runInLength } from "./run-in";
import { describeDrops, type DropStatistics } from "./statistics";
import { findStrayDrops } from "./stray-drops";
import { fallingSphereBudget, type UncertaintyBudget } from "./uncertainty-budget";
import {
  CREEPING_FLOW_WALL_TOLERANCE,
  DI_FELICE_MAX_REYNOLDS,
  diFeliceWallFactor,
  inertialWallShift,
  resolveWallCorrection,
  WALL_MODEL_RANGES,
  wallFactor,
  type AppliedWallCorrection,
  type WallCorrection,
  type WallCorrectionMethod,
} from "./wall";

export type ReductionMode = "drag" | "viscometry";

/** Standard uncertainties (SI, absolute) of the measured inputs. */
export interface StandardUncertainties {
  /** Sphere diameter (m). */
  diameter?: number;
  /** Sphere mass (kg). */
  mass?: number;
  /** Sphere material density (kg/m³), used when the density is given instead of the mass. */
  sphereDensity?: number;
  /** Fluid density (kg/m³). */
  fluidDensity?: number;
  /**
   * Fluid viscosity (Pa·s) from the lot's calibration at T: the input in drag mode, the reference of
   * μ/μ_ref in viscometry. Its degrees of freedom are `fluid.viscosityDegreesOfFreedom`.
   */
  fluidViscosity?: number;
  /** Column bore (m). */
  columnDiameter?: number;
  /** Timed distance between the bands (m). */
  distance?: number;
  /** Type B standard uncertainty of one timing (s), e.g. the stopwatch resolution / √12. */
  time?: number;
  /** Fluid temperature (K). */
  temperature?: number;
}

/**
 * Defaults when the lab settings give no instrument figures: a resolution r read as a rectangular
 * distribution, u = r/√12 (GUM, JCGM 100:2008, §4.3.7 and F.2.2.1). Resolutions assumed: micrometer
 * 0.01 mm, balance 1 mg, ruler 1 mm, stopwatch 0.01 s, thermometer 1 K. Kit records of densities and
 * viscosity are taken as exact unless an uncertainty is given.
 */
export const DEFAULT_STANDARD_UNCERTAINTIES: Required<StandardUncertainties> = {
  diameter: 0.01e-3 / Math.sqrt(12),
  mass: 1e-6 / Math.sqrt(12),
  sphereDensity: 0,
  fluidDensity: 0,
  fluidViscosity: 0,
  columnDiameter: 0,
  distance: 1e-3 / Math.sqrt(12),
  time: 0.01 / Math.sqrt(12),
  temperature: 1 / Math.sqrt(12),
};

/** Everything in SI units: m, kg, kg/m³, Pa·s, s, m/s²; temperature in °C. */
export interface FallingSphereInput {
  mode: ReductionMode;
  sphere: {
    diameter: number;
    /** Measured mass; gives ρs = 6m/(πd³). Takes precedence over `density` when both are given. */
    mass?: number;
    /** Material density from the kit record. */
    density?: number;
  };
  fluid: {
    density: number;
    /** Required in drag mode. */
    viscosity?: number;
    temperature?: number;
    /** d ln μ/dT (1/K) of the fluid at the drop temperature, e.g. from `viscosityTemperatureCoefficient(fit, T)`. */
    viscosityTemperatureCoefficient?: number;
    /** Viscometry: the lot's μ at the drop temperature, the reference of the normalised figure μ/μ_ref(T). */
    referenceViscosity?: number;
    /** Degrees of freedom of `uncertainties.fluidViscosity` (N − 2 for an Andrade fit of N points); ∞ when absent. */
    viscosityDegreesOfFreedom?: number;
    /**
     * dρf/dT (kg/m³/K) of the lot. `density` is already the density at `temperature`; the coefficient
     * only carries u(T) into ρf in the uncertainty budget.
     */
    densityTemperatureCoefficient?: number;
  };
  column: {
    timedDistance: number;
    innerDiameter?: number;
    /** Fall above the top band, from release to the start of timing. */
    runIn?: number;
    /** Fall left below the lower band, to the bottom of the column. */
    marginBelow?: number;
  };
  /** Drop times over the timed distance (s). */
  drops: readonly number[];
  /** Local gravity, 9.80665 m/s² (standard gravity) unless the course sets its own. */
  g?: number;
  /** The lab's wall factor, Faxén's by default; where it does not hold another stands in (see `resolveWallCorrection`). */
  wallCorrection?: WallCorrectionMethod;
  dragModel?: DragModel;
  uncertainties?: StandardUncertainties;
  /** Stray-drop test (generalized ESD, from 7 drops): α, 0.05 by default; at most ⌊n/5⌋ drops (≥ 1) flagged. */
  strayDropTest?: { alpha?: number; maxStrayDrops?: number };
  /** Reading resolution of the drop times (s), 0.01 s by default; a deviation within it is never a stray drop. */
  timeResolution?: number;
  /** The lab's required number of drops; fewer gives a warning. Default 5. */
  requiredDrops?: number;
}

export interface ReductionCheck {
  code: ReductionCheckCode;
  level: "info" | "warn" | "error";
  message: string;
}

export type ReductionCheckCode =
  | "too-few-drops"
  | "single-drop"
  | "stray-drop-test-not-applicable"
  | "stray-drops"
  | "sphere-lighter-than-fluid"
  | "sphere-density-disagrees-with-kit"
  | "near-neutral-buoyancy"
  | "run-in-too-short"
  | "run-in-unknown"
  | "margin-below-too-short"
  | "diameter-ratio-outside-wall-model"
  | "wall-correction-substituted"
  | "wall-correction-not-applied"
  | "wall-effect-neglected"
  | "wall-factor-outside-creeping-flow"
  | "reynolds-outside-wall-model"
  | "reynolds-outside-drag-model-range"
  | "reynolds-too-large-for-stokes"
  | "oseen-correction-not-applicable"
  | "fluid-temperature-unknown";

export interface DropResults extends DropStatistics {
  /** Indices of drops flagged by the stray-drop test (generalized ESD, in order of removal). */
  strayDrops: number[];
  /** Each drop's own velocity L/tᵢ (m/s). */
  velocities: number[];
}

export interface VelocityResults {
  /** L / t̄ (m/s). */
  measured: number;
  /** K(d/D) = v/v∞ from the applied wall model (1 without a column diameter or with `none`). */
  wallFactor: number;
  /**
   * The factor applied: the lab's choice where it holds, else the published one that covers the case
   * (Haberman–Sayre or Francis for a large d/D, Di Felice beyond creeping flow). Absent in reductions
   * stored before it was recorded, which applied the lab's choice.
   */
  wallCorrection: AppliedWallCorrection;
  /** v∞ = v/K (m/s). */
  corrected: number;
}

interface KeyResultsBase {
  drops: DropStatistics;
  velocity: VelocityResults;
  /** C_D = F / (½ρf v∞² · πd²/4). */
  dragCoefficient: number;
  /** Re = ρf v∞ d / μ. */
  reynolds: number;
}

export interface DragKeyResults extends KeyResultsBase {
  referenceDragCoefficient: number;
  /** C_D / C_D,ref − 1. */
  deviation: number;
}

export interface ViscometryKeyResults extends KeyResultsBase {
  /** Stokes: μ = (ρs − ρf) g d² / (18 v∞) (Pa·s). */
  viscosity: number;
  /** Oseen: μ = μ_Stokes − 3ρf v∞ d/16; null when that is not positive (Re_Stokes ≥ 16/3). */
  viscosityOseen: number | null;
}

/** Relative standard uncertainties (GUM first order), dimensionless. */
export interface ReductionUncertainty {
  inputs: {
    diameter: number;
    /** Of the mass, or of the material density when that was used. */
    sphereMassOrDensity: number;
    fluidDensity: number;
    distance: number;
    meanTime: number;
    /** Drag mode: the fluid viscosity including u(T)·|d ln μ/dT|; 0 in viscometry. */
    fluidViscosity: number;
  };
  /** Absolute standard uncertainties of the mean time (s): Type A s/√n, Type B, combined. */
  meanTime: { typeA: number; typeB: number; combined: number };
  /** Standard uncertainty of the fluid temperature (K), listed as given (or the default). */
  temperature: number;
  sphereDensity: number;
  velocity: number;
  dragForce: number;
  dragCoefficient: number;
  reynolds: number;
  /** Drag mode: of C_D/C_D,ref. */
  dragRatio?: number;
  viscosity?: number;
  viscosityOseen?: number;
}

interface ReductionBase {
  sphereDensity: number;
  sphereDensitySource: "mass" | "material";
  method: { wallCorrection: WallCorrectionMethod; dragModel: DragModel; g: number };
  /** d/D, or null without a column diameter. */
  diameterRatio: number | null;
  drops: DropResults;
  /** F = |ρs − ρf| g πd³/6 (N). */
  dragForce: number;
  /** Stokes relaxation time with added mass, τ = (ρs + ½ρf) d²/(18μ) (s), and length v∞τ (m). */
  relaxationTime: number;
  relaxationLength: number;
  /** Fall from rest to 99 % of v∞ (m): 3.6 v∞τ in Stokes flow, the quasi-steady approach beyond (see `runInLength`). */
  runInNeeded: number;
  uncertainty: ReductionUncertainty;
  /** The GUM budget of the main result (C_D or μ) with all drops, and of the normalised figure. */
  uncertaintyBudget: UncertaintyBudget;
  checks: ReductionCheck[];
}

export interface DragReduction extends ReductionBase, DragKeyResults {
  mode: "drag";
  drops: DropResults;
  fluidViscosity: number;
  /** The same key results without the stray drops; null when none was flagged. */
  withoutStrayDrops: DragKeyResults | null;
}

export interface ViscometryReduction extends ReductionBase, ViscometryKeyResults {
  mode: "viscometry";
  drops: DropResults;
  withoutStrayDrops: ViscometryKeyResults | null;
}

export type Reduction = DragReduction | ViscometryReduction;

const STANDARD_GRAVITY = 9.80665;
/** The wall slowing a sphere by more than this is worth saying when no correction was chosen (our threshold). */
const NEGLIGIBLE_WALL_EFFECT = 0.01;
/**
 * Near-neutral buoyancy: Δρ = ρs − ρf known to worse than 10 % (|Δρ| < 10 u(Δρ)) is warned about, as it
 * then dominates the result's uncertainty (our threshold); under 2 u(Δρ), about 95 % coverage for a
 * normal distribution (GUM G.1.3), its sign is not known and the reduction is refused.
 */
const NEAR_NEUTRAL_BUOYANCY_RATIO = 10;
const UNKNOWN_SIGN_COVERAGE_FACTOR = 2;
/** How the engine's messages name each wall factor. */
const WALL_FACTOR_NAMES: Record<AppliedWallCorrection, string> = {
  faxen: "Faxén's series",
  "haberman-sayre": "Haberman–Sayre's factor",
  francis: "Francis' factor",
  "di-felice": "Di Felice's factor",
  none: "no correction",
};
const MODES: readonly string[] = ["drag", "viscometry"];
const WALL_METHODS: readonly string[] = ["faxen", "haberman-sayre", "francis", "none"];
const DRAG_MODELS: readonly string[] = ["stokes", "oseen", "schiller-naumann"];

/**
 * Reduces one drop log of the falling-sphere experiments (product brief, "The data reduction"): drop
 * statistics and stray drops, velocity with a wall correction, drag force, C_D and Re, and either the
 * comparison with a reference drag law (drag mode) or the Stokes and Oseen viscosities (viscometry),
 * with GUM first-order uncertainties and the checks. Throws `ReductionInputError` listing every problem
 * when the input cannot be reduced.
 */
export function reduceFallingSphere(input: FallingSphereInput): Reduction {
  validate(input);
  const { sphere, fluid, column, drops: times } = input;
  const mode = input.mode;
  const g = input.g ?? STANDARD_GRAVITY;
  const wallMethod = input.wallCorrection ?? "faxen";
  const dragModel = input.dragModel ?? "schiller-naumann";
  const given = input.uncertainties;
  const checks: ReductionCheck[] = [];

  const d = sphere.diameter;
  const L = column.timedDistance;
  const ρf = fluid.density;
  const sphereDensitySource = sphere.mass !== undefined ? "mass" : "material";
  const ρs = sphere.mass !== undefined ? (6 * sphere.mass) / (Math.PI * d * d * d) : (sphere.density as number);
  const densityExcess = Math.abs(ρs - ρf);
  const volume = (Math.PI * d * d * d) / 6;
  // At terminal velocity the drag balances the net weight, whichever way the sphere moves.
  const dragForce = densityExcess * g * volume;

  const diameterRatio = column.innerDiameter !== undefined ? d / column.innerDiameter : null;

  // --- drops and stray drops
  const n = times.length;
  const stats = describeDrops(times);
  const strayTest = findStrayDrops(times, { ...input.strayDropTest, timeResolution: input.timeResolution });
  const strayDrops = strayTest.strayDrops;
  const velocities = new Array<number>(n);
  for (let i = 0; i < n; i++) velocities[i] = L / times[i];

  const physics: PhysicsContext = {
    timedDistance: L,
    diameterRatio,
    wallMethod,
    // Re∞ = ρf d v∞/μ with the fluid's μ in drag mode; in viscometry μ is the Stokes result, so Re∞ = 18ρf v∞²/(Δρ g d).
    reynoldsScale: mode === "drag" ? (ρf * d) / (fluid.viscosity as number) : (18 * ρf) / (densityExcess * g * d),
    reynoldsPower: mode === "drag" ? 1 : 2,
    diameter: d,
    fluidDensity: ρf,
    densityExcess,
    dragForce,
    g,
    fluidViscosity: fluid.viscosity ?? 0,
    dragModel,
  };
  const excluded = strayDrops.length > 0 ? new Uint8Array(n) : null;
  if (excluded) for (const index of strayDrops) excluded[index] = 1;
  const wall = wallCorrectionAt(stats, physics);
  const main = mode === "drag" ? dragKeyResults(stats, wall, physics) : viscometryKeyResults(stats, wall, physics);
  let withoutStrayDrops: DragKeyResults | ViscometryKeyResults | null = null;
  if (excluded) {
    const kept = describeDrops(times, excluded);
    const keptWall = wallCorrectionAt(kept, physics);
    withoutStrayDrops = mode === "drag" ? dragKeyResults(kept, keptWall, physics) : viscometryKeyResults(kept, keptWall, physics);
  }
  const fluidViscosity = fluid.viscosity;

  const μ = mode === "drag" ? (fluidViscosity as number) : (main as ViscometryKeyResults).viscosity;
  const relaxationTime = relaxationTimeOf(ρs, ρf, d, μ);
  const relaxationLength = main.velocity.corrected * relaxationTime;
  const runInNeeded = runInLength({ sphereDensity: ρs, fluidDensity: ρf, g, terminalVelocity: main.velocity.corrected, reynolds: main.reynolds, relaxationTime });

  // --- uncertainty (GUM first order: relative uncertainties in quadrature, weighted by exponents)
  const uDiameter = (given?.diameter ?? DEFAULT_STANDARD_UNCERTAINTIES.diameter) / d;
  const uSphere =
    sphereDensitySource === "mass"
      ? (given?.mass ?? DEFAULT_STANDARD_UNCERTAINTIES.mass) / (sphere.mass as number)
      : (given?.sphereDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.sphereDensity) / ρs;
  const uFluidDensity = (given?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity) / ρf;
  const uDistance = (given?.distance ?? DEFAULT_STANDARD_UNCERTAINTIES.distance) / L;
  const typeA = stats.se ?? 0;
  const typeB = given?.time ?? DEFAULT_STANDARD_UNCERTAINTIES.time;
  const meanTimeCombined = Math.sqrt(typeA * typeA + typeB * typeB);
  const uTime = meanTimeCombined / stats.mean;
  const uTemperature = given?.temperature ?? DEFAULT_STANDARD_UNCERTAINTIES.temperature;
  let uFluidViscosity = 0;
  if (mode === "drag") {
    const fromRecord = (given?.fluidViscosity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidViscosity) / (fluidViscosity as number);
    const fromTemperature = (fluid.viscosityTemperatureCoefficient ?? 0) * uTemperature;
    uFluidViscosity = Math.sqrt(fromRecord * fromRecord + fromTemperature * fromTemperature);
  }
  // Log-sensitivities of ρs (to its own inputs) and of Δρ = |ρs − ρf| to ρs and ρf.
  const sign = ρs >= ρf ? 1 : -1;
  const excessBySphere = (sign * ρs) / densityExcess;
  const excessByFluid = (-sign * ρf) / densityExcess;
  const sphereByDiameter = sphereDensitySource === "mass" ? -3 : 0;
  const relativeInputs: RelativeInputs = {
    diameter: uDiameter,
    sphereMassOrDensity: uSphere,
    fluidDensity: uFluidDensity,
    distance: uDistance,
    meanTime: uTime,
    fluidViscosity: uFluidViscosity,
  };
  // Exponents of each result in (d, m or ρs, ρf, L, t̄, μf); ρs's own dependence on d enters through excessBySphere.
  const uncertainty: ReductionUncertainty = {
    inputs: relativeInputs,
    meanTime: { typeA, typeB, combined: meanTimeCombined },
    temperature: uTemperature,
    sphereDensity: combineRelative(relativeInputs, sphereByDiameter, 1, 0, 0, 0, 0),
    velocity: combineRelative(relativeInputs, 0, 0, 0, 1, -1, 0),
    // F ∝ Δρ d³
    dragForce: combineRelative(relativeInputs, 3 + excessBySphere * sphereByDiameter, excessBySphere, excessByFluid, 0, 0, 0),
    // C_D ∝ Δρ ρf⁻¹ d v⁻² = Δρ ρf⁻¹ d L⁻² t̄²
    dragCoefficient: combineRelative(relativeInputs, 1 + excessBySphere * sphereByDiameter, excessBySphere, excessByFluid - 1, -2, 2, 0),
    reynolds: 0,
  };
  if (mode === "drag") {
    // Re ∝ ρf v d / μf; C_D/C_D,ref has exponents e(C_D) − s·e(Re), s = d ln C_D,ref / d ln Re.
    uncertainty.reynolds = combineRelative(relativeInputs, 1, 0, 1, 1, -1, -1);
    const slope = referenceDragLogSlope(main.reynolds, dragModel);
    uncertainty.dragRatio = combineRelative(
      relativeInputs,
      1 + excessBySphere * sphereByDiameter - slope,
      excessBySphere,
      excessByFluid - 1 - slope,
      -2 - slope,
      2 + slope,
      slope,
    );
  } else {
    const viscometry = main as ViscometryKeyResults;
    // μ ∝ Δρ d² t̄ / L (the brief's example); Re ∝ ρf v²/(Δρ d) = ρf L² t̄⁻² Δρ⁻¹ d⁻¹.
    const diameterInViscosity = 2 + excessBySphere * sphereByDiameter;
    uncertainty.viscosity = combineRelative(relativeInputs, diameterInViscosity, excessBySphere, excessByFluid, -1, 1, 0);
    uncertainty.reynolds = combineRelative(relativeInputs, -1 - excessBySphere * sphereByDiameter, -excessBySphere, 1 - excessByFluid, 2, -2, 0);
    if (viscometry.viscosityOseen !== null) {
      // μ_O = μ_S − c with c = 3ρf v d/16 ∝ ρf L t̄⁻¹ d: exponents are the weighted difference.
      const stokesShare = viscometry.viscosity / viscometry.viscosityOseen;
      const correctionShare = stokesShare - 1;
      uncertainty.viscosityOseen = combineRelative(
      relativeInputs,
        stokesShare * diameterInViscosity - correctionShare,
        stokesShare * excessBySphere,
        stokesShare * excessByFluid - correctionShare,
        -stokesShare - correctionShare,
        stokesShare + correctionShare,
        0,
      );
    }
  }

  // --- near-neutral buoyancy: Δρ against its standard uncertainty from ρs's inputs and ρf's (with u(T) through dρf/dT)
  // Squares summed by hand, not Math.hypot: this runs once per drop log of a class page.
  const uFluidDensityGiven = given?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity;
  const uFluidDensityByTemperature = fluid.temperature !== undefined ? (fluid.densityTemperatureCoefficient ?? 0) * uTemperature : 0;
  const uSphereDensityAbsolute = uncertainty.sphereDensity * ρs;
  const uDensityExcess = Math.sqrt(uSphereDensityAbsolute * uSphereDensityAbsolute + uFluidDensityGiven * uFluidDensityGiven + uFluidDensityByTemperature * uFluidDensityByTemperature);
  if (densityExcess < UNKNOWN_SIGN_COVERAGE_FACTOR * uDensityExcess) {
    throw new ReductionInputError([
      {
        path: "sphere",
        message: `ρs − ρf = ${format(ρs - ρf)} kg/m³ is within twice its standard uncertainty (2u = ${format(2 * uDensityExcess)} kg/m³, about 95 % coverage): whether the sphere sinks or rises cannot be told. Weigh it more finely, or use a sphere much denser or lighter than the fluid`,
      },
    ]);
  }

  const uncertaintyBudget = fallingSphereBudget({
    mode,
    value: mode === "drag" ? main.dragCoefficient : (main as ViscometryKeyResults).viscosity,
    diameter: { value: d, u: given?.diameter ?? DEFAULT_STANDARD_UNCERTAINTIES.diameter },
    sphere:
      sphereDensitySource === "mass"
        ? { source: "mass", value: sphere.mass as number, u: given?.mass ?? DEFAULT_STANDARD_UNCERTAINTIES.mass }
        : { source: "material", value: ρs, u: given?.sphereDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.sphereDensity },
    sphereDensity: ρs,
    fluidDensity: { value: ρf, u: given?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity, temperatureCoefficient: fluid.densityTemperatureCoefficient ?? 0 },
    distance: { value: L, u: given?.distance ?? DEFAULT_STANDARD_UNCERTAINTIES.distance },
    meanTime: { value: stats.mean, typeA: stats.se, typeB, n },
    column: column.innerDiameter !== undefined ? { value: column.innerDiameter, u: given?.columnDiameter ?? DEFAULT_STANDARD_UNCERTAINTIES.columnDiameter } : null,
    wall: { byDiameterRatio: wall.byDiameterRatio, byReynolds: wall.byReynolds, reynoldsPower: physics.reynoldsPower },
    temperature: fluid.temperature !== undefined ? { value: fluid.temperature, u: uTemperature } : null,
    reference: budgetReference(mode, main, fluid, given, dragModel),
  });

  // --- checks
  const requiredDrops = input.requiredDrops ?? 5;
  if (n < requiredDrops) {
    checks.push({
      code: "too-few-drops",
      level: "warn",
      message: `${n} drop${n === 1 ? "" : "s"} timed; the lab asks for at least ${requiredDrops}.`,
    });
  }
  if (n === 1) {
    checks.push({
      code: "single-drop",
      level: "warn",
      message: "A single drop gives no scatter: no standard deviation, interval or Type A uncertainty.",
    });
  }
  if (strayTest.check) checks.push(strayTest.check);
  if (ρs < ρf) {
    checks.push({
      code: "sphere-lighter-than-fluid",
      level: "error",
      message: `The sphere (ρs = ${format(ρs)} kg/m³) is lighter than the fluid (ρf = ${format(ρf)} kg/m³): it would rise, not fall. The figures use |ρs − ρf| and hold only for a sphere timed rising; check the sphere's mass and diameter.`,
    });
  }
  if (sphereDensitySource === "mass" && sphere.density !== undefined) {
    const disagreement = ρs / sphere.density - 1;
    // Our threshold: three combined standard uncertainties of ρs from m and d, but never below 1 %.
    const tolerance = Math.max(0.01, 3 * uncertainty.sphereDensity);
    if (Math.abs(disagreement) > tolerance) {
      checks.push({
        code: "sphere-density-disagrees-with-kit",
        level: "warn",
        message: `The measured mass and diameter give ρs = ${format(ρs)} kg/m³, ${formatPercent(disagreement)} from the kit's ${format(sphere.density)} kg/m³ (more than ${formatPercent(tolerance, false)}).`,
      });
    }
  }
  if (densityExcess < NEAR_NEUTRAL_BUOYANCY_RATIO * uDensityExcess) {
    checks.push({
      code: "near-neutral-buoyancy",
      level: "warn",
      message: `Near-neutral buoyancy: ρs − ρf = ${format(ρs - ρf)} kg/m³ with a standard uncertainty of ${format(uDensityExcess)} kg/m³ (${formatPercent(uDensityExcess / densityExcess, false)}), which then dominates the uncertainty of every result; a small change of the fluid's temperature shifts it too.`,
    });
  }
  if (column.runIn === undefined) {
    checks.push({
      code: "run-in-unknown",
      level: "info",
      message: `No run-in distance given; the sphere needs about ${format(runInNeeded)} m of fall from release to reach ${RUN_IN_VELOCITY_FRACTION * 100} % of its terminal velocity (${runInBasis(runInNeeded, relaxationLength, relaxationTime, main.reynolds)}).`,
    });
  } else if (column.runIn < runInNeeded) {
    checks.push({
      code: "run-in-too-short",
      level: "warn",
      message: `The run-in (${format(column.runIn)} m) is shorter than the ${format(runInNeeded)} m the sphere needs to reach ${RUN_IN_VELOCITY_FRACTION * 100} % of its terminal velocity (${runInBasis(runInNeeded, relaxationLength, relaxationTime, main.reynolds)}): it may still be speeding up in the timed distance.`,
    });
  }
  if (column.marginBelow !== undefined && column.innerDiameter !== undefined && column.marginBelow < column.innerDiameter / 2) {
    checks.push({
      code: "margin-below-too-short",
      level: "warn",
      message: `The lower band is ${format(column.marginBelow)} m above the bottom, less than one column radius (${format(column.innerDiameter / 2)} m): the bottom already slows the sphere before it reaches the band (end effect; Tanner 1963, J. Fluid Mech. 17, 161–170).`,
    });
  }
  if (wallMethod !== "none" && diameterRatio === null) {
    checks.push({
      code: "wall-correction-not-applied",
      level: "info",
      message: "No column inner diameter given: no wall correction was applied (K = 1).",
    });
  }
  if (diameterRatio !== null) wallChecks(checks, diameterRatio, wallMethod, wall, main.velocity.measured, physics);
  if (mode === "drag") {
    const range = DRAG_MODEL_RANGES[dragModel];
    // Past the most accurate range the reference already drifts by several per cent: a warning too, as the brief asks.
    if (main.reynolds > range.infoAbove) {
      checks.push({
        code: "reynolds-outside-drag-model-range",
        level: "warn",
        message: `Re = ${format(main.reynolds)} is above the ${main.reynolds > range.warnAbove ? "range" : "most accurate range"} of the ${dragModel} drag law (Re ≤ ${main.reynolds > range.warnAbove ? range.warnAbove : range.infoAbove}; ${range.source}).`,
      });
    }
  } else {
    const viscometry = main as ViscometryKeyResults;
    if (main.reynolds > 0.1) {
      checks.push({
        code: "reynolds-too-large-for-stokes",
        level: "warn",
        message: `Re = ${format(main.reynolds)}: Stokes' law underestimates the drag by about 3Re/16 = ${formatPercent((3 * main.reynolds) / 16, false)} (Oseen), so the Stokes viscosity is high; compare the Oseen-corrected value.`,
      });
    }
    if (viscometry.viscosityOseen === null) {
      checks.push({
        code: "oseen-correction-not-applicable",
        level: "warn",
        message: `Re = ${format(main.reynolds)} ≥ 16/3: the Oseen correction would give a viscosity ≤ 0; this is no longer a creeping flow.`,
      });
    }
  }
  if (fluid.temperature === undefined) {
    checks.push({
      code: "fluid-temperature-unknown",
      level: "info",
      message: "No fluid temperature given: the viscosity cannot be matched to the drop temperature.",
    });
  }

  // Built as literals, not with object spread: spreading a dozen fields per log was the bench's hot spot.
  const dropResults: DropResults = {
    n: stats.n,
    mean: stats.mean,
    sd: stats.sd,
    se: stats.se,
    ci95: stats.ci95,
    strayDrops,
    velocities,
  };
  const method = { wallCorrection: wallMethod, dragModel, g };
  if (mode === "drag") {
    const drag = main as DragKeyResults;
    return {
      mode,
      sphereDensity: ρs,
      sphereDensitySource,
      method,
      diameterRatio,
      drops: dropResults,
      velocity: drag.velocity,
      dragForce,
      dragCoefficient: drag.dragCoefficient,
      reynolds: drag.reynolds,
      fluidViscosity: fluidViscosity as number,
      referenceDragCoefficient: drag.referenceDragCoefficient,
      deviation: drag.deviation,
      relaxationTime,
      relaxationLength,
      runInNeeded,
      withoutStrayDrops: withoutStrayDrops as DragKeyResults | null,
      uncertainty,
      uncertaintyBudget,
      checks,
    };
  }
  const viscometry = main as ViscometryKeyResults;
  return {
    mode,
    sphereDensity: ρs,
    sphereDensitySource,
    method,
    diameterRatio,
    drops: dropResults,
    velocity: viscometry.velocity,
    dragForce,
    dragCoefficient: viscometry.dragCoefficient,
    reynolds: viscometry.reynolds,
    viscosity: viscometry.viscosity,
    viscosityOseen: viscometry.viscosityOseen,
    relaxationTime,
    relaxationLength,
    runInNeeded,
    withoutStrayDrops: withoutStrayDrops as ViscometryKeyResults | null,
    uncertainty,
    uncertaintyBudget,
    checks,
  };
}

/** How the run-in was estimated, for a check's message (built only when a check is given: it formats numbers). */
function runInBasis(runInNeeded: number, relaxationLength: number, relaxationTime: number, reynolds: number): string {
  return reynolds <= 0.1
    ? `${format(runInNeeded / relaxationLength)} relaxation lengths, with τ = (ρs + ½ρf) d²/(18μ) = ${format(relaxationTime)} s`
    : `the approach with added mass and the standard drag curve at Re = ${format(reynolds)}`;
}

/**
 * The wall factor's checks: which factor was applied when it is not the lab's choice, how much the
 * wall slows the sphere when no correction was chosen, and loudly (an error) a d/D no model covers.
 * Such a hand-in is still reduced, with the nearest model extrapolated: the times are measured data
 * the student must be able to hand in, and staff see the error on it, where a refusal would hide it.
 */
function wallChecks(checks: ReductionCheck[], diameterRatio: number, chosen: WallCorrectionMethod, wall: WallCorrection, measuredVelocity: number, physics: PhysicsContext): void {
  let beyondCreepingFlow = wall.applied === "di-felice";
  let factor = wall.factor;
  if (chosen === "none") {
    // What the wall does, as the reduction would have corrected it; at the measured velocity's Re, an estimate.
    const reynolds = physics.reynoldsScale * (physics.reynoldsPower === 1 ? measuredVelocity : measuredVelocity * measuredVelocity);
    beyondCreepingFlow = inertialWallShift(diameterRatio, reynolds) > CREEPING_FLOW_WALL_TOLERANCE;
    const estimate: AppliedWallCorrection = beyondCreepingFlow ? "di-felice" : diameterRatio <= WALL_MODEL_RANGES["haberman-sayre"].maxDiameterRatio ? "haberman-sayre" : "francis";
    factor = estimate === "di-felice" ? diFeliceWallFactor(diameterRatio, reynolds) : wallFactor(diameterRatio, estimate);
    if (1 - factor > NEGLIGIBLE_WALL_EFFECT) {
      checks.push({
        code: "wall-effect-neglected",
        level: "warn",
        message: `No wall correction was chosen, but at d/D = ${format(diameterRatio)} the wall slows the sphere to about K = ${format(factor)} of its unbounded velocity (${WALL_FACTOR_NAMES[estimate]}): the results are computed from a velocity ${formatPercent(1 - factor, false)} below v∞.`,
      });
    }
  } else if (wall.applied === "di-felice") {
    const creepingValue = diameterRatio <= WALL_MODEL_RANGES[chosen].maxDiameterRatio ? `; ${WALL_FACTOR_NAMES[chosen]} would give K = ${format(wallFactor(diameterRatio, chosen))}` : "";
    checks.push({
      code: "wall-factor-outside-creeping-flow",
      level: "warn",
      message: `Re = ${format(wall.reynolds)} is beyond the creeping flow ${WALL_FACTOR_NAMES[chosen]} assumes: at d/D = ${format(diameterRatio)} inertia weakens the wall effect by more than ${formatPercent(CREEPING_FLOW_WALL_TOLERANCE, false)} in K, so Di Felice's (1996) factor for finite Re was used, K = ${format(wall.factor)}${creepingValue}.`,
    });
    if (wall.reynolds > DI_FELICE_MAX_REYNOLDS) {
      checks.push({
        code: "reynolds-outside-wall-model",
        level: "warn",
        message: `Re = ${format(wall.reynolds)} is above the range Di Felice's wall factor was fitted to (Re ≤ ${DI_FELICE_MAX_REYNOLDS}; ${WALL_MODEL_RANGES["di-felice"].source}): K = ${format(wall.factor)} is extrapolated.`,
      });
    }
  } else if (wall.applied !== chosen) {
    const range = WALL_MODEL_RANGES[chosen];
    checks.push({
      code: "wall-correction-substituted",
      level: "warn",
      message: `d/D = ${format(diameterRatio)} is beyond the range of ${WALL_FACTOR_NAMES[chosen]} (d/D ≤ ${range.maxDiameterRatio}; ${range.source}), which would give K = ${format(wallFactor(diameterRatio, chosen))}: ${WALL_FACTOR_NAMES[wall.applied]} (to d/D ≤ ${WALL_MODEL_RANGES[wall.applied as Exclude<AppliedWallCorrection, "none">].maxDiameterRatio}) was used instead, K = ${format(wall.factor)}.`,
    });
  }
  const widest = beyondCreepingFlow ? WALL_MODEL_RANGES["di-felice"] : WALL_MODEL_RANGES.francis;
  if (diameterRatio > widest.maxDiameterRatio) {
    checks.push({
      code: "diameter-ratio-outside-wall-model",
      level: "error",
      message: `d/D = ${format(diameterRatio)} is beyond every wall factor's range (${beyondCreepingFlow ? "beyond creeping flow, Di Felice's" : "in creeping flow, Francis'"} reaches d/D ≤ ${widest.maxDiameterRatio}; ${widest.source})${chosen === "none" ? "" : `: K = ${format(factor)} is extrapolated`}, and the results are not reliable. Use a smaller sphere or a wider column.`,
    });
  }
}

/** What the normalised figure's reference depends on: the drag law at Re, or the lot's μ_ref(T). */
function budgetReference(
  mode: ReductionMode,
  main: DragKeyResults | ViscometryKeyResults,
  fluid: FallingSphereInput["fluid"],
  given: StandardUncertainties | undefined,
  dragModel: DragModel,
): Parameters<typeof fallingSphereBudget>[0]["reference"] {
  const value = mode === "drag" ? (fluid.viscosity as number) : fluid.referenceViscosity;
  if (value === undefined) return null;
  const viscosity = {
    value,
    u: given?.fluidViscosity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidViscosity,
    degreesOfFreedom: fluid.viscosityDegreesOfFreedom ?? Number.POSITIVE_INFINITY,
    temperatureCoefficient: fluid.viscosityTemperatureCoefficient ?? 0,
  };
  if (mode === "viscometry") return { kind: "viscometry", viscosity };
  const drag = main as DragKeyResults;
  return { kind: "drag", ratio: drag.dragCoefficient / drag.referenceDragCoefficient, slope: referenceDragLogSlope(drag.reynolds, dragModel), viscosity };
}

interface PhysicsContext {
  timedDistance: number;
  diameterRatio: number | null;
  wallMethod: WallCorrectionMethod;
  /** Re∞ = reynoldsScale · v∞^reynoldsPower (see `resolveWallCorrection`). */
  reynoldsScale: number;
  reynoldsPower: 1 | 2;
  diameter: number;
  fluidDensity: number;
  densityExcess: number;
  dragForce: number;
  g: number;
  fluidViscosity: number;
  dragModel: DragModel;
}

/** No column: nothing to correct for. */
const NO_WALL: WallCorrection = { factor: 1, applied: "none", reynolds: 0, iterations: 0, byDiameterRatio: 0, byReynolds: 0 };

/** The wall factor for a mean time: Di Felice's depends on the velocity, so each set of drops gets its own. */
function wallCorrectionAt(drops: DropStatistics, physics: PhysicsContext): WallCorrection {
  if (physics.diameterRatio === null) return NO_WALL;
  return resolveWallCorrection(physics.diameterRatio, physics.wallMethod, physics.timedDistance / drops.mean, physics.reynoldsScale, physics.reynoldsPower);
}

function velocityResults(drops: DropStatistics, wall: WallCorrection, physics: PhysicsContext): VelocityResults {
  const measured = physics.timedDistance / drops.mean;
  return { measured, wallFactor: wall.factor, wallCorrection: wall.applied, corrected: measured / wall.factor };
}

/** C_D = F / (½ρf v∞² · πd²/4). */
function dragCoefficientAt(corrected: number, physics: PhysicsContext): number {
  const { diameter: d, fluidDensity: ρf } = physics;
  return physics.dragForce / (0.5 * ρf * corrected * corrected * ((Math.PI * d * d) / 4));
}

function dragKeyResults(drops: DropStatistics, wall: WallCorrection, physics: PhysicsContext): DragKeyResults {
  const velocity = velocityResults(drops, wall, physics);
  const dragCoefficient = dragCoefficientAt(velocity.corrected, physics);
  const reynolds = (physics.fluidDensity * velocity.corrected * physics.diameter) / physics.fluidViscosity;
  const reference = referenceDragCoefficient(reynolds, physics.dragModel);
  return {
    drops,
    velocity,
    dragCoefficient,
    reynolds,
    referenceDragCoefficient: reference,
    deviation: dragCoefficient / reference - 1,
  };
}

function viscometryKeyResults(drops: DropStatistics, wall: WallCorrection, physics: PhysicsContext): ViscometryKeyResults {
  const velocity = velocityResults(drops, wall, physics);
  const { diameter: d, fluidDensity: ρf } = physics;
  const viscosity = (physics.densityExcess * physics.g * d * d) / (18 * velocity.corrected);
  const oseen = viscosity - (3 * ρf * velocity.corrected * d) / 16;
  return {
    drops,
    velocity,
    dragCoefficient: dragCoefficientAt(velocity.corrected, physics),
    reynolds: (ρf * velocity.corrected * d) / viscosity,
    viscosity,
    viscosityOseen: oseen > 0 ? oseen : null,
  };
}

/** Relative standard uncertainties of the six inputs, in the order of {@link combineRelative}'s exponents. */
interface RelativeInputs {
  diameter: number;
  sphereMassOrDensity: number;
  fluidDensity: number;
  distance: number;
  meanTime: number;
  fluidViscosity: number;
}

/** GUM first order for a product of powers: u_r(y) = √Σ (eᵢ·u_r(xᵢ))² with exponents eᵢ. */
function combineRelative(
  u: RelativeInputs,
  diameter: number,
  sphereMassOrDensity: number,
  fluidDensity: number,
  distance: number,
  meanTime: number,
  fluidViscosity: number,
): number {
  return Math.sqrt(
    (diameter * u.diameter) ** 2 +
      (sphereMassOrDensity * u.sphereMassOrDensity) ** 2 +
      (fluidDensity * u.fluidDensity) ** 2 +
      (distance * u.distance) ** 2 +
      (meanTime * u.meanTime) ** 2 +
      (fluidViscosity * u.fluidViscosity) ** 2,
  );
}

function validate(input: FallingSphereInput): void {
  const issues = new IssueList();
  if (typeof input !== "object" || input === null) {
    issues.add("", "must be an object");
    issues.throwIfAny();
  }
  if (!MODES.includes(input.mode)) issues.add("mode", 'must be "drag" or "viscometry"');
  const sphere = input.sphere ?? ({} as FallingSphereInput["sphere"]);
  const fluid = input.fluid ?? ({} as FallingSphereInput["fluid"]);
  const column = input.column ?? ({} as FallingSphereInput["column"]);
  issues.positive("sphere.diameter", sphere.diameter);
  if (sphere.mass === undefined && sphere.density === undefined) {
    issues.add("sphere", "give the sphere's mass or its material density");
  }
  issues.optionalPositive("sphere.mass", sphere.mass);
  issues.optionalPositive("sphere.density", sphere.density);
  issues.positive("fluid.density", fluid.density);
  if (input.mode === "drag" && fluid.viscosity === undefined) {
    issues.add("fluid.viscosity", "is required in drag mode");
  } else {
    issues.optionalPositive("fluid.viscosity", fluid.viscosity);
  }
  issues.optionalFinite("fluid.temperature", fluid.temperature);
  if (typeof fluid.temperature === "number" && fluid.temperature <= -273.15) {
    issues.add("fluid.temperature", "must be above absolute zero");
  }
  issues.optionalFinite("fluid.viscosityTemperatureCoefficient", fluid.viscosityTemperatureCoefficient);
  issues.optionalPositive("fluid.referenceViscosity", fluid.referenceViscosity);
  issues.optionalFinite("fluid.densityTemperatureCoefficient", fluid.densityTemperatureCoefficient);
  if (fluid.viscosityDegreesOfFreedom !== undefined && !(fluid.viscosityDegreesOfFreedom >= 1)) {
    issues.add("fluid.viscosityDegreesOfFreedom", "must be at least 1");
  }
  issues.positive("column.timedDistance", column.timedDistance);
  issues.optionalPositive("column.innerDiameter", column.innerDiameter);
  issues.optionalNonNegative("column.runIn", column.runIn);
  issues.optionalNonNegative("column.marginBelow", column.marginBelow);
  if (!Array.isArray(input.drops) || input.drops.length === 0) {
    issues.add("drops", "at least one drop time is needed");
  } else {
    // Checked inline; a drop's path string is only built when that drop fails.
    for (let i = 0; i < input.drops.length; i++) {
      const time = input.drops[i];
      if (!(typeof time === "number" && time > 0 && time < Number.POSITIVE_INFINITY)) issues.positive(`drops.${i}`, time);
    }
  }
  issues.optionalPositive("g", input.g);
  if (input.wallCorrection !== undefined && !WALL_METHODS.includes(input.wallCorrection)) {
    issues.add("wallCorrection", `must be one of ${WALL_METHODS.join(", ")}`);
  }
  if (input.dragModel !== undefined && !DRAG_MODELS.includes(input.dragModel)) {
    issues.add("dragModel", `must be one of ${DRAG_MODELS.join(", ")}`);
  }
  if (input.uncertainties !== undefined) {
    for (const [name, value] of Object.entries(input.uncertainties)) {
      issues.optionalNonNegative(`uncertainties.${name}`, value);
    }
  }
  const alpha = input.strayDropTest?.alpha;
  if (alpha !== undefined && !(alpha > 0 && alpha < 1)) issues.add("strayDropTest.alpha", "must be between 0 and 1");
  const maxStrayDrops = input.strayDropTest?.maxStrayDrops;
  if (maxStrayDrops !== undefined && !(Number.isInteger(maxStrayDrops) && maxStrayDrops >= 0)) {
    issues.add("strayDropTest.maxStrayDrops", "must be a whole number ≥ 0");
  }
  issues.optionalNonNegative("timeResolution", input.timeResolution);
  if (input.requiredDrops !== undefined && !(Number.isInteger(input.requiredDrops) && input.requiredDrops >= 1)) {
    issues.add("requiredDrops", "must be a whole number ≥ 1");
  }
  issues.throwIfAny();

  // Relations between fields, checked once each field is known to be a positive number.
  const d = sphere.diameter;
  // d·d·d rather than d ** 3: the same expression as the reduction itself, and no Math.pow per log.
  const ρs = sphere.mass !== undefined ? (6 * sphere.mass) / (Math.PI * d * d * d) : (sphere.density as number);
  if (ρs === fluid.density) {
    issues.add("sphere", "the sphere has the fluid's density: a neutrally buoyant sphere does not settle");
  }
  if (column.innerDiameter !== undefined && sphere.diameter >= column.innerDiameter) {
    issues.add("column.innerDiameter", "must be larger than the sphere diameter");
  }
  issues.throwIfAny();
}

/** Three significant figures, as a check message needs. */
function format(value: number): string {
  return Number(value.toPrecision(3)).toString();
}

function formatPercent(fraction: number, signed = true): string {
  const percent = Number((fraction * 100).toPrecision(2));
  return `${signed && percent > 0 ? "+" : ""}${percent} %`;
}
