/**
 * What an instructor types to set a lab; one schema for the form's instant messages and the server.
 * Times are wall-clock times in the course's time zone, so the schema is made for that zone.
 */
import { z } from "zod";
import { typedNumber } from "~/lib/forms/typed-number";
import type { LabResolutions } from "~/db/schema";
import { comparisonSettings } from "~/lib/comparison/comparison-settings";
import { formList } from "~/lib/forms/submission";
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
  typedNumber(
    z
      .number({ error: `Enter the ${what} resolution in ${unit}.` })
      .gt(0, `The ${what} resolution must be more than 0 ${unit}.`)
      .max(max, `A ${what} resolution over ${max} ${unit} is not a measurement.`),
  );

/** "48, 6" → [48, 6]: whole hours before the due time, each once, largest first. */
const reminderOffsets = z
  .string()
  .trim()
  .default("")
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
/**
 * A list of part ids. One box may send several ids in one value, separated by spaces: the lab form's
 * "all of this size" box, so that ticking it allows the whole group without script. Repeats count once.
 */
const allowedParts = (what: string) =>
  z.preprocess(
    (value) => {
      const items = value === undefined || value === "" ? [] : Array.isArray(value) ? value : [value];
      return [...new Set(items.flatMap((item) => (typeof item === "string" ? item.split(" ").filter(Boolean) : [item])))];
    },
    z.array(z.uuid(`Choose ${what} from the list.`)).max(500, `Tick at most 500 ${what}.`),
  );

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
      requiredDrops: typedNumber(
        z
          .number({ error: "Enter the number of drops." })
          .int("Enter a whole number of drops.")
          .min(3, "Ask for at least 3 drops (the stray-drop test is made from 7).")
          .max(MAX_DROPS, `Ask for at most ${MAX_DROPS} drops.`),
      ),
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
        thermometerAccuracyC: typedNumber(
          z
            .number({ error: "Enter the thermometer's accuracy in °C." })
            .gt(0, "The thermometer's accuracy must be more than 0 °C.")
            .max(10, "A thermometer accuracy over ±10 °C is not a measurement."),
        ),
      }),
      reminderOffsetsHours: reminderOffsets,
      afterReleaseHandIns: z.enum(afterReleaseHandInPolicies, { error: "Choose what a hand-in after the release does." }).default("refuse"),
      cohortIds: formList(z.uuid("Choose cohorts from the list.")),
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

/**
 * What the lab form shows, as the form's default value: text as typed (or as stored, in the course's
 * zone) and the ticked ids.
 */
export type LabFormValues = Omit<
  { [Key in keyof LabInput]: string },
  "resolutions" | "cohortIds" | (typeof allowedPartFields)[AllowedPartKind]
> & {
  resolutions: Record<keyof LabResolutions, string>;
  cohortIds: string[];
} & Record<(typeof allowedPartFields)[AllowedPartKind], string[]>;

const resolutionTexts = (resolutions: Required<LabResolutions>) =>
  Object.fromEntries(Object.entries(resolutions).map(([key, value]) => [key, String(value)])) as LabFormValues["resolutions"];

/**
 * A new lab's form: the defaults above; the times are left for the instructor to type, and no cohort
 * is ticked, so the instructor chooses whom the lab is for rather than unticking the others.
 */
export function newLabFormValues(kind: ExperimentKind): LabFormValues {
  return {
    title: "",
    kind,
    instructions: "",
    opensAt: "",
    dueAt: "",
    lateCutoffAt: "",
    requiredDrops: String(DEFAULT_REQUIRED_DROPS),
    wallCorrection: "faxen",
    dragModel: kind === "viscometry" ? "stokes" : "schiller-naumann",
    comparisonMethod: "grubbs",
    comparisonAlpha: "0.05",
    comparisonMaxOutliers: "3",
    comparisonK: "1.5",
    reminderOffsetsHours: DEFAULT_REMINDER_OFFSETS_HOURS.join(", "),
    afterReleaseHandIns: "refuse",
    resolutions: resolutionTexts(DEFAULT_RESOLUTIONS),
    cohortIds: [],
    allowedSphereIds: [],
    allowedFluidLotIds: [],
    allowedColumnIds: [],
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
    resolutions: resolutionTexts(labResolutions(lab.resolutions)),
    cohortIds: lab.cohortIds,
    // The stored list holds every kind; each kind's boxes show only parts of that kind, so each may get all of it.
    allowedSphereIds: lab.allowedPartIds,
    allowedFluidLotIds: lab.allowedPartIds,
    allowedColumnIds: lab.allowedPartIds,
  };
}
