/**
 * Turns a student's drop log and their kit's records into the reduction engine's input, reduces it and
 * lists the warnings next to the fields they concern. The same function runs for the live preview and
 * for the stored hand-in, so what a student sees while typing is what the server keeps.
 * Pure: no I/O. Bench units (mm, g, °C) come in; the engine works in SI.
 */
import type { CalibrationPoint, LabResolutions } from "~/db/schema";
import { labResolutions } from "~/lib/labs/lab-input";
import {
  ReductionInputError,
  calibrationUncertainty,
  fitFluidViscosity,
  normalisedFigure as normalisedFigureOf,
  reduceFallingSphere,
  viscosityAt,
  viscosityTemperatureCoefficient,
  type DragModel,
  type FallingSphereInput,
  type FluidViscosityFit,
  type Reduction,
  type ReductionCheck,
  type WallCorrectionMethod,
} from "~/lib/reduction";
import { kitStateLabels, kitStatesBeforeHome, type KitState } from "~/lib/kits/kit-states";
import type { DropLogField, DropLogInput } from "./drop-log-input";

export type LabSettings = {
  kind: "drag" | "viscometry";
  wallCorrection: string;
  dragModel: string;
  requiredDrops: number;
  resolutions: LabResolutions;
};

export type SphereRecord = {
  id: string;
  label: string;
  material: string | null;
  diameterMm: number | null;
  diameterResolutionMm: number | null;
  massG: number | null;
  massResolutionG: number | null;
};
export type FluidLotRecord = {
  id: string;
  label: string;
  fluidName: string | null;
  densityKgM3: number | null;
  /** Standard uncertainty of the density; absent or null: exact. */
  densityUncertaintyKgM3?: number | null;
  /** dρ/dT; when given, `densityKgM3` is the density at {@link DENSITY_REFERENCE_TEMPERATURE_C}. */
  densityTemperatureCoefficientKgM3K?: number | null;
  calibration: CalibrationPoint[] | null;
};
export type ColumnRecord = {
  id: string;
  label: string;
  innerDiameterMm: number | null;
  /** Standard uncertainty of the bore; absent or null: the lab's diameter resolution/√12. */
  innerDiameterUncertaintyMm?: number | null;
  timedDistanceMm: number | null;
  runInMm: number | null;
  /** Fall below the lower band to the bottom; absent or null: not recorded, not checked. */
  marginBelowMm?: number | null;
};
/** The kit the sphere came from, as it stood when the drop log was reduced. */
export type KitRecord = { number: string; state: KitState };
export type KitRecordsInput = { sphere: SphereRecord; fluidLot: FluidLotRecord; column: ColumnRecord; kit?: KitRecord };

/** A reduction check, or one of ours, placed next to the field of the form it concerns. */
export type DropLogWarning = { code: string; level: "info" | "warn" | "error"; message: string; field: DropLogField };

/** What the reduction was computed from, stored with the version so it can be re-read after a part is re-measured. */
export type KitRecords = {
  sphere: { id: string; label: string; material: string | null; diameterMm: number; massG: number; source: "kit" | "student" };
  fluidLot: {
    id: string;
    label: string;
    fluidName: string | null;
    /** As recorded (at 20 °C when the lot gives a temperature coefficient). */
    densityKgM3: number;
    /** ρf at the drop temperature, the density the reduction used; absent in versions stored before it. */
    densityAtTemperatureKgM3?: number;
    densityUncertaintyKgM3?: number | null;
    densityTemperatureCoefficientKgM3K?: number | null;
    fit: Pick<FluidViscosityFit, "kind" | "a" | "b" | "temperatureRange"> | null;
    /** From the lot's fit at the drop temperature: the input in drag mode, the reference in viscometry. */
    viscosityPaS: number | null;
  };
  column: {
    id: string;
    label: string;
    innerDiameterMm: number | null;
    innerDiameterUncertaintyMm?: number | null;
    timedDistanceMm: number;
    runInMm: number | null;
    /** Absent in versions stored before it was read. */
    marginBelowMm?: number | null;
  };
  /** The kit and its state at the hand-in; absent in versions stored before it was recorded. */
  kit?: KitRecord;
  gravity: number;
  wallCorrection: WallCorrectionMethod;
  dragModel: DragModel;
  /** Standard uncertainties (SI) taken as resolution/√12: a reading rounded to its resolution, rectangular distribution (GUM 4.3.7). */
  standardUncertainties: NonNullable<FallingSphereInput["uncertainties"]>;
};

