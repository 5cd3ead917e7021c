/**
 * What a student hands in for a lab (a drop log), and the engine input the reduce API accepts.
 * Shared by the browser form (instant messages), the hand-in action and POST /api/v1/reduce.
 * Units at this edge are the bench's: mm, g, °C and seconds.
 */
import { z } from "zod";
import { storableText } from "~/lib/forms/storable-text";
import { typedNumber as typed } from "~/lib/forms/typed-number";

/** Drop times outside this range are typing slips, not measurements (a 20 cm fall in syrup takes seconds). */
export const SHORTEST_DROP_S = 0.05;
export const LONGEST_DROP_S = 600;
export const MAX_DROPS = 200;

const dropTime = typed(
  z
    .number({
      error: (issue) =>
        issue.input === undefined ? "Enter the time in seconds, or remove this row." : "Enter the time as a number of seconds, e.g. 4.32.",
    })
    .superRefine((seconds, context) => {
      // One message per row, the most useful one: a negative time is a different slip from a huge one.
      const message =
        seconds < 0
          ? "A time cannot be negative."
          : seconds < SHORTEST_DROP_S
            ? `Under ${SHORTEST_DROP_S} s is too short to time by hand; check the decimal point.`
            : seconds > LONGEST_DROP_S
              ? `Over ${LONGEST_DROP_S} s (10 minutes) is not a drop time; check the decimal point.`
              : !Number.isFinite(seconds)
                ? "Enter the time as a number of seconds, e.g. 4.32."
                : null;
      if (message) context.addIssue({ code: "custom", message });
    }),
);

const optionalMeasurement = (what: string, unit: string, min: number, max: number) =>
  typed(
    z
      .number({ error: `Enter your ${what} as a number in ${unit}, or leave it empty.` })
      .gt(min, `Your ${what} must be more than ${min} ${unit}.`)
      .lt(max, `Your ${what} must be less than ${max} ${unit}.`)
      .optional(),
  );

/** A part of the kit the student names; blank (the form's "one choice only") means "the only one the lab allows". */
const chosenPart = (what: string) =>
  z.preprocess(
    (value) => (value === "" || value === null ? undefined : value),
    z.uuid({ error: `Choose the ${what} you used from your kit.` }).optional(),
  );

export const dropLogInput = z.object({
  sphereId: z.uuid({ error: "Choose the sphere you dropped." }),
  /** Required when the student's kit holds more than one fluid lot the lab allows; otherwise that one. */
  fluidLotId: chosenPart("fluid lot").describe(
    "The fluid lot (bottle) of the kit used. Required when the kit holds more than one lot the lab allows.",
  ),
  /** Likewise for the column. */
  columnId: chosenPart("column").describe("The column of the kit used. Required when the kit holds more than one column the lab allows."),
  /** The student's own measurements, kept beside the kit's records; the reduction uses the kit's. */
  ownDiameterMm: optionalMeasurement("diameter", "mm", 0, 100),
  ownMassG: optionalMeasurement("mass", "g", 0, 1000),
  temperatureC: typed(
    z
      .number({ error: "Enter the fluid temperature in °C, e.g. 21.5." })
      .min(-10, "A fluid below −10 °C is outside what the kit is calibrated for; check the reading.")
      .max(60, "A fluid above 60 °C is outside what the kit is calibrated for; check the reading."),
  ),
  /** The fall between the bands; the column's recorded distance when not given. */
  timedDistanceMm: typed(
    z
      .number({ error: "Enter the timed distance in mm, or leave it empty to use the column's." })
      .gt(0, "The timed distance must be more than 0 mm.")
      .max(3000, "The timed distance must be at most 3000 mm.")
      .optional(),
  ),
  drops: z
    .array(dropTime, { error: "Enter your drop times." })
    .min(1, "Enter at least one drop time.")
    .max(MAX_DROPS, `At most ${MAX_DROPS} drops fit in one drop log.`),
  notes: z.preprocess(
    (value) => (value === "" ? undefined : value),
    storableText.trim().max(4000, "Keep the notes under 4000 characters.").optional(),
  ),
});
export type DropLogInput = z.output<typeof dropLogInput>;

/** The field a message belongs to, as the form names its inputs (rows are `drops[3]`, see `dropFieldName`). */
export type DropLogField =
  "sphereId" | "fluidLotId" | "columnId" | "ownDiameterMm" | "ownMassG" | "temperatureC" | "timedDistanceMm" | "drops" | "notes" | "form";

/**
 * The form as the student left it, saved as they type: strings exactly as typed, so a half-typed
 * "4." survives a reload. Checked only for shape and size, never for sense.
 */
