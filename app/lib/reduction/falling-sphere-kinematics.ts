/**
 * The kinematics of a falling-sphere reduction (product brief, "The data reduction"): the sphere's
 * density and the net weight the drag balances, the drops' statistics and stray drops, the measured and
 * wall-corrected terminal velocity, C_D and Re, then the reference drag (drag mode) or the Stokes and
 * Oseen viscosities (viscometry), and the run-in the sphere needs. Pure: no I/O.
 */
import { referenceDragCoefficient, type DragModel } from "./drag";
import type { DragKeyResults, FallingSphereInput, ReductionMode, VelocityResults, ViscometryKeyResults } from "./falling-sphere";
import { relaxationTime as relaxationTimeOf, runInLength } from "./run-in";
import { describeDrops, type DropStatistics } from "./statistics";
import { findStrayDrops, type StrayDropFinding } from "./stray-drops";
import { resolveWallCorrection, type WallCorrection, type WallCorrectionMethod } from "./wall";

const STANDARD_GRAVITY = 9.80665;

/** What the results of one drop log depend on besides its drop times, worked out once for all its sets of drops. */
export interface Kinematics {
  mode: ReductionMode;
  diameter: number;
  sphereDensity: number;
  sphereDensitySource: "mass" | "material";
  fluidDensity: number;
  /** |ρs − ρf| (kg/m³). */
  densityExcess: number;
  /** F = |ρs − ρf| g πd³/6 (N). */
  dragForce: number;
  g: number;
  /** The lot's μ in drag mode; 0 in viscometry without one. */
  fluidViscosity: number;
  timedDistance: number;
  /** d/D, or null without a column diameter. */
  diameterRatio: number | null;
  wallMethod: WallCorrectionMethod;
  dragModel: DragModel;
  /** Re∞ = reynoldsScale · v∞^reynoldsPower (see `resolveWallCorrection`). */
  reynoldsScale: number;
  reynoldsPower: 1 | 2;
}

/** ρs = 6m/(πd³) from the measured mass, else the kit's material density. */
export function sphereDensityOf(sphere: FallingSphereInput["sphere"]): number {
  const d = sphere.diameter;
  // d·d·d rather than d ** 3: no Math.pow per log.
  return sphere.mass !== undefined ? (6 * sphere.mass) / (Math.PI * d * d * d) : (sphere.density as number);
}

export function kinematicsOf(input: FallingSphereInput): Kinematics {
  const { mode, sphere, fluid, column } = input;
  const g = input.g ?? STANDARD_GRAVITY;
  const d = sphere.diameter;
  const ρf = fluid.density;
  const sphereDensity = sphereDensityOf(sphere);
  const densityExcess = Math.abs(sphereDensity - ρf);
  const volume = (Math.PI * d * d * d) / 6;
  return {
    mode,
    diameter: d,
    sphereDensity,
    sphereDensitySource: sphere.mass !== undefined ? "mass" : "material",
    fluidDensity: ρf,
    densityExcess,
    // At terminal velocity the drag balances the net weight, whichever way the sphere moves.
    dragForce: densityExcess * g * volume,
    g,
    fluidViscosity: fluid.viscosity ?? 0,
    timedDistance: column.timedDistance,
    diameterRatio: column.innerDiameter !== undefined ? d / column.innerDiameter : null,
    wallMethod: input.wallCorrection ?? "faxen",
    dragModel: input.dragModel ?? "schiller-naumann",
    // Re∞ = ρf d v∞/μ with the fluid's μ in drag mode; in viscometry μ is the Stokes result, so Re∞ = 18ρf v∞²/(Δρ g d).
    reynoldsScale: mode === "drag" ? (ρf * d) / (fluid.viscosity as number) : (18 * ρf) / (densityExcess * g * d),
    reynoldsPower: mode === "drag" ? 1 : 2,
  };
}

export interface DropSets {
  all: DropStatistics;
  /** The drops without the stray ones; null when none was flagged. */
  kept: DropStatistics | null;
  strayTest: StrayDropFinding;
  /** Each drop's own velocity L/tᵢ (m/s). */
  velocities: number[];
}

export function dropSetsOf(input: FallingSphereInput): DropSets {
  const times = input.drops;
  const n = times.length;
  const all = describeDrops(times);
  const strayTest = findStrayDrops(times, { ...input.strayDropTest, timeResolution: input.timeResolution });
  const velocities = new Array<number>(n);
  for (let i = 0; i < n; i++) velocities[i] = input.column.timedDistance / times[i];
  let kept: DropStatistics | null = null;
  if (strayTest.strayDrops.length > 0) {
    const excluded = new Uint8Array(n);
    for (const index of strayTest.strayDrops) excluded[index] = 1;
    kept = describeDrops(times, excluded);
  }
  return { all, kept, strayTest, velocities };
}