export type DropLogReduction = {
  reduction: Reduction;
  kitRecords: KitRecords;
  /** C_D/C_D,ref (drag) or μ/μ_ref (viscometry); null in viscometry when the lot has no calibration. */
  normalisedFigure: number | null;
  warnings: DropLogWarning[];
};

/** A reduction as a version and its revisions store it: the engine's output with the warnings shown beside the form. */
export type StoredReduction = Reduction & { warnings: DropLogWarning[] };

const STANDARD_GRAVITY = 9.80665;
/**
 * The temperature a lot's density is recorded at when it gives dρ/dT: 20 °C, the usual reference of
 * density tables and of the lots' own calibration sheets (common practice).
 */
export const DENSITY_REFERENCE_TEMPERATURE_C = 20;
const SQRT3 = Math.sqrt(3);
/** Student and kit measurements further apart than this are worth a second look (brief: "disagree"). */
const OWN_MEASUREMENT_TOLERANCE = 0.02;
const SQRT12 = Math.sqrt(12);
const WALL_METHODS: readonly string[] = ["faxen", "haberman-sayre", "francis", "none"];
const DRAG_MODELS: readonly string[] = ["stokes", "oseen", "schiller-naumann"];

/** Which form field each engine check is about, so the form can show it there. */
export const checkFields: Record<ReductionCheck["code"], DropLogField> = {
  "too-few-drops": "drops",
  "single-drop": "drops",
  "stray-drop-test-not-applicable": "drops",
  "stray-drops": "drops",
  "sphere-lighter-than-fluid": "sphereId",
  "sphere-density-disagrees-with-kit": "sphereId",
  "near-neutral-buoyancy": "sphereId",
  "run-in-too-short": "sphereId",
  "run-in-unknown": "timedDistanceMm",
  "margin-below-too-short": "form",
  "diameter-ratio-outside-wall-model": "sphereId",
  "wall-correction-substituted": "sphereId",
  "wall-correction-not-applied": "form",
  "wall-effect-neglected": "sphereId",
  "wall-factor-outside-creeping-flow": "form",
  "reynolds-outside-wall-model": "form",
  "reynolds-outside-drag-model-range": "form",
  "reynolds-too-large-for-stokes": "form",
  "oseen-correction-not-applicable": "form",
  "fluid-temperature-unknown": "temperatureC",
};

/**
 * Reduces one drop log with the kit's records. The sphere's recorded diameter and mass are used (the
 * student's own, when given, are compared with them and a disagreement over 2 % is a warning); the fluid
 * viscosity comes from the lot's Andrade fit at the drop temperature. Throws `ReductionInputError` when
 * the kit's records or the input cannot be reduced.
 */
