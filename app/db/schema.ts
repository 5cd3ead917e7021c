/**
 * Benchpost's tables, enums and relations, in one place.
 * Measured values are stored in SI units unless the column name carries another unit.
 * Times are `timestamptz`; a course's IANA time zone decides how they are shown.
 */
import { relations, sql } from "drizzle-orm";
import {
  bigint,
  boolean,
  check,
  doublePrecision,
  index,
  inet,
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
  varchar,
} from "drizzle-orm/pg-core";
import { kitStates } from "../lib/kits/kit-states";
import type { MarkScores, MarkState, ReleasedMarkSnapshot } from "../lib/marking/marks";
import { afterReleaseHandInPolicies } from "../lib/marking/release";
import { autoRules, criterionKinds, type AutoRuleParams, type RubricLevel } from "../lib/marking/rubric";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();

// ---------------------------------------------------------------------------------------------
// People and sessions

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** Stored lower-cased so that sign-in and invitations match whatever case people type. */
    email: text("email").notNull(),
    name: text("name").notNull(),
    /** argon2id PHC string; null for people who only sign in by e-mailed link. */
    passwordHash: text("password_hash"),
    /** The institution's own number, for mark export; optional. */
    studentNumber: text("student_number"),
    /** May open new courses (open sign-up or `npm run user:create-instructor`); roles inside a course live in memberships. */
    mayCreateCourses: boolean("may_create_courses").notNull().default(false),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("users_email_unique").on(table.email)],
);

export const sessions = pgTable(
  "sessions",
  {
    /** SHA-256 of the token given to the browser, hex; the token itself is never stored. */
    id: text("id").primaryKey(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    /** Shown in account settings so that people can recognise, and end, a session they do not know. */
    userAgent: text("user_agent"),
    ip: inet("ip"),
    createdAt: createdAt(),
  },
  (table) => [index("sessions_user_idx").on(table.userId)],
);

export const emailLinkPurpose = pgEnum("email_link_purpose", ["sign_in", "password_reset"]);

/** Single-use links sent by e-mail (sign-in, password reset). Only the SHA-256 of the token is kept. */
export const emailLinks = pgTable(
  "email_links",
  {
    /** SHA-256 of the token in the link, hex. */
    id: text("id").primaryKey(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    purpose: emailLinkPurpose("purpose").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    createdAt: createdAt(),
  },
  (table) => [index("email_links_user_idx").on(table.userId)],
);

/** Personal API tokens for `Authorization: Bearer …` on /api/v1; shown once, stored as SHA-256. */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** SHA-256 of the token, hex. */
    tokenHash: text("token_hash").notNull(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("api_tokens_token_hash_unique").on(table.tokenHash), index("api_tokens_user_idx").on(table.userId)],
);

/**
 * Counters of rate-limiter-flexible's RateLimiterPostgres, created here rather than by the library at
 * run time so that every app instance and test copy finds it ready. Its column layout is the library's.
 */
export const rateLimits = pgTable("rate_limits", {
  key: varchar("key", { length: 255 }).primaryKey(),
  points: integer("points").notNull().default(0),
  /** Milliseconds since the epoch, as the library writes it. */
  expire: bigint("expire", { mode: "number" }),
});

// ---------------------------------------------------------------------------------------------
// Courses, cohorts and who belongs where

export const courseRole = pgEnum("course_role", ["instructor", "ta", "student"]);

export const courses = pgTable(
  "courses",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    title: text("title").notNull(),
    /** The institution's course code, e.g. "ME 2140"; unique within a term. */
    code: text("code").notNull(),
    term: text("term").notNull(),
    /** IANA zone name (e.g. "Europe/Lisbon"): opening and due times are entered and shown in it. */
    timeZone: text("time_zone").notNull(),
    /** Local gravitational acceleration in m/s²; null means standard gravity 9.80665. */
    localGravity: real("local_gravity"),
    /** Family significance of the kit-part bias tests (Welch t of a part against its peers per lab, Holm-corrected); a part beyond it is flagged for re-measurement. */
    partBiasAlpha: real("part_bias_alpha").notNull().default(0.05),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("courses_code_term_unique").on(table.code, table.term)],
);

export const cohorts = pgTable(
  "cohorts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("cohorts_course_name_unique").on(table.courseId, table.name)],
);

