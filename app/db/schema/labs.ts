/**
 * Labs and drop logs. A lab is an experiment kind published to cohorts; a drop log is one student's
 * hand-in for it, kept as immutable versions. The latest version handed in counts.
 */
import { sql } from "drizzle-orm";
import {
  boolean,
  check,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  real,
  text,
  timestamp,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import type { DropLogDraft, DropLogInput } from "../../lib/drop-logs/drop-log-input";
import type { KitRecords, StoredReduction } from "../../lib/drop-logs/reduce-drop-log";
import type { Reduction } from "../../lib/reduction";
import { afterReleaseHandInPolicies } from "../../lib/marking/release";
import { users } from "./accounts";
import { createdAt } from "./columns";
import { cohorts, courseMemberships, courses } from "./courses";
import { partEvents, parts } from "./kits";

export const experimentKind = pgEnum("experiment_kind", ["drag", "viscometry"]);
export const labStatus = pgEnum("lab_status", ["draft", "published", "closed"]);
/** What a hand-in from a student whose mark is already released does: refused, or taken with the mark reopened for re-marking. */
export const afterReleaseHandIns = pgEnum("after_release_hand_ins", afterReleaseHandInPolicies);

/**
 * Instrument resolutions a lab assumes, in the units of the bench; they feed the uncertainty budget.
 * `thermometerAccuracyC` is the thermometer's stated accuracy ±a (a rectangular distribution, u = a/√3),
 * beside its reading resolution; labs saved before it existed have none and read as the default.
 */
export type LabResolutions = {
  diameterMm: number;
  massG: number;
  distanceMm: number;
  timeS: number;
  temperatureC: number;
  thermometerAccuracyC?: number;
};

export const labs = pgTable(
  "labs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    title: text("title").notNull(),
    kind: experimentKind("kind").notNull(),
    status: labStatus("status").notNull().default("draft"),
    instructions: text("instructions").notNull().default(""),
    opensAt: timestamp("opens_at", { withTimezone: true }).notNull(),
    dueAt: timestamp("due_at", { withTimezone: true }).notNull(),
    /** Late hand-ins are accepted (and labelled late) until this time; null means none after the due time. */
    lateCutoffAt: timestamp("late_cutoff_at", { withTimezone: true }),
    requiredDrops: integer("required_drops").notNull().default(10),
    /** Parts students may use (empty: any part of their kit of the right kind). */
    allowedPartIds: uuid("allowed_part_ids")
      .array()
      .notNull()
      .default(sql`'{}'::uuid[]`),
    wallCorrection: text("wall_correction").notNull().default("faxen"),
    dragModel: text("drag_model").notNull().default("schiller-naumann"),
    comparisonMethod: text("comparison_method").notNull().default("grubbs"),
    comparisonAlpha: real("comparison_alpha").notNull().default(0.05),
    comparisonMaxOutliers: integer("comparison_max_outliers").notNull().default(3),
    comparisonK: real("comparison_k").notNull().default(1.5),
    resolutions: jsonb("resolutions").$type<LabResolutions>().notNull(),
    /** Hours before the due time at which students without a hand-in are reminded. */
    reminderOffsetsHours: integer("reminder_offsets_hours")
      .array()
      .notNull()
      .default(sql`'{48,6}'::integer[]`),
    /** A hand-in after the student's mark is released: refused (the default), or taken and the mark reopened. */
    afterReleaseHandIns: afterReleaseHandIns("after_release_hand_ins").notNull().default("refuse"),
    publishedAt: timestamp("published_at", { withTimezone: true }),
    /** The lab's weight in the term mark book, relative to the course's other labs; 0 leaves it out of the term total. */
    markWeight: doublePrecision("mark_weight").notNull().default(1),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("labs_course_idx").on(table.courseId), check("labs_mark_weight_not_negative", sql`${table.markWeight} >= 0`)],
);

export const labCohorts = pgTable(
  "lab_cohorts",
  {
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    cohortId: uuid("cohort_id")
      .notNull()
      .references(() => cohorts.id, { onDelete: "cascade" }),
  },
  (table) => [primaryKey({ columns: [table.labId, table.cohortId] })],
);

/**
 * A reduction as stored: the kit records it used, the engine's output and the key figures copied out
 * for the class comparison. A revision keeps one; a version keeps a copy of its current revision's, so
 * every reader of versions sees the latest without a join. Fresh builders each call: a column belongs to one table.
 */
