/**
 * E-mail: the outbox every message passes through, and the development mail catcher's inbox.
 */
import { index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { createdAt } from "./columns";
import { courses } from "./courses";

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