export const courseMemberships = pgTable(
  "course_memberships",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: courseRole("role").notNull(),
    /** A student's cohort; staff have none (TAs are assigned to cohorts in `ta_cohort_assignments`). */
    cohortId: uuid("cohort_id").references(() => cohorts.id, { onDelete: "set null" }),
    /** Removed members keep their row (and so their hand-ins); they simply lose access. */
    removedAt: timestamp("removed_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("course_memberships_course_user_unique").on(table.courseId, table.userId),
    index("course_memberships_user_idx").on(table.userId),
    index("course_memberships_cohort_idx").on(table.cohortId),
  ],
);

export const taCohortAssignments = pgTable(
  "ta_cohort_assignments",
  {
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "cascade" }),
    cohortId: uuid("cohort_id")
      .notNull()
      .references(() => cohorts.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
  },
  (table) => [primaryKey({ columns: [table.membershipId, table.cohortId] })],
);

// ---------------------------------------------------------------------------------------------
// Audit trail: who did what, when and from where. Never a password or a token.

export const auditEvents = pgTable(
  "audit_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** Null for course-less events such as a failed sign-in. */
    courseId: uuid("course_id").references(() => courses.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    /** A dotted name such as `auth.sign_in` or `course.member_added`. */
    action: text("action").notNull(),
    /** What the event is about, e.g. `kit:…` or `user:…`. */
    subject: text("subject"),
    ip: inet("ip"),
    detail: jsonb("detail")
      .$type<Record<string, unknown>>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    /** True when a staff member acted in "view as student" mode. */
    viewedAs: boolean("viewed_as").notNull().default(false),
    createdAt: createdAt(),
  },
  (table) => [
    index("audit_events_course_created_idx").on(table.courseId, table.createdAt),
    index("audit_events_actor_idx").on(table.actorId),
  ],
);

/**
 * An instructor's invitation to a course. The e-mailed link carries a token whose SHA-256 is kept here;
 * accepting creates the account (or attaches the course to an existing one) with the chosen role and cohort.
 */