const reductionColumns = () => ({
  kitRecords: jsonb("kit_records").$type<KitRecords>().notNull(),
  reduction: jsonb("reduction").$type<StoredReduction>().notNull(),
  /** measured/reference viscosity (viscometry) or C_D/C_D,ref (drag): comparable across kits and temperatures. */
  normalisedFigure: real("normalised_figure"),
  reynolds: real("reynolds"),
  dragCoefficient: real("drag_coefficient"),
  viscosityPaS: real("viscosity_pa_s"),
  warningCount: integer("warning_count").notNull().default(0),
});

/** One student's hand-in for one lab: the container of its versions. Its row is the only one a hand-in locks. */
export const dropLogs = pgTable(
  "drop_logs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "restrict" }),
    /** The version that counts: the latest handed in. */
    latestVersionId: uuid("latest_version_id"),
    /** The student's unsent form, saved as they type so that nothing is lost to a reload or a dropped connection. */
    draft: jsonb("draft").$type<DropLogDraft>(),
    draftSavedAt: timestamp("draft_saved_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("drop_logs_lab_member_unique").on(table.labId, table.membershipId),
    index("drop_logs_member_idx").on(table.membershipId),
  ],
);

/**
 * An immutable hand-in. `input` is what the student entered, `kitRecords` the kit values the server
 * used, `reduction` the engine's output; the key figures are copied out for the class comparison.
 * The reduction columns (`kitRecords`, `reduction`, the figures) are a copy of the current reduction
 * revision (`currentRevision`, see `reduction_revisions`): every reader (comparison, desk, CSV, API)
 * then sees the latest revision without another join. `input`, `submittedAt`, the parts used and the
 * revision-1 row keep what was handed in.
 */
export const dropLogVersions = pgTable(
  "drop_log_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    dropLogId: uuid("drop_log_id")
      .notNull()
      .references(() => dropLogs.id, { onDelete: "restrict" }),
    version: integer("version").notNull(),
    /** The client's key for this submission: a repeat with the same key creates nothing new. */
    idempotencyKey: text("idempotency_key").notNull(),
    submittedById: uuid("submitted_by_id").references(() => users.id, { onDelete: "set null" }),
    submittedAt: timestamp("submitted_at", { withTimezone: true }).notNull().defaultNow(),
    late: boolean("late").notNull().default(false),
    sphereId: uuid("sphere_id").references(() => parts.id, { onDelete: "restrict" }),
    fluidLotId: uuid("fluid_lot_id").references(() => parts.id, { onDelete: "restrict" }),
    columnId: uuid("column_id").references(() => parts.id, { onDelete: "restrict" }),
    input: jsonb("input").$type<DropLogInput>().notNull(),
    // Copied out of the JSON at hand-in, so that pages filter and sort on columns; null in hand-ins without them.
    /** The input's fluid temperature. */
    temperatureC: doublePrecision("temperature_c"),
    /** The kit records' g (m/s²), fed again to every re-reduction. */
    gravity: doublePrecision("gravity"),
    /** The reduction's mode; a re-reduction copies it with the rest of the reduction. */
    reductionMode: text("reduction_mode").$type<Reduction["mode"]>(),
    ...reductionColumns(),
    /** The revision the reduction columns copy: 1 at hand-in, one more for each part correction. */
    currentRevision: integer("current_revision").notNull().default(1),
  },
  (table) => [
    uniqueIndex("drop_log_versions_log_version_unique").on(table.dropLogId, table.version),
    uniqueIndex("drop_log_versions_log_key_unique").on(table.dropLogId, table.idempotencyKey),
    index("drop_log_versions_sphere_idx").on(table.sphereId),
    index("drop_log_versions_fluid_lot_idx").on(table.fluidLotId),
    index("drop_log_versions_column_idx").on(table.columnId),
  ],
);

/** Why a reduction was revised: the part whose record changed, its old and new values, who and when. */
export type ReductionRevisionCause = {
  partId: string;
  partLabel: string;
  partEventId: string;
  changes: Record<string, { from: unknown; to: unknown }>;
  changedById: string | null;
  changedAt: string;
};

