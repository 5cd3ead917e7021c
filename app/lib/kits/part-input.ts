/**
 * What an instructor types to record a part, in the units of the bench (mm, g, kg/m³, °C, Pa·s).
 * Shared by the forms (instant feedback), the server actions and the CSV import.
 */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";

const label = z
  .string()
  .trim()
  .min(1, "Give the part a label, e.g. S-12.")
  .max(40, "Keep the label under 40 characters.")
  .regex(/^[\w.\- /]+$/u, "Use letters, digits, spaces, dots, dashes or slashes.");

const notes = z
  .string()
  .trim()
  .max(2000)
  .optional()
  .transform((value) => value || null);

/** A measured length or mass: a positive number, with a sanity ceiling so a unit slip is caught. */
const measuredNumber = (what: string, unit: string, max: number) =>
  z
    .number({ error: `Enter the ${what} in ${unit}.` })
    .refine(Number.isFinite, `Enter the ${what} in ${unit}.`)
    .positive(`The ${what} must be greater than zero.`)
    .max(max, `A ${what} above ${max} ${unit} looks like a unit slip; enter it in ${unit}.`);

const measured = (what: string, unit: string, max: number) => typedNumber(measuredNumber(what, unit, max));
const optionalMeasured = (what: string, unit: string, max: number) => typedNumber(measuredNumber(what, unit, max).optional());

/**
 * A calibration row the form sent with both boxes empty (a spare row) is left out. It is dropped after
 * each row is checked, so that an error keeps the number of the row it belongs to.
 */
const isBlankRow = (row: unknown) =>
  typeof row === "object" && row !== null && Object.values(row).every((value) => value === undefined || String(value).trim() === "");

export const calibrationPointSchema = z.object({
  temperatureC: typedNumber(
    z
      .number({ error: "Enter the temperature in °C." })
      .min(-20, "Calibration temperatures below −20 °C are outside what a home lab sees.")
      .max(100, "Calibration temperatures above 100 °C are outside what a home lab sees."),
  ),
  viscosityPaS: measured("viscosity", "Pa·s", 1000),
});

export const sphereInput = z.object({
  kind: z.literal("sphere"),
  label,
  material: z.string().trim().min(1, "Say what the sphere is made of.").max(60),
  diameterMm: measured("diameter", "mm", 100),
  diameterResolutionMm: optionalMeasured("diameter resolution", "mm", 1),
  massG: measured("mass", "g", 2000),
  massResolutionG: optionalMeasured("mass resolution", "g", 10),
  notes,
});

export const fluidLotInput = z.object({
  kind: z.literal("fluid_lot"),
  label,
  fluidName: z.string().trim().min(1, "Name the fluid, e.g. glycerol–water 85 %.").max(80),
  densityKgM3: typedNumber(
    measuredNumber("density", "kg/m³", 25000).min(500, "A density below 500 kg/m³ is not a lab fluid; enter it in kg/m³."),
  ),
  densityUncertaintyKgM3: optionalMeasured("density uncertainty", "kg/m³", 100),
  // Liquids expand when warmed: dρ/dT is negative, glycerol's about −0.65 kg/m³/K (common practice).
  densityTemperatureCoefficientKgM3K: typedNumber(
    z
      .number({ error: "Enter the density's temperature coefficient in kg/m³ per K." })
      .refine(Number.isFinite, "Enter the density's temperature coefficient in kg/m³ per K.")
      .min(-10, "A coefficient below −10 kg/m³ per K is not a lab fluid; check the sign and unit.")
      .max(0, "Liquids get lighter when warmed: the coefficient is zero or negative.")
      .optional(),
  ),
  glycerolMassFraction: typedNumber(
    z
      .number({ error: "Enter glycerol's mass fraction as a number from 0 to 1, e.g. 0.85." })
      .refine(Number.isFinite, "Enter glycerol's mass fraction as a number from 0 to 1, e.g. 0.85.")
      .min(0, "A mass fraction runs from 0 to 1.")
      .max(1, "Enter the mass fraction from 0 to 1: 85 % glycerol is 0.85.")
      .optional(),
  ),
  calibration: z
    .array(z.preprocess((row: z.input<typeof calibrationPointSchema>) => (isBlankRow(row) ? null : row), calibrationPointSchema.nullable()))
    .optional()
    .transform((rows) => (rows ?? []).filter((row) => row !== null))
    .pipe(
      z
        .array(z.object({ temperatureC: z.number(), viscosityPaS: z.number() }))
        .min(1, "Add at least one calibration point (temperature and viscosity).")
        .max(50)
        .refine(
          (points) => new Set(points.map((p) => p.temperatureC)).size === points.length,
          "Two calibration points share a temperature; keep one per temperature.",
        ),
    ),
  notes,
});

export const columnInput = z.object({
  kind: z.literal("column"),
  label,
  innerDiameterMm: measured("inner diameter", "mm", 500),
  innerDiameterUncertaintyMm: optionalMeasured("bore uncertainty", "mm", 10),
  timedDistanceMm: measured("timed distance", "mm", 3000),
  runInMm: measured("run-in distance", "mm", 3000),
  marginBelowMm: measured("margin below the bottom band", "mm", 3000),
  notes,
});

export const accessoryInput = z.object({
  kind: z.literal("accessory"),
  label,
  accessoryType: z.enum(["retrieval magnet", "thermometer", "ruler", "stopwatch", "tray", "other"], {
    error: "Choose what kind of accessory this is.",
  }),
  notes,
});

export const partInput = z.discriminatedUnion("kind", [sphereInput, fluidLotInput, columnInput, accessoryInput]);
export type PartInput = z.infer<typeof partInput>;
/** The part form's values as typed, before `partInput` reads them. */
export type PartFormInput = z.input<typeof partInput>;
export type PartKind = PartInput["kind"];

export const partKindLabels: Record<PartKind, string> = {
  sphere: "Sphere",
  fluid_lot: "Fluid lot",
  column: "Column",
  accessory: "Accessory",
};

/**
 * Usual densities of sphere materials in kg/m³ (typical handbook ranges, from memory; a supplier's
 * data sheet is the authority). A derived density outside the range points at a mis-measured part.
 */
export const materialDensityRanges: Record<string, [number, number]> = {
  steel: [7650, 8050],
  "stainless steel": [7650, 8050],
  glass: [2200, 2600],
  aluminium: [2630, 2810],
  brass: [8400, 8750],
  nylon: [1120, 1160],
  ptfe: [2100, 2230],
  acrylic: [1170, 1200],
  polypropylene: [890, 920],
  "tungsten carbide": [14500, 15700],
};

/** ρ = 6m / (π d³), from the measured mass and diameter, in kg/m³. */
export function sphereDensityKgM3(massG: number, diameterMm: number): number {
  const mass = massG / 1000;
  const diameter = diameterMm / 1000;
  return (6 * mass) / (Math.PI * diameter ** 3);
}