export const invitations = pgTable(
  "invitations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    /** Lower-cased, like `users.email`. */
    email: text("email").notNull(),
    name: text("name"),
    role: courseRole("role").notNull(),
    cohortId: uuid("cohort_id").references(() => cohorts.id, { onDelete: "set null" }),
    invitedById: uuid("invited_by_id").references(() => users.id, { onDelete: "set null" }),
    /** SHA-256 of the token in the link, hex. */
    tokenHash: text("token_hash").notNull(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    acceptedById: uuid("accepted_by_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("invitations_token_hash_unique").on(table.tokenHash),
    index("invitations_course_email_idx").on(table.courseId, table.email),
  ],
);

/**
 * A committed roster import. The preview names itself with a key made in the browser; committing the
 * same key again (a second click, a resent form) finds this row and invites no one twice.
 */
export const rosterImports = pgTable(
  "roster_imports",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    importKey: text("import_key").notNull(),
    createdById: uuid("created_by_id").references(() => users.id, { onDelete: "set null" }),
    rowCount: integer("row_count").notNull(),
    committedAt: timestamp("committed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [uniqueIndex("roster_imports_course_key_unique").on(table.courseId, table.importKey)],
);

// ---------------------------------------------------------------------------------------------
// Relations

export const usersRelations = relations(users, ({ many }) => ({
  memberships: many(courseMemberships),
  sessions: many(sessions),
}));

export const sessionsRelations = relations(sessions, ({ one }) => ({
  user: one(users, { fields: [sessions.userId], references: [users.id] }),
}));

export const coursesRelations = relations(courses, ({ many }) => ({
  cohorts: many(cohorts),
  memberships: many(courseMemberships),
}));

export const cohortsRelations = relations(cohorts, ({ one, many }) => ({
  course: one(courses, { fields: [cohorts.courseId], references: [courses.id] }),
  students: many(courseMemberships),
  taAssignments: many(taCohortAssignments),
}));

export const courseMembershipsRelations = relations(courseMemberships, ({ one, many }) => ({
  course: one(courses, { fields: [courseMemberships.courseId], references: [courses.id] }),
  user: one(users, { fields: [courseMemberships.userId], references: [users.id] }),
  cohort: one(cohorts, { fields: [courseMemberships.cohortId], references: [cohorts.id] }),
  taAssignments: many(taCohortAssignments),
}));

export const taCohortAssignmentsRelations = relations(taCohortAssignments, ({ one }) => ({
  membership: one(courseMemberships, { fields: [taCohortAssignments.membershipId], references: [courseMemberships.id] }),
  cohort: one(cohorts, { fields: [taCohortAssignments.cohortId], references: [cohorts.id] }),
}));

// ---------------------------------------------------------------------------------------------
// Kit inventory: measured parts, kits made of them, and the history of both.
// Lengths are in mm and masses in g, as measured at the bench; the reduction converts to SI.

export const partKind = pgEnum("part_kind", ["sphere", "fluid_lot", "column", "accessory"]);
export const partStatus = pgEnum("part_status", ["in_service", "remeasure", "retired"]);
export const kitState = pgEnum("kit_state", kitStates);

/** A calibration point of a fluid lot: viscosity measured at one temperature. */
export type CalibrationPoint = { temperatureC: number; viscosityPaS: number };

/**
 * Every part in one table, told apart by `kind`: the inventory, history, kit contents and imports
 * then treat parts alike, and a new experiment's part kind adds columns rather than tables.
 */
export const parts = pgTable(
  "parts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    kind: partKind("kind").notNull(),
    /** The course's own label, e.g. "S-12" or "GLY-2", unique within the course. */
    label: text("label").notNull(),
    status: partStatus("status").notNull().default("in_service"),
    notes: text("notes"),
    // sphere
    material: text("material"),
    diameterMm: real("diameter_mm"),
    diameterResolutionMm: real("diameter_resolution_mm"),
    massG: real("mass_g"),
    massResolutionG: real("mass_resolution_g"),
    // fluid lot
    fluidName: text("fluid_name"),
    densityKgM3: real("density_kg_m3"),
    /** Standard uncertainty of the density (kg/m³); null: taken as exact, so the budget shows no row for it. */
    densityUncertaintyKgM3: real("density_uncertainty_kg_m3"),
    /**
     * dρ/dT (kg/m³ per K, negative for liquids). With it, `density_kg_m3` is the density at 20 °C and a
     * reduction uses ρ(T) = ρ₂₀ + (dρ/dT)(T − 20 °C); null: the density is used at every temperature.
     */
    densityTemperatureCoefficientKgM3K: real("density_temperature_coefficient_kg_m3_k"),
    calibration: jsonb("calibration").$type<CalibrationPoint[]>(),
    /**
     * Set when the lot is a glycerol–water mix: glycerol's mass fraction, 0–1. The calibration is then
     * checked against handbook data; the reductions still use the calibration alone.
     */
    glycerolMassFraction: real("glycerol_mass_fraction"),
    // column
    innerDiameterMm: real("inner_diameter_mm"),
    /** Standard uncertainty of the bore (mm); null: the lab's diameter resolution/√12 is used. */
    innerDiameterUncertaintyMm: real("inner_diameter_uncertainty_mm"),
    timedDistanceMm: real("timed_distance_mm"),
    runInMm: real("run_in_mm"),
    marginBelowMm: real("margin_below_mm"),
    // accessory
    accessoryType: text("accessory_type"),
    /**
     * When a value that enters reductions (d, m, density, calibration, bore, distances) last changed:
     * the part's bias then counts only figures revised after it, so a corrected part's flag can clear.
     */
    reductionChangedAt: timestamp("reduction_changed_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("parts_course_label_unique").on(table.courseId, table.label),
    index("parts_course_kind_idx").on(table.courseId, table.kind),
  ],
);

/** What happened to a part: created, re-measured (old and new values), sent for re-measurement, retired. */
export const partEvents = pgTable(
  "part_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    partId: uuid("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: text("action").notNull(),
    note: text("note"),
    detail: jsonb("detail")
      .$type<Record<string, unknown>>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (table) => [index("part_events_part_created_idx").on(table.partId, table.createdAt)],
);

export const kits = pgTable(
  "kits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    /** The number written on the box, unique within the course. */
    number: text("number").notNull(),
    state: kitState("state").notNull().default("on_shelf"),
    /** The student the kit is packed for or held by; cleared when it is checked in. */
    holderMembershipId: uuid("holder_membership_id").references(() => courseMemberships.id, { onDelete: "set null" }),
    carrier: text("carrier"),
    trackingNumber: text("tracking_number"),
    shippedOn: text("shipped_on"),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("kits_course_number_unique").on(table.courseId, table.number),
    // One active kit per student per course: a membership belongs to exactly one course.
    uniqueIndex("kits_holder_unique")
      .on(table.holderMembershipId)
      .where(sql`${table.holderMembershipId} is not null`),
    index("kits_course_state_idx").on(table.courseId, table.state),
  ],
);

/**
 * Which parts a kit holds. A sphere, column or accessory sits in at most one kit at a time; a fluid lot
 * fills the bottles of many kits, so its rows are not `exclusive`.
 */
export const kitParts = pgTable(
  "kit_parts",
  {
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    partId: uuid("part_id")
      .notNull()
      .references(() => parts.id, { onDelete: "restrict" }),
    exclusive: boolean("exclusive").notNull().default(true),
  },
  (table) => [
    primaryKey({ columns: [table.kitId, table.partId] }),
    uniqueIndex("kit_parts_exclusive_part_unique")
      .on(table.partId)
      .where(sql`${table.exclusive}`),
    index("kit_parts_part_idx").on(table.partId),
  ],
);

/** Every change of a kit's state (and every report about it), with who, when and why. */
export const kitEvents = pgTable(
  "kit_events",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    kitId: uuid("kit_id")
      .notNull()
      .references(() => kits.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    fromState: kitState("from_state"),
    toState: kitState("to_state"),
    /** `moved`, `assigned`, `reported` (a student's missing or damaged part), `checked_in`. */
    action: text("action").notNull(),
    note: text("note"),
    detail: jsonb("detail")
      .$type<Record<string, unknown>>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (table) => [index("kit_events_kit_created_idx").on(table.kitId, table.createdAt)],
);

export const partsRelations = relations(parts, ({ one, many }) => ({
  course: one(courses, { fields: [parts.courseId], references: [courses.id] }),
  events: many(partEvents),
  kitParts: many(kitParts),
}));

export const partEventsRelations = relations(partEvents, ({ one }) => ({
  part: one(parts, { fields: [partEvents.partId], references: [parts.id] }),
  actor: one(users, { fields: [partEvents.actorId], references: [users.id] }),
}));

export const kitsRelations = relations(kits, ({ one, many }) => ({
  course: one(courses, { fields: [kits.courseId], references: [courses.id] }),
  holder: one(courseMemberships, { fields: [kits.holderMembershipId], references: [courseMemberships.id] }),
  parts: many(kitParts),
  events: many(kitEvents),
}));

export const kitPartsRelations = relations(kitParts, ({ one }) => ({
  kit: one(kits, { fields: [kitParts.kitId], references: [kits.id] }),
  part: one(parts, { fields: [kitParts.partId], references: [parts.id] }),
}));

export const kitEventsRelations = relations(kitEvents, ({ one }) => ({
  kit: one(kits, { fields: [kitEvents.kitId], references: [kits.id] }),
  actor: one(users, { fields: [kitEvents.actorId], references: [users.id] }),
}));

// ---------------------------------------------------------------------------------------------
// E-mail: the outbox every message passes through, and the development mail catcher's inbox.

export const emailStatus = pgEnum("email_status", ["queued", "sent", "failed"]);

/**
 * One row per message the product decided to send, written in the same transaction as the change that
 * caused it. The delivery job reads it; the row's id is the provider's idempotency key.
 */
export const emailOutbox = pgTable(
  "email_outbox",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    /** Lower-cased, like users.email. */
    toAddress: text("to_address").notNull(),
    toName: text("to_name"),
    template: text("template").notNull(),
    /** The template's props as JSON; dates are ISO strings and are revived by the template's schema. */
    props: jsonb("props").$type<Record<string, unknown>>().notNull(),
    subject: text("subject").notNull(),
    /** Set when the message belongs to a course, so that its instructors see it if delivery fails. */
    courseId: uuid("course_id").references(() => courses.id, { onDelete: "cascade" }),
    /** Chosen by the caller (e.g. `deadline-reminder:<lab>:<user>:24h`); a repeat returns the first row. */
    dedupeKey: text("dedupe_key"),
    status: emailStatus("status").notNull().default("queued"),
    attempts: integer("attempts").notNull().default(0),
    /**
     * Set, and committed, before the transport is asked; cleared once its answer is recorded. Still set
     * on a queued row means an attempt was cut off (a killed worker) and may have gone out.
     */
    attemptStartedAt: timestamp("attempt_started_at", { withTimezone: true }),
    lastError: text("last_error"),
    /** `resend` or `smtp`: which transport accepted the message. */
    transport: text("transport"),
    providerMessageId: text("provider_message_id"),
    createdAt: createdAt(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
    failedAt: timestamp("failed_at", { withTimezone: true }),
  },
  (table) => [
    uniqueIndex("email_outbox_dedupe_key_unique").on(table.dedupeKey),
    index("email_outbox_course_status_idx").on(table.courseId, table.status),
  ],
);

/** What the development mail catcher received over SMTP; kept in PostgreSQL so it survives restarts. */
export const caughtEmails = pgTable(
  "caught_emails",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    messageId: text("message_id"),
    fromAddress: text("from_address").notNull(),
    /** Lower-cased envelope recipients. */
    toAddresses: text("to_addresses").array().notNull(),
    subject: text("subject").notNull(),
    html: text("html"),
    text: text("text"),
    headers: jsonb("headers").$type<Record<string, string>>().notNull(),
    receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("caught_emails_received_idx").on(table.receivedAt), index("caught_emails_to_idx").using("gin", table.toAddresses)],
);

export const emailOutboxRelations = relations(emailOutbox, ({ one }) => ({
  course: one(courses, { fields: [emailOutbox.courseId], references: [courses.id] }),
}));

// ---------------------------------------------------------------------------------------------
// Labs and drop logs. A lab is an experiment kind published to cohorts; a drop log is one student's
// hand-in for it, kept as immutable versions. The latest version handed in counts.

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
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("labs_course_idx").on(table.courseId)],
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
  kitRecords: jsonb("kit_records").$type<Record<string, unknown>>().notNull(),
  reduction: jsonb("reduction").$type<Record<string, unknown>>().notNull(),
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
    draft: jsonb("draft").$type<Record<string, unknown>>(),
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
    input: jsonb("input").$type<Record<string, unknown>>().notNull(),
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

