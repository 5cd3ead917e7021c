/**
 * The shapes /api/v1 answers with, as zod schemas: the OpenAPI document is generated from them, and
 * the API test checks real answers against that document. Request bodies are the app's own input
 * schemas (`dropLogInput`, `reduceInput`), not copies.
 */
import { z } from "zod";

/** Every schema the OpenAPI document names, under its id in `components.schemas`. */
export const apiSchemas = z.registry<{ id: string; description?: string }>();

const timestamp = z.string().describe("An instant, ISO 8601 in UTC.");
const uuid = z.uuid();

export const apiError = z
  .object({
    error: z.object({
      code: z.string().describe("A stable, machine-readable reason, e.g. `not_found`, `past_cutoff`."),
      message: z.string().describe("What went wrong and what to do, in words for people."),
      issues: z
        .array(z.object({ path: z.array(z.union([z.string(), z.number()])), message: z.string() }))
        .optional()
        .describe("Per-field problems, by the field's path."),
    }),
  })
  .register(apiSchemas, { id: "Error" });

export const meResponse = z
  .object({
    user: z.object({ id: uuid, name: z.string(), email: z.string() }),
    courses: z.array(
      z.object({
        id: uuid,
        code: z.string(),
        title: z.string(),
        term: z.string(),
        role: z.enum(["instructor", "ta", "student"]),
        /** Archived: finished and read-only (every change answers 409 `course_archived`). */
        archived: z.boolean(),
      }),
    ),
    authenticatedWith: z.enum(["session", "api-token"]),
  })
  .register(apiSchemas, { id: "Me" });

export const labSummary = z
  .object({
    id: uuid,
    title: z.string(),
    kind: z.enum(["drag", "viscometry"]),
    status: z.enum(["draft", "published", "closed"]),
    opensAt: timestamp,
    dueAt: timestamp.describe("For a student, their own due time: their extension's, else their cohort's, else the lab's."),
    lateCutoffAt: timestamp
      .nullable()
      .describe(
        "Late hand-ins are accepted, and labelled late, until then (for a student, their own, as `dueAt`); null: none after the due time.",
      ),
    dropLog: z
      .object({ status: z.enum(["not-started", "draft", "handed-in", "late"]), versionCount: z.int() })
      .nullable()
      .describe("For students, where their own drop log stands; null for staff."),
  })
  .register(apiSchemas, { id: "LabSummary" });
export const labList = z.object({ labs: z.array(labSummary) }).register(apiSchemas, { id: "LabList" });

const looseObject = z.looseObject({});

// JSON has no Infinity: a degrees of freedom of ∞ (a type B input, or a ν_eff with no type A input) is sent as null.
const degreesOfFreedom = z.number().nullable().describe("Degrees of freedom; null stands for ∞ (JSON has no Infinity).");
const uncertaintyTotals = {
  combined: z.number().describe("Combined standard uncertainty u_c (GUM 5.1.2), in the result's unit."),
  effectiveDegreesOfFreedom: degreesOfFreedom.describe("ν_eff by Welch–Satterthwaite (GUM G.4.1); null stands for ∞."),
  coverageFactor: z.number().describe("k = t₀.₉₇₅(ν_eff)."),
  expanded: z.number().describe("Expanded uncertainty U = k·u_c."),
  coverageProbability: z.number().describe("0.95."),
};
export const uncertaintyBudget = z
  .object({
    result: z.enum(["dragCoefficient", "viscosity"]).describe("C_D in drag mode, the Stokes μ in viscometry, with all drops."),
    value: z.number(),
    unit: z.string().describe('"1" for C_D, "Pa·s" for μ.'),
    rows: z.array(
      z.object({
        input: z.string(),
        value: z.number(),
        unit: z.string(),
        standardUncertainty: z.number(),
        type: z.enum(["A", "B"]),
        degreesOfFreedom,
        sensitivity: z.number().describe("∂y/∂xᵢ."),
        contribution: z
          .number()
          .describe("Sensitivity × standard uncertainty, in the result's unit; they combine in quadrature to `combined`."),
      }),
    ),
    ...uncertaintyTotals,
    normalisedFigure: z
      .object({ value: z.number(), ...uncertaintyTotals })
      .nullable()
      .describe(
        "The uncertainty of C_D/C_D,ref or μ/μ_ref(T), and so of the deviation from the reference; null in viscometry without a calibrated lot.",
      ),
  })
  .register(apiSchemas, { id: "UncertaintyBudget", description: "The GUM uncertainty budget of a reduction's main result." });
const storedReduction = z
  .looseObject({ uncertaintyBudget: uncertaintyBudget.optional().describe("Absent in versions reduced before budgets were kept.") })
  .describe("The server's reduction, with its warnings (SI units).");

