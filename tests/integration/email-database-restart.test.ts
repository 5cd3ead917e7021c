/**
 * The worker rides out a PostgreSQL restart. This file runs its own throwaway server (see
 * tests/support/throwaway-postgres.ts) rather than stopping the project's cluster, which the other
 * test files and other people's runs are using at the same moment.
 */
import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { caughtEmails, emailOutbox } from "~/db/schema";
import { type Database, createDatabase, createPool } from "~/server/db.server";
import { type EmailTransport, smtpTransport } from "~/server/email/email-transport.server";
import { type MailCatcher, startMailCatcher } from "~/server/email/mail-catcher.server";
import { sendEmail } from "~/server/email/send-email.server";
import { migrateDatabase } from "~/server/migrate.server";
import { type Worker, startWorker } from "~/server/jobs/worker.server";
import { signInMessage, useFastRetries, waitFor } from "../support/email";
import { type ThrowawayPostgres, startThrowawayPostgres } from "../support/throwaway-postgres";

let server: ThrowawayPostgres;
let pool: ReturnType<typeof createPool>;
let database: Database;
let catcher: MailCatcher;
let worker: Worker;
const workerLog: string[] = [];
let providerDown = true;
let attempts = 0;

beforeAll(async () => {
  server = await startThrowawayPostgres();
  await migrateDatabase(server.url);
  pool = createPool(server.url);
  pool.on("error", () => undefined);
  database = createDatabase(pool);
  catcher = await startMailCatcher({ connectionString: server.url, port: 0, log: () => undefined });
  const smtp = smtpTransport(`smtp://127.0.0.1:${catcher.port}`, "Benchpost <no-reply@benchpost.example>");
  // The first attempt fails, so that the job is pending (waiting for its retry) while the database is away.
  const flaky: EmailTransport = {
    name: "smtp",
    async deliver(email) {
      attempts++;
      if (providerDown) throw new Error("mail service unavailable");
      return smtp.deliver(email);
    },
    close: smtp.close,
  };
  worker = await startWorker({
    connectionString: server.url,
    transport: flaky,
    pollingIntervalSeconds: 0.5,
    log: (line) => workerLog.push(line),
  });
  await useFastRetries(5, server.url);
}, 120_000);

afterAll(async () => {
  await worker?.stop();
  await catcher?.close();
  await pool?.end();
  server?.destroy();
});

describe("the worker and a PostgreSQL restart", () => {
  it("keeps running while the database is down and delivers the pending message once it is back", async () => {
    const { outboxId } = await sendEmail(database, signInMessage("after.restart@example.org"));
    await waitFor(async () => {
      const jobs = await database.execute<{ state: string }>(sql`select state from pgboss.job where data->>'outboxId' = ${outboxId}`);
      return jobs.rows[0]?.state === "retry";
    }, "the first attempt to fail and the job to wait for its retry");
    expect(attempts).toBe(1);
    providerDown = false;

    server.stop();
    await new Promise((resolve) => setTimeout(resolve, 2_000));
    server.start();

    const row = await waitFor(
      async () => {
        const [current] = await database.select().from(emailOutbox).where(eq(emailOutbox.id, outboxId));
        return current?.status === "sent" && current;
      },
      "delivery after the restart",
      45_000,
    );
    expect(row.lastError).toBeNull();
    expect(workerLog.some((line) => /job queue|database connection lost/.test(line))).toBe(true);
    const caught = await database.select().from(caughtEmails).where(eq(caughtEmails.messageId, row.providerMessageId!));
    expect(caught).toHaveLength(1);
  }, 90_000);
});
