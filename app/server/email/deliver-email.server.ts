/**
 * What the delivery job does with one outbox row. The row is locked while the message goes out, and a
 * row that is no longer `queued` is left alone, so a retried or repeated job never sends twice.
 */
import { and, eq, sql } from "drizzle-orm";
import { emailOutbox } from "~/db/schema";
import type { Database } from "~/server/db.server";
import { renderStoredEmail } from "./email-templates.server";
import type { EmailTransport } from "./email-transport.server";

export type DeliveryOutcome = "sent" | "already-handled";

const describe = (error: unknown) => (error instanceof Error ? `${error.name}: ${error.message}` : String(error)).slice(0, 2000);

export async function deliverOutboxEmail(database: Database, transport: EmailTransport, outboxId: string): Promise<DeliveryOutcome> {
  try {
    return await database.transaction(async (tx) => {
      const [row] = await tx.select().from(emailOutbox).where(eq(emailOutbox.id, outboxId)).for("update");
      if (!row || row.status !== "queued") return "already-handled";
      const rendered = await renderStoredEmail(row.template, row.props);
      const { providerMessageId } = await transport.deliver({
        outboxId: row.id,
        to: row.toAddress,
        toName: row.toName,
        subject: row.subject,
        html: rendered.html,
        text: rendered.text,
      });
      await tx
        .update(emailOutbox)
        .set({ status: "sent", attempts: sql`${emailOutbox.attempts} + 1`, transport: transport.name, providerMessageId, sentAt: new Date(), lastError: null })
        .where(eq(emailOutbox.id, row.id));
      return "sent";
    });
  } catch (error) {
    // Outside the rolled-back transaction, so instructors can see why; best effort when the database is the problem.
    await database
      .update(emailOutbox)
      .set({ attempts: sql`${emailOutbox.attempts} + 1`, lastError: describe(error) })
      .where(and(eq(emailOutbox.id, outboxId), eq(emailOutbox.status, "queued")))
      .catch(() => undefined);
    throw error;
  }
}

/** Called once pg-boss has given up on the delivery job (its last retry failed or expired). */
export async function markEmailFailed(database: Database, outboxId: string, reason: string | null): Promise<void> {
  await database
    .update(emailOutbox)
    .set({ status: "failed", failedAt: new Date(), lastError: sql`coalesce(${emailOutbox.lastError}, ${reason})` })
    .where(and(eq(emailOutbox.id, outboxId), eq(emailOutbox.status, "queued")));
}