export function reduceDropLog({
  lab,
  kit,
  input,
  gravity,
}: {
  lab: LabSettings;
  kit: KitRecordsInput;
  input: DropLogInput;
  gravity?: number | null;
}): DropLogReduction {
  const warnings: DropLogWarning[] = [];
  const missing: { path: string; message: string }[] = [];
  const { sphere, fluidLot, column } = kit;

  // A kit record without a value falls back on the student's own measurement, and says so.
  const diameterMm = sphere.diameterMm ?? input.ownDiameterMm;
  const massG = sphere.massG ?? input.ownMassG;
  const usedStudentValues = sphere.diameterMm === null || sphere.massG === null;
  if (diameterMm === undefined)
    missing.push({ path: "ownDiameterMm", message: `Sphere ${sphere.label} has no recorded diameter; enter your own measurement.` });
  if (massG === undefined)
    missing.push({ path: "ownMassG", message: `Sphere ${sphere.label} has no recorded mass; enter your own measurement.` });
  if (fluidLot.densityKgM3 === null)
    missing.push({ path: "form", message: `Fluid lot ${fluidLot.label} has no recorded density; tell your instructor.` });
  const timedDistanceMm = input.timedDistanceMm ?? column.timedDistanceMm;
  if (timedDistanceMm === null)
    missing.push({
      path: "timedDistanceMm",
      message: `Column ${column.label} has no recorded timed distance; measure it between the bands.`,
    });

  const fit = fluidLot.calibration?.length
    ? fitFluidViscosity(fluidLot.calibration.map((point) => ({ temperature: point.temperatureC, viscosity: point.viscosityPaS })))
    : null;
  if (!fit && lab.kind === "drag")
    missing.push({ path: "form", message: `Fluid lot ${fluidLot.label} has no viscosity calibration; tell your instructor.` });
  if (!WALL_METHODS.includes(lab.wallCorrection))
    missing.push({ path: "form", message: `The lab's wall correction "${lab.wallCorrection}" is unknown.` });
  if (!DRAG_MODELS.includes(lab.dragModel)) missing.push({ path: "form", message: `The lab's drag model "${lab.dragModel}" is unknown.` });
  if (missing.length) throw new ReductionInputError(missing);

  const viscosityPaS = fit ? viscosityAt(fit, input.temperatureC) : null;
  // Linear in T about 20 °C: over a lab's few kelvin, glycerol–water's density is linear to well within its u (common practice).
  const densityCoefficient = fluidLot.densityTemperatureCoefficientKgM3K ?? null;
  const densityAtTemperature = fluidLot.densityKgM3! + (densityCoefficient ?? 0) * (input.temperatureC - DENSITY_REFERENCE_TEMPERATURE_C);
  const calibration = fit ? calibrationUncertainty(fit, input.temperatureC) : null;
  const wallCorrection = lab.wallCorrection as WallCorrectionMethod;
  const dragModel = lab.dragModel as DragModel;
  const g = gravity ?? STANDARD_GRAVITY;
  const resolutions = labResolutions(lab.resolutions);
  // The kit's own instrument resolution when the part records one (its values are what we use), else the lab's.
  // The bore without its own uncertainty is taken as measured with the lab's diameter instrument, as a
  // sphere without its own resolution is; the thermometer reads to its resolution (r/√12) and is good to
  // ±a (a/√3), both rectangular and independent (GUM 4.3.7).
  const standardUncertainties = {
    diameter: (sphere.diameterResolutionMm ?? resolutions.diameterMm) / 1000 / SQRT12,
    mass: (sphere.massResolutionG ?? resolutions.massG) / 1000 / SQRT12,
    distance: resolutions.distanceMm / 1000 / SQRT12,
    time: resolutions.timeS / SQRT12,
    temperature: Math.hypot(resolutions.temperatureC / SQRT12, resolutions.thermometerAccuracyC / SQRT3),
    fluidDensity: fluidLot.densityUncertaintyKgM3 ?? 0,
    columnDiameter:
      column.innerDiameterUncertaintyMm != null ? column.innerDiameterUncertaintyMm / 1000 : resolutions.diameterMm / 1000 / SQRT12,
    fluidViscosity: calibration && viscosityPaS !== null ? calibration.relative * viscosityPaS : 0,
  };

  const engineInput: FallingSphereInput = {
    mode: lab.kind,
    sphere: { diameter: diameterMm! / 1000, mass: massG! / 1000 },
    fluid: {
      density: densityAtTemperature,
      temperature: input.temperatureC,
      ...(densityCoefficient !== null ? { densityTemperatureCoefficient: densityCoefficient } : {}),
      ...(fit
        ? {
            // Drag mode: the input; viscometry: the reference of μ/μ_ref(T), which then carries u(T) too.
            ...(lab.kind === "drag" ? { viscosity: viscosityPaS! } : { referenceViscosity: viscosityPaS! }),
            viscosityTemperatureCoefficient: viscosityTemperatureCoefficient(fit, input.temperatureC),
            viscosityDegreesOfFreedom: calibration!.degreesOfFreedom,
          }
        : {}),
    },
    column: {
      timedDistance: timedDistanceMm! / 1000,
      ...(column.innerDiameterMm !== null ? { innerDiameter: column.innerDiameterMm / 1000 } : {}),
      ...(column.runInMm !== null ? { runIn: column.runInMm / 1000 } : {}),
      ...(column.marginBelowMm != null ? { marginBelow: column.marginBelowMm / 1000 } : {}),
    },
    drops: input.drops,
    g,
    wallCorrection,
    dragModel,
    uncertainties: standardUncertainties,
    timeResolution: resolutions.timeS,
    requiredDrops: lab.requiredDrops,
  };
  const reduction = reduceFallingSphere(engineInput);

  for (const check of reduction.checks) warnings.push({ ...check, field: checkFields[check.code] ?? "form" });
  if (usedStudentValues) {
    warnings.push({
      code: "kit-record-missing",
      level: "warn",
      field: "ownDiameterMm",
      message: `Sphere ${sphere.label} lacks a recorded value; your own measurement was used instead.`,
    });
  }
  compareOwn(warnings, "ownDiameterMm", "diameter", "mm", input.ownDiameterMm, sphere.diameterMm);
  compareOwn(warnings, "ownMassG", "mass", "g", input.ownMassG, sphere.massG);
  if (input.timedDistanceMm !== undefined && column.timedDistanceMm !== null && disagrees(input.timedDistanceMm, column.timedDistanceMm)) {
    warnings.push({
      code: "timed-distance-differs-from-column",
      level: "warn",
      field: "timedDistanceMm",
      message: `You entered ${input.timedDistanceMm} mm; column ${column.label} records ${column.timedDistanceMm} mm between its bands. Your value is used.`,
    });
  }
  if (kit.kit && kitStatesBeforeHome.includes(kit.kit.state)) {
    // Taken all the same (the student may have borrowed a kit, or the record lags the parcel), but the
    // parts named here may not be the ones used, so staff see it on the hand-in.
    warnings.push({
      code: "kit-not-at-home",
      level: "warn",
      field: "form",
      message: `Kit ${kit.kit.number} was recorded as “${kitStateLabels[kit.kit.state]}”, not yet at home, at this hand-in: check that the parts named here are the ones used.`,
    });
  }
  if (fit?.warning) warnings.push({ code: "fluid-calibration-single-point", level: "warn", field: "temperatureC", message: fit.warning });
  if (fit && (input.temperatureC < fit.temperatureRange[0] || input.temperatureC > fit.temperatureRange[1])) {
    warnings.push({
      code: "temperature-outside-calibration",
      level: "warn",
      field: "temperatureC",
      message: `${input.temperatureC} °C is outside the fluid lot's calibrated range (${fit.temperatureRange[0]}–${fit.temperatureRange[1]} °C): its viscosity is extrapolated.`,
    });
  }

  const figure =
    reduction.mode === "drag"
      ? normalisedFigureOf(reduction)
      : viscosityPaS !== null
        ? normalisedFigureOf(reduction, { referenceViscosity: viscosityPaS })
        : null;

  return {
    reduction,
    kitRecords: {
      sphere: {
        id: sphere.id,
        label: sphere.label,
        material: sphere.material,
        diameterMm: diameterMm!,
        massG: massG!,
        source: usedStudentValues ? "student" : "kit",
      },
      fluidLot: {
        id: fluidLot.id,
        label: fluidLot.label,
        fluidName: fluidLot.fluidName,
        densityKgM3: fluidLot.densityKgM3!,
        densityAtTemperatureKgM3: densityAtTemperature,
        densityUncertaintyKgM3: fluidLot.densityUncertaintyKgM3 ?? null,
        densityTemperatureCoefficientKgM3K: densityCoefficient,
        fit: fit ? { kind: fit.kind, a: fit.a, b: fit.b, temperatureRange: fit.temperatureRange } : null,
        viscosityPaS,
      },
      column: {
        id: column.id,
        label: column.label,
        innerDiameterMm: column.innerDiameterMm,
        innerDiameterUncertaintyMm: column.innerDiameterUncertaintyMm ?? null,
        timedDistanceMm: timedDistanceMm!,
        runInMm: column.runInMm,
        marginBelowMm: column.marginBelowMm ?? null,
      },
      ...(kit.kit ? { kit: kit.kit } : {}),
      gravity: g,
      wallCorrection,
      dragModel,
      standardUncertainties,
    },
    normalisedFigure: figure,
    warnings,
  };
}

function disagrees(own: number, recorded: number): boolean {
  return Math.abs(own / recorded - 1) > OWN_MEASUREMENT_TOLERANCE;
}

function compareOwn(
  warnings: DropLogWarning[],
  field: DropLogField,
  what: string,
  unit: string,
  own: number | undefined,
  recorded: number | null,
) {
  if (own === undefined || recorded === null || !disagrees(own, recorded)) return;
  const percent = ((own / recorded - 1) * 100).toFixed(1);
  warnings.push({
    code: `own-${what}-disagrees-with-kit`,
    level: "warn",
    field,
    message: `Your ${what} ${own} ${unit} differs from the kit's ${recorded} ${unit} by ${percent} %. The kit's record is used; measure again or tell your instructor.`,
  });
}
