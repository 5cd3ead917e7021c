import type { DragModel } from "./drag";
import { IssueList } from "./errors";
import { neglectedWallOf, reductionChecks, refuseUnknownBuoyancy } from "./falling-sphere-checks";
import { dropSetsOf, keyResultsOf, kinematicsOf, runInOf, sphereDensityOf, wallCorrectionAt } from "./falling-sphere-kinematics";
import { budgetContextOf, densityExcessUncertainty, relativeUncertainty, type StandardUncertainties } from "./falling-sphere-uncertainty";
import type { DropStatistics } from "./statistics";
import { fallingSphereBudget, type UncertaintyBudget } from "./uncertainty-budget";
import type { AppliedWallCorrection, WallCorrectionMethod } from "./wall";

export type ReductionMode = "drag" | "viscometry";

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
  const kinematics = kinematicsOf(input);
  const drops = dropSetsOf(input);
  const wall = wallCorrectionAt(drops.all, kinematics);
  const main = keyResultsOf(drops.all, wall, kinematics);
  const withoutStrayDrops = drops.kept ? keyResultsOf(drops.kept, wallCorrectionAt(drops.kept, kinematics), kinematics) : null;
  const runIn = runInOf(main, kinematics);
  const uncertainty = relativeUncertainty(input, kinematics, drops.all, main);
  const uDensityExcess = densityExcessUncertainty(input, kinematics, uncertainty);
  refuseUnknownBuoyancy(kinematics, uDensityExcess);
  const uncertaintyBudget = fallingSphereBudget(budgetContextOf(input, kinematics, drops.all, wall, main, uncertainty));
  const neglectedWall = neglectedWallOf(kinematics, main.velocity.measured);
  const checks = reductionChecks({ input, kinematics, drops, wall, main, runIn, uncertainty, uDensityExcess, neglectedWall });

  // Built as literals, not with object spread: spreading a dozen fields per log was the bench's hot spot.
  const { all } = drops;
  const dropResults: DropResults = {
    n: all.n,
    mean: all.mean,
    sd: all.sd,
    se: all.se,
    ci95: all.ci95,
    strayDrops: drops.strayTest.strayDrops,
    velocities: drops.velocities,
  };
  const method = { wallCorrection: kinematics.wallMethod, dragModel: kinematics.dragModel, g: kinematics.g };
  if (input.mode === "drag") {
    const drag = main as DragKeyResults;
    return {
      mode: "drag",
      sphereDensity: kinematics.sphereDensity,
      sphereDensitySource: kinematics.sphereDensitySource,
      method,
      diameterRatio: kinematics.diameterRatio,
      drops: dropResults,
      velocity: drag.velocity,
      dragForce: kinematics.dragForce,
      dragCoefficient: drag.dragCoefficient,
      reynolds: drag.reynolds,
      fluidViscosity: input.fluid.viscosity as number,
      referenceDragCoefficient: drag.referenceDragCoefficient,
      deviation: drag.deviation,
      relaxationTime: runIn.relaxationTime,
      relaxationLength: runIn.relaxationLength,
      runInNeeded: runIn.runInNeeded,
      withoutStrayDrops: withoutStrayDrops as DragKeyResults | null,
      uncertainty,
      uncertaintyBudget,
      checks,
    };
  }
  const viscometry = main as ViscometryKeyResults;
  return {
    mode: "viscometry",
    sphereDensity: kinematics.sphereDensity,
    sphereDensitySource: kinematics.sphereDensitySource,
    method,
    diameterRatio: kinematics.diameterRatio,
    drops: dropResults,
    velocity: viscometry.velocity,
    dragForce: kinematics.dragForce,
    dragCoefficient: viscometry.dragCoefficient,
    reynolds: viscometry.reynolds,
    viscosity: viscometry.viscosity,
    viscosityOseen: viscometry.viscosityOseen,
    relaxationTime: runIn.relaxationTime,
    relaxationLength: runIn.relaxationLength,
    runInNeeded: runIn.runInNeeded,
    withoutStrayDrops: withoutStrayDrops as ViscometryKeyResults | null,
    uncertainty,
    uncertaintyBudget,
    checks,
  };
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
  if (sphereDensityOf(sphere) === fluid.density) {
    issues.add("sphere", "the sphere has the fluid's density: a neutrally buoyant sphere does not settle");
  }
  if (column.innerDiameter !== undefined && sphere.diameter >= column.innerDiameter) {
    issues.add("column.innerDiameter", "must be larger than the sphere diameter");
  }
  issues.throwIfAny();
}
