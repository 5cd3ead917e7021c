/**
 * Courses, cohorts and who belongs where
 */
import { sql } from "drizzle-orm";
import {
  type AnyPgColumn,
  boolean,
  check,
  date,
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
} from "drizzle-orm/pg-core";
import type { PostalAddress } from "../../lib/shipping/postal-address";
import { users } from "./accounts";
import { createdAt } from "./columns";

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
    /** The address kits leave from and come back to: the sender on every label. Null until set. */
    returnAddress: jsonb("return_address").$type<PostalAddress>(),
    /** The day kits must be back, in the course's time zone (the whole day counts); null: no return date. */
    kitReturnBy: date("kit_return_by", { mode: "string" }),
    /** Days after the return-by date on which a student whose kit is not on its way back is reminded. */
    kitReturnReminderDays: integer("kit_return_reminder_days")
      .array()
      .notNull()
      .default(sql`'{1,7}'::integer[]`),
    /** The term mark book leaves out each student's lowest this many lab percentages (among labs with weight). */
    markBookDropLowest: integer("mark_book_drop_lowest").notNull().default(0),
    /** The course this one was started from ("start next term from this course"); null for a course begun afresh. */
    carriedFromId: uuid("carried_from_id").references((): AnyPgColumn => courses.id, { onDelete: "set null" }),
    /** Set when an instructor archives the finished course: it becomes read-only and leaves the overviews, and stays exportable. */
    archivedAt: timestamp("archived_at", { withTimezone: true }),
    archivedById: uuid("archived_by_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("courses_code_term_unique").on(table.code, table.term),
    check("courses_drop_lowest_not_negative", sql`${table.markBookDropLowest} >= 0`),
  ],
);

export const cohorts = pgTable(
  "cohorts",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** The instructor's order of the course's cohorts (0 first): every list of cohorts follows it. */
    position: integer("position").notNull().default(0),
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
    /** The institution's number for the invited student, moved to the account on acceptance. */
    studentNumber: text("student_number"),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    /** Withdrawn by an instructor: the link then says so and opens nothing. */
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    revokedById: uuid("revoked_by_id").references(() => users.id, { onDelete: "set null" }),
    /** Sent again with a new token: the new invitation. The old link then says it was replaced. */
    replacedById: uuid("replaced_by_id").references((): AnyPgColumn => invitations.id, { onDelete: "set null" }),
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

/**
 * A message written by an instructor or TA to a cohort or a filtered set of students ("not handed in
 * lab 2"). Each recipient's copy goes through the outbox; `course_message_recipients` keeps who got it,
 * so it shows on each student's record. The send key, made with the preview, makes a resent form send once.
 */
export const courseMessages = pgTable(
  "course_messages",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    courseId: uuid("course_id")
      .notNull()
      .references(() => courses.id, { onDelete: "cascade" }),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    subject: text("subject").notNull(),
    body: text("body").notNull(),
    /** The filter as chosen (cohorts, lab, hand-in state), to show and to audit; the recipients are fixed at sending. */
    audience: jsonb("audience").$type<Record<string, unknown>>().notNull(),
    /** The filter in words, as the author saw it in the preview. */
    audienceLabel: text("audience_label").notNull(),
    recipientCount: integer("recipient_count").notNull(),
    sendKey: text("send_key").notNull(),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("course_messages_course_send_key_unique").on(table.courseId, table.sendKey),
    index("course_messages_course_created_idx").on(table.courseId, table.createdAt),
  ],
);

export const courseMessageRecipients = pgTable(
  "course_message_recipients",
  {
    messageId: uuid("message_id")
      .notNull()
      .references(() => courseMessages.id, { onDelete: "cascade" }),
    membershipId: uuid("membership_id")
      .notNull()
      .references(() => courseMemberships.id, { onDelete: "cascade" }),
    /** The recipient's copy in the outbox (its delivery status); null only if the outbox row was purged. */
    outboxId: uuid("outbox_id"),
  },
  (table) => [
    primaryKey({ columns: [table.messageId, table.membershipId] }),
    index("course_message_recipients_membership_idx").on(table.membershipId),
  ],
);

// Relations