/**
 * Every reduction of a version, never updated or deleted: revision 1 at hand-in (no cause), then one
 * per part correction that touched a part the version used, recomputed from the version's input.
 */
export const reductionRevisions = pgTable(
  "reduction_revisions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => dropLogVersions.id, { onDelete: "cascade" }),
    revision: integer("revision").notNull(),
    ...reductionColumns(),
    /** Null for revision 1. */
    cause: jsonb("cause").$type<ReductionRevisionCause>(),
    /** The part event that caused it: a re-run of its job finds the revision already there. */
    partEventId: uuid("part_event_id").references(() => partEvents.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("reduction_revisions_version_revision_unique").on(table.versionId, table.revision),
    uniqueIndex("reduction_revisions_version_event_unique").on(table.versionId, table.partEventId),
  ],
);

/** The progress of one part correction's re-reduction, which the part's page shows ("N of M recomputed"). */
export const rereductionRuns = pgTable(
  "rereduction_runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    partId: uuid("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "cascade" }),
    partEventId: uuid("part_event_id")
      .notNull()
      .references(() => partEvents.id, { onDelete: "cascade" }),
    total: integer("total").notNull(),
    done: integer("done").notNull().default(0),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("rereduction_runs_event_unique").on(table.partEventId),
    index("rereduction_runs_part_idx").on(table.partId, table.createdAt),
  ],
);

/** A photo of the set-up, stored outside the web root; attached to a version once it is handed in. */
export const dropLogPhotos = pgTable(
  "drop_log_photos",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    dropLogId: uuid("drop_log_id")
      .notNull()
      .references(() => dropLogs.id, { onDelete: "restrict" }),
    versionId: uuid("version_id").references(() => dropLogVersions.id, { onDelete: "restrict" }),
    storageKey: text("storage_key").notNull(),
    contentType: text("content_type").notNull(),
    bytes: integer("bytes").notNull(),
    originalName: text("original_name"),
    createdAt: createdAt(),
  },
  (table) => [index("drop_log_photos_log_idx").on(table.dropLogId)],
);

/**
 * Each deadline reminder sent: the unique key makes "(lab, student, due time, offset) at most once" hold
 * under retries and races. The due time is the one the student was reminded of (the lab's, or their
 * extension's): a reminder for a later due time is a new reminder, not a repeat.
 */
export const labReminders = pgTable(
  "lab_reminders",
  {
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "cascade" }),
    dueAt: timestamp("due_at", { withTimezone: true }).notNull(),
    offsetHours: integer("offset_hours").notNull(),
    outboxId: uuid("outbox_id"),
    sentAt: timestamp("sent_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [primaryKey({ columns: [table.labId, table.membershipId, table.dueAt, table.offsetHours] })],
);

/**
 * An extension: a later due time (and cut-off) for one student or for a whole cohort of a lab, with the
 * reason staff gave. A student's own extension wins over their cohort's, which wins over the lab's times;
 * `effectiveHandInWindow` in app/lib/drop-logs/hand-in-window.ts is the one place that decides.
 */
export const labExtensions = pgTable(
  "lab_extensions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    /** Exactly one of membershipId and cohortId is set. */
    membershipId: uuid("membership_id").references(() => courseMemberships.id, { onDelete: "cascade" }),
    cohortId: uuid("cohort_id").references(() => cohorts.id, { onDelete: "cascade" }),
    dueAt: timestamp("due_at", { withTimezone: true }).notNull(),
    /** Null: the lab's cut-off when it comes after the extended due time, else no late hand-ins. */
    lateCutoffAt: timestamp("late_cutoff_at", { withTimezone: true }),
    /** Shown to staff only: a student sees their own times, never why. */
    reason: text("reason").notNull(),
    createdById: uuid("created_by_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("lab_extensions_lab_member_unique")
      .on(table.labId, table.membershipId)
      .where(sql`${table.membershipId} is not null`),
    uniqueIndex("lab_extensions_lab_cohort_unique")
      .on(table.labId, table.cohortId)
      .where(sql`${table.cohortId} is not null`),
    check("lab_extensions_one_target", sql`(${table.membershipId} is null) <> (${table.cohortId} is null)`),
    check("lab_extensions_cutoff_after_due", sql`${table.lateCutoffAt} is null or ${table.lateCutoffAt} >= ${table.dueAt}`),
  ],
);
