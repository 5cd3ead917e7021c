/**
 * Helpers for the e-mail tests: a known-good message, fast retries on the test file's own database,
 * and polling until the worker has done its part.
 */
import { eq, sql } from "drizzle-orm";
import { emailOutbox } from "~/db/schema";
import { db } from "~/server/db.server";
import { createBoss, emailDeliveryPolicy, queues } from "~/server/jobs/boss.server";

export const signInMessage = (to: string) =>
  ({ to, template: "sign-in-link", props: { url: "http://localhost:3000/sign-in/test-token", expiresInMinutes: 15 } }) as const;

/** Retries after about a second instead of half a minute, so that a test sees several attempts. */
export async function useFastRetries(
  retryLimit: number = emailDeliveryPolicy.retryLimit,
  connectionString = process.env.DATABASE_URL!,
): Promise<void> {
  const boss = createBoss(connectionString, { max: 1, supervise: false, schedule: false });
  await boss.start();
  try {
    await boss.updateQueue(queues.emailDelivery, {
      name: queues.emailDelivery,
      ...emailDeliveryPolicy,
      retryLimit,
      retryDelay: 1,
      deadLetter: queues.emailGaveUp,
    });
  } finally {
    await boss.stop({ graceful: false, wait: true });
  }
}

export async function waitFor<T>(check: () => Promise<T | undefined | null | false>, what: string, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const result = await check().catch(() => undefined);
    if (result) return result;
    await new Promise((resolve) => setTimeout(resolve, 150));
  }
  throw new Error(`Timed out after ${timeoutMs} ms waiting for ${what}`);
}

export async function outboxRow(outboxId: string) {
  const [row] = await db.select().from(emailOutbox).where(eq(emailOutbox.id, outboxId));
  return row;
}

export async function deliveryJobs(outboxId: string): Promise<{ state: string; retry_count: number }[]> {
  const result = await db.execute<{ state: string; retry_count: number }>(
    sql`select state, retry_count from pgboss.job where name = ${queues.emailDelivery} and data->>'outboxId' = ${outboxId}`,
  );
  return result.rows;
}
