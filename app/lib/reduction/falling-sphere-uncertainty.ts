/**
 * GUM first-order uncertainties of a falling-sphere reduction: the relative standard uncertainties of
 * the inputs, each result's from a named table of its exponents (relative uncertainties combine in
 * quadrature, weighted by the exponents), Δρ's absolute uncertainty, and the context of the full budget.
 * Pure: no I/O.
 */
import { referenceDragLogSlope } from "./drag";
import type { DragKeyResults, FallingSphereInput, ReductionUncertainty, ViscometryKeyResults } from "./falling-sphere";
import type { Kinematics } from "./falling-sphere-kinematics";
import type { DropStatistics } from "./statistics";
import type { FallingSphereBudgetContext } from "./uncertainty-budget";
import type { WallCorrection } from "./wall";

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

/** Relative standard uncertainties of the six inputs; also the keys of {@link InputExponents}. */
type RelativeInputs = ReductionUncertainty["inputs"];
/** A result's exponent in each input, ρs's and Δρ's dependence on them folded in. */
type InputExponents = RelativeInputs;

/**
 * Exponents of a result in the physical quantities: d (as a length), ρs and Δρ = |ρs − ρf| (each as
 * itself), ρf (without Δρ's dependence on it), L, t̄ and the lot's μ. A quantity left out has exponent 0.
 */
interface QuantityExponents {
  diameter?: number;
  sphereDensity?: number;
  densityDifference?: number;
  fluidDensity?: number;
  distance?: number;
  meanTime?: number;
  fluidViscosity?: number;
}

/** The results as products of powers (product brief, "The data reduction"). */
const SENSITIVITIES = {
  sphereDensity: { sphereDensity: 1 },
  // v = L/t̄
  velocity: { distance: 1, meanTime: -1 },
  // F ∝ Δρ d³
  dragForce: { diameter: 3, densityDifference: 1 },
  // C_D ∝ Δρ ρf⁻¹ d v⁻² = Δρ ρf⁻¹ d L⁻² t̄²
  dragCoefficient: { diameter: 1, densityDifference: 1, fluidDensity: -1, distance: -2, meanTime: 2 },
  // Drag mode: Re ∝ ρf v d / μf
  reynoldsWithLotViscosity: { diameter: 1, fluidDensity: 1, distance: 1, meanTime: -1, fluidViscosity: -1 },
  // μ ∝ Δρ d² t̄ / L (the brief's example)
  viscosity: { diameter: 2, densityDifference: 1, distance: -1, meanTime: 1 },
  // Viscometry: Re ∝ ρf v²/(Δρ d) = ρf L² t̄⁻² Δρ⁻¹ d⁻¹
  reynoldsWithStokesViscosity: { diameter: -1, densityDifference: -1, fluidDensity: 1, distance: 2, meanTime: -2 },
  // Oseen's correction c = 3ρf v d/16 ∝ ρf L t̄⁻¹ d
  oseenCorrection: { diameter: 1, fluidDensity: 1, distance: 1, meanTime: -1 },
} as const satisfies Record<string, QuantityExponents>;

/** Log-sensitivities of Δρ = |ρs − ρf| to ρs and ρf, and of ρs to d (−3 on the mass route, ρs = 6m/(πd³)). */
interface DensitySplit {
  excessBySphere: number;
  excessByFluid: number;
  sphereByDiameter: number;
}

function inputExponents(e: QuantityExponents, split: DensitySplit): InputExponents {
  const densityDifference = e.densityDifference ?? 0;
  return {
    diameter: (e.diameter ?? 0) + ((e.sphereDensity ?? 0) + densityDifference * split.excessBySphere) * split.sphereByDiameter,
    sphereMassOrDensity: (e.sphereDensity ?? 0) + densityDifference * split.excessBySphere,
    fluidDensity: (e.fluidDensity ?? 0) + densityDifference * split.excessByFluid,
    distance: e.distance ?? 0,
    meanTime: e.meanTime ?? 0,
    fluidViscosity: e.fluidViscosity ?? 0,
  };
}

/** The exponents of a·y₁ − b·y₂ in relative terms, for results that are not a single product of powers. */
function weightedDifference(a: number, first: InputExponents, b: number, second: InputExponents): InputExponents {
  return {
    diameter: a * first.diameter - b * second.diameter,
    sphereMassOrDensity: a * first.sphereMassOrDensity - b * second.sphereMassOrDensity,
    fluidDensity: a * first.fluidDensity - b * second.fluidDensity,
    distance: a * first.distance - b * second.distance,
    meanTime: a * first.meanTime - b * second.meanTime,
    fluidViscosity: a * first.fluidViscosity - b * second.fluidViscosity,
  };
}