export const dropLogDraft = z.object({
  sphereId: storableText.max(64).optional(),
  fluidLotId: storableText.max(64).optional(),
  columnId: storableText.max(64).optional(),
  useOwnMeasurements: z.boolean().optional(),
  ownDiameterMm: storableText.max(40).optional(),
  ownMassG: storableText.max(40).optional(),
  temperatureC: storableText.max(40).optional(),
  timedDistanceMm: storableText.max(40).optional(),
  drops: z.array(storableText.max(40)).max(MAX_DROPS).optional(),
  notes: storableText.max(4000).optional(),
});
export type DropLogDraft = z.output<typeof dropLogDraft>;

/** The handed-in input as the form's strings, to start from when there is no draft. */
export function draftFromInput(input: DropLogInput): DropLogDraft {
  const text = (value: number | undefined) => (value === undefined ? undefined : String(value));
  return {
    sphereId: input.sphereId,
    fluidLotId: input.fluidLotId,
    columnId: input.columnId,
    useOwnMeasurements: input.ownDiameterMm !== undefined || input.ownMassG !== undefined,
    ownDiameterMm: text(input.ownDiameterMm),
    ownMassG: text(input.ownMassG),
    temperatureC: text(input.temperatureC),
    timedDistanceMm: text(input.timedDistanceMm),
    drops: input.drops.map(String),
    notes: input.notes,
  };
}

/** The hand-in form's row names: `drops[0]`, `drops[1]`… (Conform's list convention, and what its replies key errors by). */
export const dropFieldName = (row: number) => `drops[${row}]`;

/** The form as typed (FormData, with or without JavaScript) as a draft: strings, drops in row order. */
export function dropLogDraftFromForm(form: FormData): DropLogDraft {
  const text = (name: string) => {
    const value = form.get(name);
    return typeof value === "string" ? value : undefined;
  };
  const drops = [...form.entries()]
    .flatMap(([name, value]) => {
      const row = /^drops\[(\d+)\]$/.exec(name);
      return row && typeof value === "string" ? [{ row: Number(row[1]), value }] : [];
    })
    .sort((a, b) => a.row - b.row)
    .map(({ value }) => value);
  return {
    sphereId: text("sphereId"),
    fluidLotId: text("fluidLotId"),
    columnId: text("columnId"),
    useOwnMeasurements: text("useOwnMeasurements") === "on",
    ownDiameterMm: text("ownDiameterMm"),
    ownMassG: text("ownMassG"),
    temperatureC: text("temperatureC"),
    timedDistanceMm: text("timedDistanceMm"),
    drops,
    notes: text("notes"),
  };
}

/** The form's submission as the object `dropLogInput` checks: the student's own measurements only when they ticked the box. */
export function dropLogInputFromForm(form: FormData): Record<string, unknown> {
  const { useOwnMeasurements, ownDiameterMm, ownMassG, ...input } = dropLogDraftFromForm(form);
  return { ...input, ownDiameterMm: useOwnMeasurements ? ownDiameterMm : undefined, ownMassG: useOwnMeasurements ? ownMassG : undefined };
}

// ---------------------------------------------------------------------------------------------
// POST /api/v1/reduce with the engine's own input (SI). The engine checks sense (positive sizes, …)
// and lists every problem; this schema only checks shape, so its messages stay the engine's.

const finite = z.number().refine(Number.isFinite, "must be a finite number");

export const reduceInput = z.object({
  mode: z.enum(["drag", "viscometry"]),
  sphere: z.object({ diameter: finite, mass: finite.optional(), density: finite.optional() }),
  fluid: z.object({
    density: finite,
    viscosity: finite.optional(),
    temperature: finite.optional(),
    viscosityTemperatureCoefficient: finite.optional(),
    // The uncertainty budget's: viscometry's reference μ(T), its calibration's degrees of freedom (omitted: ∞), dρf/dT.
    referenceViscosity: finite.optional(),
    viscosityDegreesOfFreedom: finite.optional(),
    densityTemperatureCoefficient: finite.optional(),
  }),
  column: z.object({ timedDistance: finite, innerDiameter: finite.optional(), runIn: finite.optional(), marginBelow: finite.optional() }),
  drops: z.array(finite).min(1).max(MAX_DROPS),
  g: finite.optional(),
  wallCorrection: z.enum(["faxen", "haberman-sayre", "francis", "none"]).optional(),
  dragModel: z.enum(["stokes", "oseen", "schiller-naumann"]).optional(),
  uncertainties: z
    .object({
      diameter: finite.optional(),
      mass: finite.optional(),
      sphereDensity: finite.optional(),
      fluidDensity: finite.optional(),
      fluidViscosity: finite.optional(),
      columnDiameter: finite.optional(),
      distance: finite.optional(),
      time: finite.optional(),
      temperature: finite.optional(),
    })
    .optional(),
  strayDropTest: z.object({ alpha: finite.optional(), maxStrayDrops: z.int().positive().optional() }).optional(),
  requiredDrops: z.int().positive().optional(),
});

/** The reduce API's body: a drop log resolved against the caller's kit and the lab's settings. */
export const labReduceInput = z.object({ labId: z.uuid(), input: z.unknown() });
