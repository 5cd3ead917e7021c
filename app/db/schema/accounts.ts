/**
 * People and sessions
 */
import { bigint, boolean, index, inet, integer, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, varchar } from "drizzle-orm/pg-core";
import { createdAt } from "./columns";

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
    /** SHA-256 (hex) of the secret in the user's private calendar feed address; null until they make one. Reset replaces it. */
    calendarFeedTokenHash: text("calendar_feed_token_hash"),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("users_email_unique").on(table.email),
    uniqueIndex("users_calendar_feed_token_unique").on(table.calendarFeedTokenHash),
  ],
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
