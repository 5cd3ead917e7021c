/**
 * The one way the product sends e-mail. It never talks to the network: it writes an outbox row and
 * enqueues the delivery job on the caller's transaction, so the message exists exactly when the change
 * that caused it is committed. The worker (`npm run worker`) delivers it.
 */
import { sql } from "drizzle-orm";
import { z } from "zod";
import { emailOutbox } from "~/db/schema";
import type { Executor, Transaction } from "~/server/db.server";
import { enqueuer, queues } from "~/server/jobs/boss.server";
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

/**
 * pg-boss accepts a caller's database adapter for `send`. This one runs pg-boss's numbered-parameter SQL
 * through Drizzle on the caller's transaction, so the job insert commits or rolls back with it.
 */
function transactionAdapter(tx: Transaction) {
  return {
    async executeSql(text: string, values: unknown[] = []) {
      // split() with a capture group alternates text and parameter numbers: "a $1 b" → ["a ", "1", " b"].
      const pieces = text.split(/\$(\d+)/);
      const query = sql.join(pieces.map((piece, index) => (index % 2 === 0 ? sql.raw(piece) : sql.param(values[Number(piece) - 1]))));
      const result = await tx.execute<Record<string, unknown>>(query);
      return { rows: result.rows };
    },
  };
}

/** Writes an outbox row and enqueues its delivery job inside `tx`; rolls back with it. `dedupeKey` (unique) makes a repeat a no-op returning the existing row. */
export async function sendEmail<T extends EmailTemplateName>(
  tx: Executor,
  message: { to: string; toName?: string | null; template: T; props: EmailTemplates[T]; courseId?: string | null; dedupeKey?: string },
): Promise<{ outboxId: string; duplicate: boolean }> {
  const envelope = envelopeSchema.safeParse(message);
  if (!envelope.success) throw new EmailRejectedError(envelope.error.issues);
  const props = templatePropsSchemas[message.template].safeParse(message.props);
  if (!props.success) throw new EmailRejectedError(props.error.issues.map((issue) => ({ ...issue, path: ["props", ...issue.path] })));
  const subject = subjectSchema.safeParse(emailSubject(message.template, props.data as EmailTemplates[T]));
  if (!subject.success) throw new EmailRejectedError(subject.error.issues.map((issue) => ({ ...issue, path: ["subject"] })));

  // A savepoint when `tx` is already a transaction: the row and the job always go together.
  return tx.transaction(async (inner) => {
    const [row] = await inner
      .insert(emailOutbox)
      .values({
        toAddress: envelope.data.to,
        toName: envelope.data.toName ?? null,
        template: message.template,
        // JSON round trip: Dates become ISO strings, which the template's schema revives on delivery.
        props: JSON.parse(JSON.stringify(props.data)) as Record<string, unknown>,
        subject: subject.data,
        courseId: envelope.data.courseId ?? null,
        dedupeKey: envelope.data.dedupeKey ?? null,
      })
      .onConflictDoNothing({ target: emailOutbox.dedupeKey })
      .returning({ id: emailOutbox.id });
    if (!row) {
      const existing = await inner.query.emailOutbox.findFirst({
        columns: { id: true },
        where: (outbox, { eq }) => eq(outbox.dedupeKey, envelope.data.dedupeKey!),
      });
      if (!existing) throw new Error("The outbox refused a row without a dedupe-key conflict.");
      return { outboxId: existing.id, duplicate: true };
    }
    const job: EmailDeliveryJob = { outboxId: row.id };
    const jobId = await enqueuer().send(queues.emailDelivery, job, { db: transactionAdapter(inner) });
    if (!jobId) throw new Error(`The job queue "${queues.emailDelivery}" does not exist: run the migrations (npm start does).`);
    return { outboxId: row.id, duplicate: false };
  });
}