/** GUM first order for a product of powers: u_r(y) = √Σ (eᵢ·u_r(xᵢ))² with exponents eᵢ. */
function combineRelative(u: RelativeInputs, e: InputExponents): number {
  return Math.sqrt(
    (e.diameter * u.diameter) ** 2 +
      (e.sphereMassOrDensity * u.sphereMassOrDensity) ** 2 +
      (e.fluidDensity * u.fluidDensity) ** 2 +
      (e.distance * u.distance) ** 2 +
      (e.meanTime * u.meanTime) ** 2 +
      (e.fluidViscosity * u.fluidViscosity) ** 2,
  );
}

/** The relative uncertainties of the inputs and of every result of the log with all drops. */
export function relativeUncertainty(
  input: FallingSphereInput,
  kinematics: Kinematics,
  drops: DropStatistics,
  main: DragKeyResults | ViscometryKeyResults,
): ReductionUncertainty {
  const { sphere, fluid } = input;
  const given = input.uncertainties;
  const { sphereDensity: ρs, fluidDensity: ρf, densityExcess } = kinematics;
  const drag = kinematics.mode === "drag";
  const typeA = drops.se ?? 0;
  const typeB = given?.time ?? DEFAULT_STANDARD_UNCERTAINTIES.time;
  const meanTimeCombined = Math.sqrt(typeA * typeA + typeB * typeB);
  const uTemperature = given?.temperature ?? DEFAULT_STANDARD_UNCERTAINTIES.temperature;
  let uFluidViscosity = 0;
  if (drag) {
    const fromRecord = (given?.fluidViscosity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidViscosity) / kinematics.fluidViscosity;
    const fromTemperature = (fluid.viscosityTemperatureCoefficient ?? 0) * uTemperature;
    uFluidViscosity = Math.sqrt(fromRecord * fromRecord + fromTemperature * fromTemperature);
  }
  const inputs: RelativeInputs = {
    diameter: (given?.diameter ?? DEFAULT_STANDARD_UNCERTAINTIES.diameter) / kinematics.diameter,
    sphereMassOrDensity:
      kinematics.sphereDensitySource === "mass"
        ? (given?.mass ?? DEFAULT_STANDARD_UNCERTAINTIES.mass) / (sphere.mass as number)
        : (given?.sphereDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.sphereDensity) / ρs,
    fluidDensity: (given?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity) / ρf,
    distance: (given?.distance ?? DEFAULT_STANDARD_UNCERTAINTIES.distance) / kinematics.timedDistance,
    meanTime: meanTimeCombined / drops.mean,
    fluidViscosity: uFluidViscosity,
  };
  const sign = ρs >= ρf ? 1 : -1;
  const split: DensitySplit = {
    excessBySphere: (sign * ρs) / densityExcess,
    excessByFluid: (-sign * ρf) / densityExcess,
    sphereByDiameter: kinematics.sphereDensitySource === "mass" ? -3 : 0,
  };
  const dragCoefficient = inputExponents(SENSITIVITIES.dragCoefficient, split);
  const uncertainty: ReductionUncertainty = {
    inputs,
    meanTime: { typeA, typeB, combined: meanTimeCombined },
    temperature: uTemperature,
    sphereDensity: combineRelative(inputs, inputExponents(SENSITIVITIES.sphereDensity, split)),
    velocity: combineRelative(inputs, inputExponents(SENSITIVITIES.velocity, split)),
    dragForce: combineRelative(inputs, inputExponents(SENSITIVITIES.dragForce, split)),
    dragCoefficient: combineRelative(inputs, dragCoefficient),
    reynolds: 0,
  };
  if (drag) {
    const reynolds = inputExponents(SENSITIVITIES.reynoldsWithLotViscosity, split);
    uncertainty.reynolds = combineRelative(inputs, reynolds);
    // C_D/C_D,ref(Re): exponents e(C_D) − s·e(Re), s = d ln C_D,ref / d ln Re.
    const slope = referenceDragLogSlope(main.reynolds, kinematics.dragModel);
    uncertainty.dragRatio = combineRelative(inputs, weightedDifference(1, dragCoefficient, slope, reynolds));
  } else {
    const viscometry = main as ViscometryKeyResults;
    const viscosity = inputExponents(SENSITIVITIES.viscosity, split);
    uncertainty.viscosity = combineRelative(inputs, viscosity);
    uncertainty.reynolds = combineRelative(inputs, inputExponents(SENSITIVITIES.reynoldsWithStokesViscosity, split));
    if (viscometry.viscosityOseen !== null) {
      // μ_O = μ_S − c: the exponents are the difference weighted by each term's share of μ_O.
      const stokesShare = viscometry.viscosity / viscometry.viscosityOseen;
      const correction = inputExponents(SENSITIVITIES.oseenCorrection, split);
      uncertainty.viscosityOseen = combineRelative(inputs, weightedDifference(stokesShare, viscosity, stokesShare - 1, correction));
    }
  }
  return uncertainty;
}

