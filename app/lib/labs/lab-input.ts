/**
 * What an instructor types to set a lab; one schema for the form's instant messages and the server.
 * Times are wall-clock times in the course's time zone, so the schema is made for that zone.
 */
import { z } from "zod";
import type { LabResolutions } from "~/db/schema";
import { comparisonSettings } from "~/lib/comparison/comparison-settings";
import { MAX_DROPS } from "~/lib/drop-logs/drop-log-input";
import { afterReleaseHandInPolicies, type AfterReleaseHandIns } from "~/lib/marking/release";
import { instantToWallClock, wallClockToInstant } from "./wall-clock";

export const experimentKinds = ["drag", "viscometry"] as const;
export type ExperimentKind = (typeof experimentKinds)[number];
export const experimentKindNames: Record<ExperimentKind, string> = {
  drag: "Drag on a sphere settling in a fluid of known viscosity",
  viscometry: "Falling-ball viscometry of a fluid",
};

export const wallCorrections = ["faxen", "haberman-sayre", "francis", "none"] as const;
export const wallCorrectionNames: Record<(typeof wallCorrections)[number], string> = {
  faxen: "Faxén's series",
  "haberman-sayre": "Haberman–Sayre",
  francis: "Francis",
  none: "None",
};
export const dragModels = ["schiller-naumann", "oseen", "stokes"] as const;
export const dragModelNames: Record<(typeof dragModels)[number], string> = {
  "schiller-naumann": "Schiller–Naumann (Re up to about 800)",
  oseen: "Oseen (Re below about 1)",
  stokes: "Stokes (creeping flow, Re ≪ 1)",
};

/**
 * Resolutions of a micrometer, a milligram balance, a ruler, a hand stopwatch and a school
 * thermometer, and that thermometer's accuracy of ±0.5 K: common practice for home kits, and each lab
 * can change them.
 */
export const DEFAULT_RESOLUTIONS: Required<LabResolutions> = {
  diameterMm: 0.01,
  massG: 0.001,
  distanceMm: 1,
  timeS: 0.01,
  temperatureC: 0.5,
  thermometerAccuracyC: 0.5,
};

/** A lab's resolutions with the thermometer accuracy filled in for labs saved before it was asked. */
export function labResolutions(resolutions: LabResolutions): Required<LabResolutions> {
  return { ...resolutions, thermometerAccuracyC: resolutions.thermometerAccuracyC ?? DEFAULT_RESOLUTIONS.thermometerAccuracyC };
}
export const DEFAULT_REMINDER_OFFSETS_HOURS = [48, 6];
export const DEFAULT_REQUIRED_DROPS = 10;
/** Reminders earlier than a month before the due time are not reminders. */
export const MAX_REMINDER_OFFSET_HOURS = 720;

export const blankToUndefined = (value: unknown) => (typeof value === "string" && value.trim() === "" ? undefined : value);

const resolution = (what: string, unit: string, max: number) =>
  z.coerce
    .number({ error: `Enter the ${what} resolution in ${unit}.` })
    .gt(0, `The ${what} resolution must be more than 0 ${unit}.`)
    .max(max, `A ${what} resolution over ${max} ${unit} is not a measurement.`);

/** "48, 6" → [48, 6]: whole hours before the due time, each once, largest first. */
const reminderOffsets = z
  .string()
  .trim()
  .transform((text, context) => {
    if (text === "") return [];
    const parts = text.split(/[\s,;]+/).filter(Boolean);
    const hours = parts.map(Number);
    if (hours.some((value) => !Number.isInteger(value) || value < 1 || value > MAX_REMINDER_OFFSET_HOURS)) {
      context.addIssue({
        code: "custom",
        message: `Give whole hours between 1 and ${MAX_REMINDER_OFFSET_HOURS}, separated by commas, e.g. 48, 6.`,
      });
      return z.NEVER;
    }
    if (hours.length > 5) {
      context.addIssue({ code: "custom", message: "Send at most five reminders per lab." });
      return z.NEVER;
    }
    return [...new Set(hours)].sort((a, b) => b - a);
  });

/** A wall-clock time in `timeZone` as the instant it names, with a message for a mistyped or skipped time. */
export const wallClock = (timeZone: string, what: string) =>
  z.string({ error: `Enter the ${what}.` }).transform((text, context) => {
    const result = wallClockToInstant(text, timeZone);
    if (result.ok) return result.instant;
    context.addIssue({
      code: "custom",
      message:
        result.reason === "skipped"
          ? `That time does not exist in ${timeZone}: the clocks go forward then. Choose a time outside the skipped hour.`
          : `Enter the ${what} as a date and time, e.g. 2027-03-28 23:59.`,
    });
    return z.NEVER;
  });