export const storedVersion = z
  .object({
    id: uuid,
    version: z.int().min(1),
    submittedAt: timestamp,
    late: z.boolean(),
    sphereId: uuid.nullable(),
    fluidLotId: uuid.nullable(),
    columnId: uuid.nullable(),
    input: looseObject.describe("What the student entered (bench units: mm, g, °C, s)."),
    kitRecords: looseObject.describe("The kit records the current reduction revision used."),
    reduction: storedReduction,
    normalisedFigure: z.number().nullable().describe("C_D/C_D,ref (drag) or measured/reference viscosity (viscometry)."),
    reynolds: z.number().nullable(),
    dragCoefficient: z.number().nullable(),
    viscosityPaS: z.number().nullable(),
    warningCount: z.int().min(0),
    currentRevision: z
      .int()
      .min(1)
      .describe("The reduction revision shown: 1 at hand-in, one more each time a part it used was corrected."),
  })
  .register(apiSchemas, { id: "DropLogVersion" });

export const dropLogSummary = z
  .object({
    id: uuid,
    membershipId: uuid,
    studentName: z.string(),
    cohortId: uuid.nullable(),
    versionCount: z.int().min(0),
    latestVersion: storedVersion.nullable().describe("The version that counts: the latest handed in."),
  })
  .register(apiSchemas, { id: "DropLogSummary" });
export const dropLogList = z.object({ dropLogs: z.array(dropLogSummary) }).register(apiSchemas, { id: "DropLogList" });

export const dropLogDetail = z
  .object({
    id: uuid,
    labId: uuid,
    membershipId: uuid,
    studentName: z.string(),
    versions: z.array(storedVersion).describe("Every version, newest first. Versions are never changed or deleted."),
    photos: z.array(
      z.object({
        id: uuid,
        versionId: uuid.nullable(),
        contentType: z.string(),
        bytes: z.int(),
        originalName: z.string().nullable(),
        createdAt: timestamp,
      }),
    ),
  })
  .register(apiSchemas, { id: "DropLogDetail" });

export const handInResponse = z
  .object({
    version: z.object({ id: uuid, version: z.int().min(1), late: z.boolean(), submittedAt: timestamp }),
    duplicate: z.boolean().describe("True when this idempotency key was handed in before: nothing new was stored."),
  })
  .register(apiSchemas, { id: "HandIn" });

export const reduceResponse = z
  .union([
    z.object({ reduction: storedReduction }).describe("The engine's reduction of an SI input."),
    z
      .object({
        reduction: storedReduction,
        kitRecords: looseObject,
        normalisedFigure: z.number().nullable(),
        warnings: z.array(looseObject),
      })
      .describe("A drop-log preview against the caller's kit."),
  ])
  .register(apiSchemas, { id: "Reduction" });

export const classComparisonResponse = z.looseObject({}).register(apiSchemas, {
  id: "ClassComparison",
  description: "The lab's class comparison: labels with reasons for each counted hand-in.",
});

export const marksResponse = z
  .object({
    lab: z.object({
      id: uuid,
      courseId: uuid,
      title: z.string(),
      releasedAt: timestamp.nullable().describe("The latest release of the lab's marks; null before the first."),
    }),
    maxTotal: z.number().describe("The sum of the criteria's maximum points."),
    criteria: z.array(z.object({ id: uuid, title: z.string(), kind: z.enum(["levels", "range", "auto"]), maxPoints: z.number() })),
    marks: z.array(
      z.object({
        membershipId: uuid,
        student: z.object({ name: z.string(), email: z.string(), studentNumber: z.string().nullable() }),
        cohort: z.object({ id: uuid, name: z.string() }),
        handIn: z
          .enum(["missing", "on-time", "late", "not-due"])
          .describe(
            "Where the hand-in the mark rests on stands (`markedVersion`; the counted one for a student without a mark). Without one: `not-due` while nothing is handed in and the student's own due time (their extension's, else their cohort's, else the lab's) is still ahead, `missing` after it. `not-due` is new: earlier such students were reported `missing`.",
          ),
        late: z.boolean().describe("The hand-in the mark rests on was late."),
        markedVersion: z
          .object({ id: uuid, number: z.int().min(1) })
          .nullable()
          .describe(
            "The drop-log version the mark rests on: its automatic criteria, `handIn` and `late` are this version's. Null without a mark, or for a mark given with nothing handed in.",
          ),
        latestVersion: z
          .int()
          .min(1)
          .nullable()
          .describe(
            "The student's latest handed-in version; newer than `markedVersion` when they handed in again since marked. Null when nothing is handed in.",
          ),
        needsRemarking: z
          .boolean()
          .describe("A hand-in after the release reopened this released mark: it still rests on `markedVersion` until it is marked again."),
        total: z
          .number()
          .nullable()
          .describe(
            "Criteria points (given, overridden or suggested) minus the late penalty, at least 0; null before the student is marked.",
          ),
        complete: z.boolean().describe("Every criterion has points."),
        latePenaltyPoints: z.number(),
        points: z.record(z.string(), z.number().nullable()).describe("Points per criterion id."),
        feedback: z.string(),
        markedBy: z.string().nullable(),
        updatedAt: timestamp.nullable(),
        releasedAt: timestamp.nullable().describe("When the student could first see this mark; null until released."),
        version: z.int().min(0).describe("The mark's version (0 before there is one): a change names the version it started from."),
      }),
    ),
  })
  .register(apiSchemas, { id: "LabMarks", description: "A lab's marks, one entry per student the caller may see." });