/** No column: nothing to correct for. */
const NO_WALL: WallCorrection = { factor: 1, applied: "none", reynolds: 0, iterations: 0, byDiameterRatio: 0, byReynolds: 0 };

/** The wall factor for a mean time: Di Felice's depends on the velocity, so each set of drops gets its own. */
export function wallCorrectionAt(drops: DropStatistics, kinematics: Kinematics): WallCorrection {
  if (kinematics.diameterRatio === null) return NO_WALL;
  return resolveWallCorrection(
    kinematics.diameterRatio,
    kinematics.wallMethod,
    kinematics.timedDistance / drops.mean,
    kinematics.reynoldsScale,
    kinematics.reynoldsPower,
  );
}

/** The key results of one set of drops in the log's mode. */
export function keyResultsOf(drops: DropStatistics, wall: WallCorrection, kinematics: Kinematics): DragKeyResults | ViscometryKeyResults {
  return kinematics.mode === "drag" ? dragKeyResults(drops, wall, kinematics) : viscometryKeyResults(drops, wall, kinematics);
}

function velocityResults(drops: DropStatistics, wall: WallCorrection, kinematics: Kinematics): VelocityResults {
  const measured = kinematics.timedDistance / drops.mean;
  return { measured, wallFactor: wall.factor, wallCorrection: wall.applied, corrected: measured / wall.factor };
}

/** C_D = F / (½ρf v∞² · πd²/4). */
function dragCoefficientAt(corrected: number, kinematics: Kinematics): number {
  const { diameter: d, fluidDensity: ρf } = kinematics;
  return kinematics.dragForce / (0.5 * ρf * corrected * corrected * ((Math.PI * d * d) / 4));
}

function dragKeyResults(drops: DropStatistics, wall: WallCorrection, kinematics: Kinematics): DragKeyResults {
  const velocity = velocityResults(drops, wall, kinematics);
  const dragCoefficient = dragCoefficientAt(velocity.corrected, kinematics);
  const reynolds = (kinematics.fluidDensity * velocity.corrected * kinematics.diameter) / kinematics.fluidViscosity;
  const reference = referenceDragCoefficient(reynolds, kinematics.dragModel);
  return {
    drops,
    velocity,
    dragCoefficient,
    reynolds,
    referenceDragCoefficient: reference,
    deviation: dragCoefficient / reference - 1,
  };
}

function viscometryKeyResults(drops: DropStatistics, wall: WallCorrection, kinematics: Kinematics): ViscometryKeyResults {
  const velocity = velocityResults(drops, wall, kinematics);
  const { diameter: d, fluidDensity: ρf } = kinematics;
  const viscosity = (kinematics.densityExcess * kinematics.g * d * d) / (18 * velocity.corrected);
  const oseen = viscosity - (3 * ρf * velocity.corrected * d) / 16;
  return {
    drops,
    velocity,
    dragCoefficient: dragCoefficientAt(velocity.corrected, kinematics),
    reynolds: (ρf * velocity.corrected * d) / viscosity,
    viscosity,
    viscosityOseen: oseen > 0 ? oseen : null,
  };
}

export interface RunIn {
  /** Stokes relaxation time with added mass, τ = (ρs + ½ρf) d²/(18μ) (s), and length v∞τ (m). */
  relaxationTime: number;
  relaxationLength: number;
  /** Fall from rest to 99 % of v∞ (m). */
  runInNeeded: number;
}

/** How long and how far the sphere takes to reach its terminal velocity, with the fluid's μ (drag) or the Stokes μ (viscometry). */
export function runInOf(main: DragKeyResults | ViscometryKeyResults, kinematics: Kinematics): RunIn {
  const { sphereDensity: ρs, fluidDensity: ρf } = kinematics;
  const μ = kinematics.mode === "drag" ? kinematics.fluidViscosity : (main as ViscometryKeyResults).viscosity;
  const relaxationTime = relaxationTimeOf(ρs, ρf, kinematics.diameter, μ);
  const terminalVelocity = main.velocity.corrected;
  return {
    relaxationTime,
    relaxationLength: terminalVelocity * relaxationTime,
    runInNeeded: runInLength({
      sphereDensity: ρs,
      fluidDensity: ρf,
      g: kinematics.g,
      terminalVelocity,
      reynolds: main.reynolds,
      relaxationTime,
    }),
  };
}
