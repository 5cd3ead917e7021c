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

/** Subjects longer than this are cut, with an ellipsis; RFC 5322 allows 998 characters a line, so folding never matters. */
export const SUBJECT_MAX_LENGTH = 180;
const NAME_MAX_LENGTH = 120;

const codePoints = (text: string) => Array.from(text);
// Control characters (CR and LF above all) never reach a header: they become spaces.
const oneLine = (text: string) => text.replace(/[\p{Cc}\s]+/gu, " ").trim();

function shortenSubject(subject: string): string {
  const flat = codePoints(oneLine(subject));
  return flat.length <= SUBJECT_MAX_LENGTH
    ? flat.join("")
    : `${flat
        .slice(0, SUBJECT_MAX_LENGTH - 1)
        .join("")
        .trimEnd()}…`;
}

/**
 * A display name is whatever a person typed (quotes and angle brackets included): the transport encodes
 * it. Here it is only made one line and cut to length, so that no name can stop a message.
 */
const displayName = (name: string | null | undefined) =>
  codePoints(oneLine(name ?? ""))
    .slice(0, NAME_MAX_LENGTH)
    .join("")
    .trim() || null;

const recipientAddress = z.email("not a valid e-mail address").max(254).toLowerCase();

export type EmailMessage<T extends EmailTemplateName = EmailTemplateName> = {
  to: string;
  toName?: string | null;
  template: T;
  props: EmailTemplates[T];
  courseId?: string | null;
  /** Chosen by the caller, at most 200 characters. */
  dedupeKey?: string;
};

const describeIssues = (issues: z.core.$ZodIssue[], path: string) =>
  issues.map((issue) => `${[path, ...issue.path].join(".")}: ${issue.message}`).join("; ");

/**
 * Builds one message's outbox row. A message that cannot be sent (a bad address, props that do not fit
 * the template) still gets a row, already `failed` with the reason, so that it is seen and the rest of
 * its batch goes out.
 */
function outboxRowFor(message: EmailMessage) {
  const address = recipientAddress.safeParse(message.to);
  const props = templatePropsSchemas[message.template].safeParse(message.props);
  const problems = [
    address.success ? null : describeIssues(address.error.issues, "to"),
    props.success ? null : describeIssues(props.error.issues, "props"),
  ].filter(Boolean);
  return {
    // The id is chosen here so that each message maps to its row without relying on RETURNING's order.
    id: randomUUID(),
    toAddress: address.success ? address.data : String(message.to).trim().toLowerCase().slice(0, 254),
    toName: displayName(message.toName),
    template: message.template,
    // JSON round trip: Dates become ISO strings, which the template's schema revives on delivery.
    props: props.success ? JSON.parse(JSON.stringify(props.data)) : {},
    subject: props.success
      ? shortenSubject(emailSubject(message.template, props.data as EmailTemplates[EmailTemplateName]))
      : `(${message.template}: not sent)`,
    courseId: message.courseId ?? null,
    dedupeKey: message.dedupeKey ?? null,
    status: problems.length ? ("failed" as const) : ("queued" as const),
    failedAt: problems.length ? new Date() : null,
    lastError: problems.length ? `Refused before sending: ${problems.join("; ")}` : null,
  };
}

export type QueuedEmail = { outboxId: string; duplicate: boolean; refused: boolean };

/**
 * One message as an outbox insert (`on conflict do nothing` on its dedupe key) and its delivery job
 * (null when the message is refused), for a caller that writes the row inside a statement it runs
 * anyway: the hand-in, whose statements are budgeted. The caller inserts the job with `enqueuer().insert`.
 */
export function outboxEntry(tx: Executor, message: EmailMessage) {
  const row = outboxRowFor(message);
  return {
    insert: tx.insert(emailOutbox).values(row).onConflictDoNothing(),
    job: row.status === "queued" ? { name: queues.emailDelivery, data: { outboxId: row.id } satisfies EmailDeliveryJob } : null,
  };
}

/**
 * Writes the outbox rows and enqueues their delivery jobs inside `tx`, in a constant number of
 * statements whatever the batch's size (a roster import queues thousands). A message that cannot be
 * sent is written as failed (`refused`) and gets no job; it never stops the others. A message whose
 * `dedupeKey` is already in the outbox is not queued again.
 */
export async function sendEmails(tx: Executor, messages: EmailMessage[]): Promise<QueuedEmail[]> {
  if (messages.length === 0) return [];
  const rows = messages.map(outboxRowFor);
  // A savepoint when `tx` is already a transaction: the rows and the jobs always go together.
  return tx.transaction(async (inner) => {
    const inserted = new Set(await insertMany(inner, emailOutbox, rows, { onConflictDoNothing: true }));
    const duplicateKeys = rows.filter((row) => !inserted.has(row.id)).map((row) => row.dedupeKey!);
    const existing = duplicateKeys.length
      ? await inner
          .select({ id: emailOutbox.id, dedupeKey: emailOutbox.dedupeKey })
          .from(emailOutbox)
          .where(inArray(emailOutbox.dedupeKey, duplicateKeys))
      : [];
    const existingByKey = new Map(existing.map((row) => [row.dedupeKey, row.id]));

    const jobs = rows
      .filter((row) => inserted.has(row.id) && row.status === "queued")
      .map((row) => ({ name: queues.emailDelivery, data: { outboxId: row.id } satisfies EmailDeliveryJob }));
    if (jobs.length) {
      // pg-boss's batch insert joins on the queue table and says nothing when the queue is missing.
      // Raw: pg-boss's own queue table is not in our schema.
      const queue = await inner.execute(sql`select 1 from pgboss.queue where name = ${queues.emailDelivery}`);
      if (queue.rows.length === 0)
        throw new Error(`The job queue "${queues.emailDelivery}" does not exist: run the migrations (npm start does).`);
      await enqueuer().insert(jobs, { db: transactionAdapter(inner) });
    }
    return rows.map((row) =>
      inserted.has(row.id)
        ? { outboxId: row.id, duplicate: false, refused: row.status === "failed" }
        : { outboxId: existingByKey.get(row.dedupeKey)!, duplicate: true, refused: false },
    );
  });
}

/** Writes an outbox row and enqueues its delivery job inside `tx`; rolls back with it. `dedupeKey` (unique) makes a repeat a no-op returning the existing row. */
export async function sendEmail<T extends EmailTemplateName>(tx: Executor, message: EmailMessage<T>): Promise<QueuedEmail> {
  const [result] = await sendEmails(tx, [message as EmailMessage]);
  return result;
}
