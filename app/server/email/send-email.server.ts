/**
 * The one way the product sends e-mail. It never talks to the network: it writes an outbox row and
 * enqueues the delivery job on the caller's transaction, so the message exists exactly when the change
 * that caused it is committed. The worker (`npm run worker`) delivers it.
 */
import { randomUUID } from "node:crypto";
import { inArray, sql } from "drizzle-orm";
import { z } from "zod";
import { emailOutbox } from "~/db/schema";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor } from "~/server/db.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";
import { type EmailTemplateName, type EmailTemplates, templatePropsSchemas } from "../../../emails/template-props";
import { emailSubject } from "./email-templates.server";

export type { EmailTemplateName, EmailTemplates };

export type EmailDeliveryJob = { outboxId: string };

/** Thrown for a message that must not be queued; `issues` says which field and why. */
export class EmailRejectedError extends Error {
  constructor(public readonly issues: z.core.$ZodIssue[]) {
    super(`E-mail refused: ${issues.map((issue) => `${issue.path.join(".") || "message"}: ${issue.message}`).join("; ")}`);
    this.name = "EmailRejectedError";
  }
}

// RFC 5322 allows 998 characters per header line; we stay far below so that folding never matters.
const subjectSchema = z
  .string()
  .min(1)
  .max(180, "subject is longer than 180 characters")
  .refine((subject) => !/[\r\n]/.test(subject), "subject must not contain CR or LF (header injection)");

const envelopeSchema = z.object({
  to: z.email("not a valid e-mail address").max(254).toLowerCase(),
  toName: z
    .string()
    .trim()
    .max(120)
    .refine((name) => !/[\r\n"<>]/.test(name), "name must not contain CR, LF, quotes or angle brackets")
    .nullish(),
  courseId: z.uuid().nullish(),
  dedupeKey: z.string().min(1).max(200).optional(),
});

export type EmailMessage<T extends EmailTemplateName = EmailTemplateName> = {
  to: string;
  toName?: string | null;
  template: T;
  props: EmailTemplates[T];
  courseId?: string | null;
  dedupeKey?: string;
};

/** Checks one message and builds its outbox row; a refusal names the message's place in the batch. */
function outboxRowFor(message: EmailMessage, index: number | null) {
  const at = (issues: z.core.$ZodIssue[], path: PropertyKey[] = []) =>
    issues.map((issue) => ({ ...issue, path: [...(index === null ? [] : [index]), ...path, ...issue.path] }));
  const envelope = envelopeSchema.safeParse(message);
  if (!envelope.success) throw new EmailRejectedError(at(envelope.error.issues));
  const props = templatePropsSchemas[message.template].safeParse(message.props);
  if (!props.success) throw new EmailRejectedError(at(props.error.issues, ["props"]));
  const subject = subjectSchema.safeParse(emailSubject(message.template, props.data as EmailTemplates[EmailTemplateName]));
  if (!subject.success) throw new EmailRejectedError(at(subject.error.issues.map((issue) => ({ ...issue, path: [] })), ["subject"]));
  return {
    // The id is chosen here so that each message maps to its row without relying on RETURNING's order.
    id: randomUUID(),
    toAddress: envelope.data.to,
    toName: envelope.data.toName ?? null,
    template: message.template,
    // JSON round trip: Dates become ISO strings, which the template's schema revives on delivery.
    props: JSON.parse(JSON.stringify(props.data)) as Record<string, unknown>,
    subject: subject.data,
    courseId: envelope.data.courseId ?? null,
    dedupeKey: envelope.data.dedupeKey ?? null,
  };
}

/**
 * Writes the outbox rows and enqueues their delivery jobs inside `tx`, in a constant number of
 * statements whatever the batch's size (a roster import queues thousands). All are checked before any
 * is written. A message whose `dedupeKey` is already in the outbox is not queued again.
 */
export async function sendEmails(tx: Executor, messages: EmailMessage[]): Promise<{ outboxId: string; duplicate: boolean }[]> {
  if (messages.length === 0) return [];
  const rows = messages.map((message, index) => outboxRowFor(message, messages.length === 1 ? null : index));
  // A savepoint when `tx` is already a transaction: the rows and the jobs always go together.
  return tx.transaction(async (inner) => {
    const inserted = new Set(await insertMany(inner, emailOutbox, rows, { onConflictDoNothing: true }));
    const duplicateKeys = rows.filter((row) => !inserted.has(row.id)).map((row) => row.dedupeKey!);
    const existing = duplicateKeys.length
      ? await inner.select({ id: emailOutbox.id, dedupeKey: emailOutbox.dedupeKey }).from(emailOutbox).where(inArray(emailOutbox.dedupeKey, duplicateKeys))
      : [];
    const existingByKey = new Map(existing.map((row) => [row.dedupeKey, row.id]));

    const jobs = rows.filter((row) => inserted.has(row.id)).map((row) => ({ name: queues.emailDelivery, data: { outboxId: row.id } satisfies EmailDeliveryJob }));
    if (jobs.length) {
      // pg-boss's batch insert joins on the queue table and says nothing when the queue is missing.
      const queue = await inner.execute(sql`select 1 from pgboss.queue where name = ${queues.emailDelivery}`);
      if (queue.rows.length === 0) throw new Error(`The job queue "${queues.emailDelivery}" does not exist: run the migrations (npm start does).`);
      await enqueuer().insert(jobs, { db: transactionAdapter(inner) });
    }
    return rows.map((row) =>
      inserted.has(row.id) ? { outboxId: row.id, duplicate: false } : { outboxId: existingByKey.get(row.dedupeKey)!, duplicate: true },
    );
  });
}

/** Writes an outbox row and enqueues its delivery job inside `tx`; rolls back with it. `dedupeKey` (unique) makes a repeat a no-op returning the existing row. */
export async function sendEmail<T extends EmailTemplateName>(tx: Executor, message: EmailMessage<T>): Promise<{ outboxId: string; duplicate: boolean }> {
  const [result] = await sendEmails(tx, [message as EmailMessage]);
  return result;
}