/** u(Δρ) (kg/m³) from ρs's inputs and ρf's, with u(T) carried into ρf through dρf/dT. */
export function densityExcessUncertainty(input: FallingSphereInput, kinematics: Kinematics, uncertainty: ReductionUncertainty): number {
  const { fluid } = input;
  // Squares summed by hand, not Math.hypot: this runs once per drop log of a class page.
  const uFluidDensityGiven = input.uncertainties?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity;
  const uFluidDensityByTemperature =
    fluid.temperature !== undefined ? (fluid.densityTemperatureCoefficient ?? 0) * uncertainty.temperature : 0;
  const uSphereDensityAbsolute = uncertainty.sphereDensity * kinematics.sphereDensity;
  return Math.sqrt(
    uSphereDensityAbsolute * uSphereDensityAbsolute +
      uFluidDensityGiven * uFluidDensityGiven +
      uFluidDensityByTemperature * uFluidDensityByTemperature,
  );
}

/** What {@link fallingSphereBudget} needs of the log with all drops. */
export function budgetContextOf(
  input: FallingSphereInput,
  kinematics: Kinematics,
  drops: DropStatistics,
  wall: WallCorrection,
  main: DragKeyResults | ViscometryKeyResults,
  uncertainty: ReductionUncertainty,
): FallingSphereBudgetContext {
  const { sphere, fluid, column } = input;
  const given = input.uncertainties;
  const { mode, sphereDensity: ρs } = kinematics;
  return {
    mode,
    value: mode === "drag" ? main.dragCoefficient : (main as ViscometryKeyResults).viscosity,
    diameter: { value: kinematics.diameter, u: given?.diameter ?? DEFAULT_STANDARD_UNCERTAINTIES.diameter },
    sphere:
      kinematics.sphereDensitySource === "mass"
        ? { source: "mass", value: sphere.mass as number, u: given?.mass ?? DEFAULT_STANDARD_UNCERTAINTIES.mass }
        : { source: "material", value: ρs, u: given?.sphereDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.sphereDensity },
    sphereDensity: ρs,
    fluidDensity: {
      value: kinematics.fluidDensity,
      u: given?.fluidDensity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidDensity,
      temperatureCoefficient: fluid.densityTemperatureCoefficient ?? 0,
    },
    distance: { value: kinematics.timedDistance, u: given?.distance ?? DEFAULT_STANDARD_UNCERTAINTIES.distance },
    meanTime: { value: drops.mean, typeA: drops.se, typeB: uncertainty.meanTime.typeB, n: drops.n },
    column:
      column.innerDiameter !== undefined
        ? { value: column.innerDiameter, u: given?.columnDiameter ?? DEFAULT_STANDARD_UNCERTAINTIES.columnDiameter }
        : null,
    wall: { byDiameterRatio: wall.byDiameterRatio, byReynolds: wall.byReynolds, reynoldsPower: kinematics.reynoldsPower },
    temperature: fluid.temperature !== undefined ? { value: fluid.temperature, u: uncertainty.temperature } : null,
    reference: budgetReference(input, kinematics, main),
  };
}

/** What the normalised figure's reference depends on: the drag law at Re, or the lot's μ_ref(T). */
function budgetReference(
  input: FallingSphereInput,
  kinematics: Kinematics,
  main: DragKeyResults | ViscometryKeyResults,
): FallingSphereBudgetContext["reference"] {
  const { fluid } = input;
  const value = kinematics.mode === "drag" ? (fluid.viscosity as number) : fluid.referenceViscosity;
  if (value === undefined) return null;
  const viscosity = {
    value,
    u: input.uncertainties?.fluidViscosity ?? DEFAULT_STANDARD_UNCERTAINTIES.fluidViscosity,
    degreesOfFreedom: fluid.viscosityDegreesOfFreedom ?? Number.POSITIVE_INFINITY,
    temperatureCoefficient: fluid.viscosityTemperatureCoefficient ?? 0,
  };
  if (kinematics.mode === "viscometry") return { kind: "viscometry", viscosity };
  const drag = main as DragKeyResults;
  return {
    kind: "drag",
    ratio: drag.dragCoefficient / drag.referenceDragCoefficient,
    slope: referenceDragLogSlope(drag.reynolds, kinematics.dragModel),
    viscosity,
  };
}
