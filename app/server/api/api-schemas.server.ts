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
      issues: z.array(z.object({ path: z.array(z.union([z.string(), z.number()])), message: z.string() })).optional().describe("Per-field problems, by the field's path."),
    }),
  })
  .register(apiSchemas, { id: "Error" });

export const meResponse = z
  .object({
    user: z.object({ id: uuid, name: z.string(), email: z.string() }),
    courses: z.array(z.object({ id: uuid, code: z.string(), title: z.string(), role: z.enum(["instructor", "ta", "student"]) })),
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
    dueAt: timestamp,
    lateCutoffAt: timestamp.nullable().describe("Late hand-ins are accepted, and labelled late, until then; null: none after the due time."),
    dropLog: z
      .object({ status: z.enum(["not-started", "draft", "handed-in", "late"]), versionCount: z.int() })
      .nullable()
      .describe("For students, where their own drop log stands; null for staff."),
  })
  .register(apiSchemas, { id: "LabSummary" });
export const labList = z.object({ labs: z.array(labSummary) }).register(apiSchemas, { id: "LabList" });

const looseObject = z.looseObject({});

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
    reduction: looseObject.describe("The server's reduction (its current revision), with its warnings (SI units)."),
    normalisedFigure: z.number().nullable().describe("C_D/C_D,ref (drag) or measured/reference viscosity (viscometry)."),
    reynolds: z.number().nullable(),
    dragCoefficient: z.number().nullable(),
    viscosityPaS: z.number().nullable(),
    warningCount: z.int().min(0),
    currentRevision: z.int().min(1).describe("The reduction revision shown: 1 at hand-in, one more each time a part it used was corrected."),
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
    photos: z.array(z.object({ id: uuid, versionId: uuid.nullable(), contentType: z.string(), bytes: z.int(), originalName: z.string().nullable(), createdAt: timestamp })),
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
    z.object({ reduction: looseObject }).describe("The engine's reduction of an SI input."),
    z.object({ reduction: looseObject, kitRecords: looseObject, normalisedFigure: z.number().nullable(), warnings: z.array(looseObject) }).describe("A drop-log preview against the caller's kit."),
  ])
  .register(apiSchemas, { id: "Reduction" });

export const classComparisonResponse = z.looseObject({}).register(apiSchemas, { id: "ClassComparison", description: "The lab's class comparison: labels with reasons for each counted hand-in." });

export const marksResponse = z
  .object({
    lab: z.object({ id: uuid, courseId: uuid, title: z.string(), releasedAt: timestamp.nullable().describe("The latest release of the lab's marks; null before the first.") }),
    maxTotal: z.number().describe("The sum of the criteria's maximum points."),
    criteria: z.array(z.object({ id: uuid, title: z.string(), kind: z.enum(["levels", "range", "auto"]), maxPoints: z.number() })),
    marks: z.array(
      z.object({
        membershipId: uuid,
        student: z.object({ name: z.string(), email: z.string(), studentNumber: z.string().nullable() }),
        cohort: z.object({ id: uuid, name: z.string() }),
        handIn: z.enum(["missing", "on-time", "late"]).describe("Where the counted hand-in stands."),
        late: z.boolean(),
        total: z.number().nullable().describe("Criteria points (given, overridden or suggested) minus the late penalty, at least 0; null before the student is marked."),
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
