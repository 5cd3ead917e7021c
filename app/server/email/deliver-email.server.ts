/**
 * What the delivery job does with one outbox row. Each attempt is recorded, and committed, before the
 * transport is asked, and holds the row for `ATTEMPT_LEASE_SECONDS`: a second worker (or a retry of a
 * job that is still running) finds it taken, and a row that is no longer `queued` is left alone.
 *
 * Delivery is at least once. A worker killed after the transport accepted a message but before the
 * row says `sent` leaves the attempt recorded; once its lease is over, the retry sends again with the
 * same Message-ID (SMTP; receiving systems and the dev inbox can tell the copies apart) or the same
 * idempotency key (Resend, which then sends nothing twice).
 */
import { and, eq, isNotNull, isNull, lte, or, sql } from "drizzle-orm";
import { emailOutbox } from "~/db/schema";
import type { Database } from "~/server/db.server";
import { emailDeliveryPolicy } from "~/server/jobs/boss.server";
import { renderStoredEmail } from "./email-templates.server";
import type { EmailTransport } from "./email-transport.server";

export type DeliveryOutcome = "sent" | "resent-after-interrupted-attempt" | "already-handled";

/** As long as pg-boss lets a delivery job run before retrying it, so an attempt's lease ends with its job. */
export const ATTEMPT_LEASE_SECONDS = emailDeliveryPolicy.expireInSeconds;

/** Another attempt holds the row: the job fails and pg-boss retries it later, when that attempt has settled. */
export class DeliveryInProgressError extends Error {
  constructor(outboxId: string) {
    super(`An attempt to send e-mail ${outboxId} is still within its lease.`);
    this.name = "DeliveryInProgressError";
  }
}

const describe = (error: unknown) => (error instanceof Error ? `${error.name}: ${error.message}` : String(error)).slice(0, 2000);

export async function deliverOutboxEmail(
  database: Database,
  transport: EmailTransport,
  outboxId: string,
  now = new Date(),
): Promise<DeliveryOutcome> {
  // Claim the attempt in one committed statement, and learn whether an earlier one was cut off.
  const earlier = database
    .select({ id: emailOutbox.id, attemptStartedAt: emailOutbox.attemptStartedAt })
    .from(emailOutbox)
    .where(eq(emailOutbox.id, outboxId))
    .for("update")
    .as("earlier");
  const leaseEnded = sql`${now}::timestamptz - make_interval(secs => ${ATTEMPT_LEASE_SECONDS})`;
  const claimed = await database
    .update(emailOutbox)
    .set({ attemptStartedAt: now, attempts: sql`${emailOutbox.attempts} + 1` })
    .from(earlier)
    .where(
      and(
        eq(emailOutbox.id, earlier.id),
        eq(emailOutbox.status, "queued"),
        or(isNull(earlier.attemptStartedAt), lte(earlier.attemptStartedAt, leaseEnded)),
      ),
    )
    .returning({ interrupted: isNotNull(earlier.attemptStartedAt) });
  if (claimed.length === 0) {
    const [row] = await database.select({ status: emailOutbox.status }).from(emailOutbox).where(eq(emailOutbox.id, outboxId));
    if (row?.status === "queued") throw new DeliveryInProgressError(outboxId);
    return "already-handled";
  }
  const [row] = await database.select().from(emailOutbox).where(eq(emailOutbox.id, outboxId));
  try {
    const rendered = await renderStoredEmail(row.template, row.props);
    const { providerMessageId } = await transport.deliver({
      outboxId: row.id,
      to: row.toAddress,
      toName: row.toName,
      subject: row.subject,
      html: rendered.html,
      text: rendered.text,
    });
    await database
      .update(emailOutbox)
      .set({ status: "sent", attemptStartedAt: null, transport: transport.name, providerMessageId, sentAt: new Date(), lastError: null })
      .where(eq(emailOutbox.id, row.id));
    return claimed[0].interrupted ? "resent-after-interrupted-attempt" : "sent";
  } catch (error) {
    // The transport answered with a refusal (or rendering failed): nothing went out, so the lease ends
    // now and the retry need not wait. Best effort when the database is the problem.
    await database
      .update(emailOutbox)
      .set({ attemptStartedAt: null, lastError: describe(error) })
      .where(and(eq(emailOutbox.id, outboxId), eq(emailOutbox.status, "queued")))
      .catch(() => undefined);
    throw error;
  }
}

/** Called once pg-boss has given up on the delivery job (its last retry failed or expired). */
export async function markEmailFailed(database: Database, outboxId: string, reason: string | null): Promise<void> {
  await database
    .update(emailOutbox)
    .set({ status: "failed", failedAt: new Date(), attemptStartedAt: null, lastError: sql`coalesce(${emailOutbox.lastError}, ${reason})` })
    .where(and(eq(emailOutbox.id, outboxId), eq(emailOutbox.status, "queued")));
}
