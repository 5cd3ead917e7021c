/**
 * Benchpost's tables, enums and relations, in one place.
 * Measured values are stored in SI units unless the column name carries another unit.
 * Times are `timestamptz`; a course's IANA time zone decides how they are shown.
 */
import { relations, sql } from "drizzle-orm";
import {
  boolean,
  index,
  inet,
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
    createdAt: createdAt(),
  },
  (table) => [index("sessions_user_idx").on(table.userId)],
);

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
    detail: jsonb("detail").$type<Record<string, unknown>>().notNull().default(sql`'{}'::jsonb`),
    /** True when a staff member acted in "view as student" mode. */
    viewedAs: boolean("viewed_as").notNull().default(false),
    createdAt: createdAt(),
  },
  (table) => [
    index("audit_events_course_created_idx").on(table.courseId, table.createdAt),
    index("audit_events_actor_idx").on(table.actorId),
  ],
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