/**
 * The kinds of part a lab names, each with its own form field: none ticked in a kind allows any part of
 * that kind in the student's kit (and the student says which at hand-in when their kit holds several).
 */
export const allowedPartFields = { sphere: "allowedSphereIds", fluid_lot: "allowedFluidLotIds", column: "allowedColumnIds" } as const;
export type AllowedPartKind = keyof typeof allowedPartFields;
const allowedParts = (what: string) =>
  z
    .array(z.uuid(`Choose ${what} from the list.`))
    .max(500, `Tick at most 500 ${what}.`)
    .default([]);

/** The lab's allowed parts, all kinds together, as `labs.allowed_part_ids` stores them. */
export function allowedPartIdsOf(input: Pick<LabInput, (typeof allowedPartFields)[AllowedPartKind]>): string[] {
  return [...new Set([...input.allowedSphereIds, ...input.allowedFluidLotIds, ...input.allowedColumnIds])];
}

/** The lab form's schema for a course in `timeZone`. */
export function labInputFor(timeZone: string) {
  return z
    .object({
      title: z
        .string({ error: "Give the lab a title." })
        .trim()
        .min(3, "Give the lab a title of at least 3 characters.")
        .max(120, "Keep the title under 120 characters."),
      kind: z.enum(experimentKinds, { error: "Choose the experiment." }),
      instructions: z.string().trim().max(20_000, "Keep the instructions under 20,000 characters.").default(""),
      opensAt: wallClock(timeZone, "opening time"),
      dueAt: wallClock(timeZone, "due time"),
      lateCutoffAt: z.preprocess(blankToUndefined, wallClock(timeZone, "late cut-off").optional()),
      requiredDrops: z.coerce
        .number({ error: "Enter the number of drops." })
        .int("Enter a whole number of drops.")
        .min(3, "Ask for at least 3 drops (the stray-drop test is made from 7).")
        .max(MAX_DROPS, `Ask for at most ${MAX_DROPS} drops.`),
      allowedSphereIds: allowedParts("spheres"),
      allowedFluidLotIds: allowedParts("fluid lots"),
      allowedColumnIds: allowedParts("columns"),
      wallCorrection: z.enum(wallCorrections, { error: "Choose a wall correction." }),
      dragModel: z.enum(dragModels, { error: "Choose a reference drag model." }),
      comparisonMethod: comparisonSettings.shape.method,
      comparisonAlpha: comparisonSettings.shape.alpha,
      comparisonMaxOutliers: comparisonSettings.shape.maxOutliers,
      comparisonK: comparisonSettings.shape.k,
      resolutions: z.object({
        diameterMm: resolution("diameter", "mm", 1),
        massG: resolution("mass", "g", 1),
        distanceMm: resolution("distance", "mm", 10),
        timeS: resolution("time", "s", 1),
        temperatureC: resolution("temperature", "°C", 5),
        thermometerAccuracyC: z.coerce
          .number({ error: "Enter the thermometer's accuracy in °C." })
          .gt(0, "The thermometer's accuracy must be more than 0 °C.")
          .max(10, "A thermometer accuracy over ±10 °C is not a measurement."),
      }),
      reminderOffsetsHours: reminderOffsets,
      afterReleaseHandIns: z.enum(afterReleaseHandInPolicies, { error: "Choose what a hand-in after the release does." }).default("refuse"),
      cohortIds: z.array(z.uuid("Choose cohorts from the list.")).default([]),
    })
    .superRefine((lab, context) => {
      if (lab.dueAt.getTime() <= lab.opensAt.getTime()) {
        context.addIssue({ code: "custom", path: ["dueAt"], message: "The due time must come after the opening time." });
      }
      if (lab.lateCutoffAt && lab.lateCutoffAt.getTime() <= lab.dueAt.getTime()) {
        context.addIssue({
          code: "custom",
          path: ["lateCutoffAt"],
          message: "The late cut-off must come after the due time, or stay empty for no late hand-ins.",
        });
      }
    });
}
export type LabInput = z.output<ReturnType<typeof labInputFor>>;