export const labsRelations = relations(labs, ({ one, many }) => ({
  course: one(courses, { fields: [labs.courseId], references: [courses.id] }),
  cohorts: many(labCohorts),
  dropLogs: many(dropLogs),
}));

export const labCohortsRelations = relations(labCohorts, ({ one }) => ({
  lab: one(labs, { fields: [labCohorts.labId], references: [labs.id] }),
  cohort: one(cohorts, { fields: [labCohorts.cohortId], references: [cohorts.id] }),
}));

export const dropLogsRelations = relations(dropLogs, ({ one, many }) => ({
  lab: one(labs, { fields: [dropLogs.labId], references: [labs.id] }),
  membership: one(courseMemberships, { fields: [dropLogs.membershipId], references: [courseMemberships.id] }),
  versions: many(dropLogVersions),
  photos: many(dropLogPhotos),
}));

export const dropLogVersionsRelations = relations(dropLogVersions, ({ one, many }) => ({
  dropLog: one(dropLogs, { fields: [dropLogVersions.dropLogId], references: [dropLogs.id] }),
  submittedBy: one(users, { fields: [dropLogVersions.submittedById], references: [users.id] }),
  photos: many(dropLogPhotos),
}));

export const dropLogPhotosRelations = relations(dropLogPhotos, ({ one }) => ({
  dropLog: one(dropLogs, { fields: [dropLogPhotos.dropLogId], references: [dropLogs.id] }),
  version: one(dropLogVersions, { fields: [dropLogPhotos.versionId], references: [dropLogVersions.id] }),
}));