/** The form's submission as the object `labInputFor` checks: repeated fields as arrays, resolutions nested. */
export function labInputFromForm(form: FormData): Record<string, unknown> {
  const text = (name: string) => {
    const value = form.get(name);
    return typeof value === "string" ? value : undefined;
  };
  const all = (name: string) => form.getAll(name).filter((value): value is string => typeof value === "string");
  return {
    title: text("title"),
    kind: text("kind"),
    instructions: text("instructions"),
    opensAt: text("opensAt"),
    dueAt: text("dueAt"),
    lateCutoffAt: text("lateCutoffAt"),
    requiredDrops: text("requiredDrops"),
    allowedSphereIds: all(allowedPartFields.sphere),
    allowedFluidLotIds: all(allowedPartFields.fluid_lot),
    allowedColumnIds: all(allowedPartFields.column),
    wallCorrection: text("wallCorrection"),
    dragModel: text("dragModel"),
    comparisonMethod: text("comparisonMethod"),
    comparisonAlpha: text("comparisonAlpha"),
    comparisonMaxOutliers: text("comparisonMaxOutliers"),
    comparisonK: text("comparisonK"),
    resolutions: {
      diameterMm: text("resolutions.diameterMm"),
      massG: text("resolutions.massG"),
      distanceMm: text("resolutions.distanceMm"),
      timeS: text("resolutions.timeS"),
      temperatureC: text("resolutions.temperatureC"),
      thermometerAccuracyC: text("resolutions.thermometerAccuracyC"),
    },
    reminderOffsetsHours: text("reminderOffsetsHours") ?? "",
    afterReleaseHandIns: text("afterReleaseHandIns"),
    cohortIds: all("cohortIds"),
  };
}

/** What the lab form shows: text as typed (or as stored, in the course's zone) and the ticked ids. */
export type LabFormValues = { fields: Record<string, string>; cohortIds: string[]; allowedPartIds: string[] };

/** A new lab's form: the defaults above; the times are left for the instructor to type. */
export function newLabFormValues(kind: ExperimentKind, cohortIds: string[]): LabFormValues {
  return {
    fields: {
      kind,
      requiredDrops: String(DEFAULT_REQUIRED_DROPS),
      wallCorrection: "faxen",
      dragModel: kind === "viscometry" ? "stokes" : "schiller-naumann",
      comparisonMethod: "grubbs",
      comparisonAlpha: "0.05",
      comparisonMaxOutliers: "3",
      comparisonK: "1.5",
      reminderOffsetsHours: DEFAULT_REMINDER_OFFSETS_HOURS.join(", "),
      afterReleaseHandIns: "refuse",
      ...Object.fromEntries(Object.entries(DEFAULT_RESOLUTIONS).map(([key, value]) => [`resolutions.${key}`, String(value)])),
    },
    cohortIds,
    allowedPartIds: [],
  };
}

/** The stored lab as its form shows it, times as wall-clock times in the course's zone. */
export function storedLabFormValues(
  lab: {
    title: string;
    kind: ExperimentKind;
    instructions: string;
    opensAt: Date;
    dueAt: Date;
    lateCutoffAt: Date | null;
    requiredDrops: number;
    allowedPartIds: string[];
    wallCorrection: string;
    dragModel: string;
    comparisonMethod: string;
    comparisonAlpha: number;
    comparisonMaxOutliers: number;
    comparisonK: number;
    resolutions: LabResolutions;
    reminderOffsetsHours: number[];
    afterReleaseHandIns: AfterReleaseHandIns;
    cohortIds: string[];
  },
  timeZone: string,
): LabFormValues {
  return {
    fields: {
      title: lab.title,
      kind: lab.kind,
      instructions: lab.instructions,
      opensAt: instantToWallClock(lab.opensAt, timeZone),
      dueAt: instantToWallClock(lab.dueAt, timeZone),
      lateCutoffAt: lab.lateCutoffAt ? instantToWallClock(lab.lateCutoffAt, timeZone) : "",
      requiredDrops: String(lab.requiredDrops),
      wallCorrection: lab.wallCorrection,
      dragModel: lab.dragModel,
      comparisonMethod: lab.comparisonMethod,
      comparisonAlpha: String(lab.comparisonAlpha),
      comparisonMaxOutliers: String(lab.comparisonMaxOutliers),
      comparisonK: String(lab.comparisonK),
      reminderOffsetsHours: lab.reminderOffsetsHours.join(", "),
      afterReleaseHandIns: lab.afterReleaseHandIns,
      ...Object.fromEntries(Object.entries(labResolutions(lab.resolutions)).map(([key, value]) => [`resolutions.${key}`, String(value)])),
    },
    cohortIds: lab.cohortIds,
    allowedPartIds: lab.allowedPartIds,
  };
}

/** A failed submission as the form shows it again: exactly what was typed and ticked. */
export function submittedLabFormValues(form: FormData): LabFormValues {
  const fields = Object.fromEntries([...form.entries()].filter((entry): entry is [string, string] => typeof entry[1] === "string"));
  const all = (name: string) => form.getAll(name).filter((value): value is string => typeof value === "string");
  return { fields, cohortIds: all("cohortIds"), allowedPartIds: Object.values(allowedPartFields).flatMap(all) };
}