// ---------------------------------------------------------------------------------------------
// Class comparison: the label each counted hand-in carries, written by the relabel job (never by a
// hand-in, so that a hand-in locks no other student's rows), and every change of it.

export const comparisonLabel = pgEnum("comparison_label", ["consistent", "suspect", "outlier"]);

/** The method and parameters a label was computed with, as the lab had them then. */
export type ComparisonMethodSettings = { method: "grubbs" | "esd" | "iqr"; alpha: number; maxOutliers: number; k: number };

export const comparisonLabels = pgTable(
  "comparison_labels",
  {
    /**
     * One current label per drop log: the one of its latest counted version. No foreign key on purpose:
     * its check would take a key-share lock on every drop_logs row of the lab while the job relabels,
     * and a hand-in's `select … for update` of its own drop log would then wait for the job.
     */
    dropLogId: uuid("drop_log_id").primaryKey(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    versionId: uuid("version_id")
      .notNull()
      .references(() => dropLogVersions.id, { onDelete: "cascade" }),
    figure: real("figure").notNull(),
    label: comparisonLabel("label").notNull(),
    reason: text("reason").notNull(),
    method: jsonb("method").$type<ComparisonMethodSettings>().notNull(),
    computedAt: timestamp("computed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [index("comparison_labels_lab_idx").on(table.labId)],
);

/** A hand-in's label history: a row each time its label (or the version it labels) changes. */
export const comparisonLabelChanges = pgTable(
  "comparison_label_changes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    /** No foreign key, for the reason given on `comparison_labels.drop_log_id`. */
    dropLogId: uuid("drop_log_id").notNull(),
    versionId: uuid("version_id")
      .notNull()
      .references(() => dropLogVersions.id, { onDelete: "cascade" }),
    /** Null for the first label a hand-in gets. */
    fromLabel: comparisonLabel("from_label"),
    toLabel: comparisonLabel("to_label").notNull(),
    reason: text("reason").notNull(),
    method: jsonb("method").$type<ComparisonMethodSettings>().notNull(),
    changedAt: timestamp("changed_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    index("comparison_label_changes_log_idx").on(table.dropLogId, table.changedAt),
    index("comparison_label_changes_lab_idx").on(table.labId),
  ],
);

// ---------------------------------------------------------------------------------------------
// Marking: a lab's rubric, one mark per student and lab, every change of a mark, and the lab's
// marking state (ready for moderation, released to students). Points are plain numbers (two decimals).

export const criterionKind = pgEnum("criterion_kind", criterionKinds);
export const autoRule = pgEnum("auto_rule", autoRules);
/** Where a mark change came from: one cell of the marking desk, a bulk action on many rows, or an instructor's moderation. */
export const markChangeSource = pgEnum("mark_change_source", ["desk", "bulk", "moderation"]);

/** One criterion of a lab's rubric. Scores in `marks.scores` are keyed by its id, so an edited rubric keeps them. */
export const rubricCriteria = pgTable(
  "rubric_criteria",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    title: text("title").notNull(),
    description: text("description").notNull().default(""),
    kind: criterionKind("kind").notNull(),
    /** Levels criteria only: picked by their 1-based number. */
    levels: jsonb("levels").$type<RubricLevel[]>(),
    /** The lowest and highest points: a range's bounds, a levels criterion's lowest and highest level, 0 and the maximum for an automatic one. */
    minPoints: doublePrecision("min_points").notNull().default(0),
    maxPoints: doublePrecision("max_points").notNull(),
    /** Automatic criteria only. */
    autoRule: autoRule("auto_rule"),
    autoParams: jsonb("auto_params")
      .$type<AutoRuleParams>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    index("rubric_criteria_lab_position_idx").on(table.labId, table.position),
    check("rubric_criteria_levels_only_for_levels", sql`(${table.kind} = 'levels') = (${table.levels} is not null)`),
    check("rubric_criteria_rule_only_for_auto", sql`(${table.kind} = 'auto') = (${table.autoRule} is not null)`),
    check("rubric_criteria_points_in_order", sql`${table.minPoints} >= 0 and ${table.maxPoints} >= ${table.minPoints}`),
  ],
);

/**
 * A student's mark for a lab. `scores` holds what was given by hand (levels, points, overrides of an
 * automatic criterion with their reason); until release the automatic criteria are computed on read
 * from the counted hand-in, and release writes them in (`frozen`), so a later hand-in by someone else
 * cannot change a released mark. `total` is as of the last write. `version` grows by one with every
 * change: a save names the version it started from, and a different one is a conflict.
 */
export const marks = pgTable(
  "marks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "restrict" }),
    /** The counted drop-log version when the mark was last changed; null when nothing was handed in (a missing hand-in can be marked 0). */
    dropLogVersionId: uuid("drop_log_version_id").references(() => dropLogVersions.id, { onDelete: "restrict" }),
    /** That version's reduction revision when the mark was last changed: a later revision flags "result changed since it was marked". */
    reductionRevision: integer("reduction_revision"),
    scores: jsonb("scores")
      .$type<MarkScores>()
      .notNull()
      .default(sql`'{}'::jsonb`),
    feedback: text("feedback").notNull().default(""),
    latePenaltyPoints: doublePrecision("late_penalty_points").notNull().default(0),
    total: doublePrecision("total").notNull().default(0),
    version: integer("version").notNull().default(1),
    /** Who last marked it at the desk (one cell or a bulk action): moderation keeps the marker, so each TA's distribution stays theirs. */
    markedById: uuid("marked_by_id").references(() => users.id, { onDelete: "set null" }),
    moderatedById: uuid("moderated_by_id").references(() => users.id, { onDelete: "set null" }),
    moderatedAt: timestamp("moderated_at", { withTimezone: true }),
    /** When students first could see it; null until the lab's marks are released with it among them. */
    releasedAt: timestamp("released_at", { withTimezone: true }),
    /** What the student saw at release, so a later change can be shown as "changed after release". */
    releasedSnapshot: jsonb("released_snapshot").$type<ReleasedMarkSnapshot>(),
    /**
     * Set when a hand-in after release (the lab's policy "reopen") made this released mark need re-marking;
     * `drop_log_version_id` still names the version it was marked on. Cleared when it is marked again.
     */
    reopenedAt: timestamp("reopened_at", { withTimezone: true }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (table) => [
    uniqueIndex("marks_lab_membership_unique").on(table.labId, table.membershipId),
    index("marks_membership_idx").on(table.membershipId),
    index("marks_marked_by_idx").on(table.markedById),
  ],
);

/** Every change of a mark, never updated or deleted: who, when, the mark before and after, why, and from where. */
export const markChanges = pgTable(
  "mark_changes",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    markId: uuid("mark_id")
      .notNull()
      .references(() => marks.id, { onDelete: "cascade" }),
    labId: uuid("lab_id")
      .notNull()
      .references(() => labs.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "restrict" }),
    changedById: uuid("changed_by_id").references(() => users.id, { onDelete: "set null" }),
    changedAt: timestamp("changed_at", { withTimezone: true }).notNull().defaultNow(),
    /** Null for the change that created the mark. */
    old: jsonb("old").$type<MarkState>(),
    new: jsonb("new").$type<MarkState>().notNull(),
    reason: text("reason"),
    source: markChangeSource("source").notNull(),
    /** The mark was already released: the student is shown this change and its reason. */
    afterRelease: boolean("after_release").notNull().default(false),
  },
  (table) => [
    index("mark_changes_mark_changed_idx").on(table.markId, table.changedAt),
    index("mark_changes_lab_changed_idx").on(table.labId, table.changedAt),
  ],
);

/** A lab's marking state: marked ready by an instructor (TAs then stop changing marks), and released to students. */
export const labMarking = pgTable("lab_marking", {
  labId: uuid("lab_id")
    .primaryKey()
    .references(() => labs.id, { onDelete: "cascade" }),
  readyAt: timestamp("ready_at", { withTimezone: true }),
  readyById: uuid("ready_by_id").references(() => users.id, { onDelete: "set null" }),
  /** The latest release; each release shows students the marks not shown yet. */
  releasedAt: timestamp("released_at", { withTimezone: true }),
  releasedById: uuid("released_by_id").references(() => users.id, { onDelete: "set null" }),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

export const rubricCriteriaRelations = relations(rubricCriteria, ({ one }) => ({
  lab: one(labs, { fields: [rubricCriteria.labId], references: [labs.id] }),
}));

export const marksRelations = relations(marks, ({ one, many }) => ({
  lab: one(labs, { fields: [marks.labId], references: [labs.id] }),
  membership: one(courseMemberships, { fields: [marks.membershipId], references: [courseMemberships.id] }),
  basedOn: one(dropLogVersions, { fields: [marks.dropLogVersionId], references: [dropLogVersions.id] }),
  markedBy: one(users, { fields: [marks.markedById], references: [users.id] }),
  changes: many(markChanges),
}));

export const markChangesRelations = relations(markChanges, ({ one }) => ({
  mark: one(marks, { fields: [markChanges.markId], references: [marks.id] }),
  changedBy: one(users, { fields: [markChanges.changedById], references: [users.id] }),
}));

export const labMarkingRelations = relations(labMarking, ({ one }) => ({
  lab: one(labs, { fields: [labMarking.labId], references: [labs.id] }),
}));
