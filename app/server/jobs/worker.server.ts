/**
 * The background worker: takes jobs from pg-boss and runs them. Several workers may run at once; pg-boss
 * hands each job to one of them (SELECT … FOR UPDATE SKIP LOCKED), and a failed job is retried later.
 */
import type PgBoss from "pg-boss";
import { relabelLab, scheduleRelabel, type ClassComparisonJob } from "~/server/comparison/class-comparison.server";
import { createDatabase, createPool } from "~/server/db.server";
import { deliverOutboxEmail, markEmailFailed } from "~/server/email/deliver-email.server";
import type { EmailTransport } from "~/server/email/email-transport.server";
import type { EmailDeliveryJob } from "~/server/email/send-email.server";
import { runRereduction, type RereductionJob } from "~/server/kits/rereduce.server";
import { sendOverdueReminders } from "~/server/kits/returns.server";
import { sendLabReminders, type LabReminderJob } from "~/server/labs/lab-reminders.server";
import { logger } from "~/server/log.server";
import { carrierFromEnv, type Carrier } from "~/server/shipping/carrier.server";
import { buyLabels, type LabelPurchaseJob } from "~/server/shipping/shipments.server";
import { createBoss, createQueues, housekeepingCron, kitReturnRemindersCron, queues } from "./boss.server";
import { sweepExpiredRows } from "./housekeeping.server";

export type Worker = { stop(): Promise<void> };
/** A log line, with the queue and job id when it concerns one job. */
export type WorkerLog = (message: string, fields?: { queue: string; jobId: string }) => void;

const describe = (error: unknown) => (error instanceof Error ? error.message : String(error));

/**
 * Fetches and runs one job at a time until stopped. We do not use pg-boss's `work()`: it does not await
 * its complete/fail calls, so a database outage at that moment becomes an unhandled rejection that
 * stops the process. Here such a failure is logged, the job stays active, and pg-boss retries it once
 * it expires; the outbox row then tells the retry whether the message already went out.
 */
function runJobs<Data extends object>(
  boss: PgBoss,
  queue: string,
  pollingIntervalMs: number,
  handle: (job: PgBoss.Job<Data>, log: (message: string) => void) => Promise<void>,
  log: WorkerLog,
): () => Promise<void> {
  let stopping = false;
  let wake = () => {};
  const pause = () =>
    new Promise<void>((resolve) => {
      const timer = setTimeout(resolve, pollingIntervalMs);
      wake = () => {
        clearTimeout(timer);
        resolve();
      };
    });
  const loop = (async () => {
    while (!stopping) {
      try {
        const [job] = await boss.fetch<Data>(queue);
        if (!job) {
          await pause();
          continue;
        }
        const fields = { queue, jobId: job.id };
        try {
          await handle(job, (message) => log(message, fields));
        } catch (error) {
          log(`job failed, to be retried: ${describe(error)}`, fields);
          await boss.fail(queue, job.id, { message: describe(error) });
          continue;
        }
        await boss.complete(queue, job.id);
      } catch (error) {
        log(`job queue ${queue}: ${describe(error)}`);
        await pause();
      }
    }
  })();
  return async () => {
    stopping = true;
    wake();
    await loop;
  };
}

export async function startWorker(options: {
  connectionString: string;
  transport: EmailTransport;
  /** Where labels are bought; the configured carrier unless told (null: none, each label fails saying so). */
  carrier?: Carrier | null;
  /** How often an idle worker asks for new jobs. */
  pollingIntervalSeconds?: number;
  log?: WorkerLog;
}): Promise<Worker> {
  const log = options.log ?? ((message, fields) => logger.info(fields ?? {}, message));
  const pool = createPool(options.connectionString);
  // An idle connection dropped by a PostgreSQL restart must not crash the worker; the pool reconnects.
  pool.on("error", (error) => log(`database connection lost: ${error.message}`));
  const database = createDatabase(pool);
  // pg-boss runs its maintenance (expiring stuck jobs, archiving) here; a failed round is reported, not fatal.
  const boss = createBoss(options.connectionString, { max: 4 });
  boss.on("error", (error) => log(`job queue maintenance: ${error.message}`));
  await boss.start();
  await createQueues(boss);
  // Idempotent: every worker (re)writes the same schedule, and pg-boss's cron sends one job per tick.
  await boss.schedule(queues.housekeeping, housekeepingCron, {}, { tz: "UTC" });
  await boss.schedule(queues.kitReturnReminders, kitReturnRemindersCron, {}, { tz: "UTC" });

  const pollingIntervalMs = (options.pollingIntervalSeconds ?? 2) * 1000;
  const carrier = options.carrier === undefined ? carrierFromEnv() : options.carrier;
  const stoppers = [
    runJobs<EmailDeliveryJob>(
      boss,
      queues.emailDelivery,
      pollingIntervalMs,
      async (job, jobLog) => {
        const outcome = await deliverOutboxEmail(database, options.transport, job.data.outboxId);
        jobLog(`e-mail ${job.data.outboxId}: ${outcome} via ${options.transport.name}`);
      },
      log,
    ),
    runJobs<EmailDeliveryJob>(
      boss,
      queues.emailGaveUp,
      pollingIntervalMs,
      async (job, jobLog) => {
        await markEmailFailed(database, job.data.outboxId, "The delivery job was given up without an error message.");
        jobLog(`e-mail ${job.data.outboxId}: failed after its last retry`);
      },
      log,
    ),
    runJobs<ClassComparisonJob>(
      boss,
      queues.classComparisonRequested,
      pollingIntervalMs,
      (job) => scheduleRelabel(boss, job.data.labId),
      log,
    ),
    runJobs<ClassComparisonJob>(
      boss,
      queues.classComparison,
      pollingIntervalMs,
      async (job, jobLog) => {
        const outcome = await relabelLab(database, job.data.labId);
        jobLog(`class comparison ${job.data.labId}: ${outcome.labelled} labelled, ${outcome.changed} changed`);
      },
      log,
    ),
    runJobs<LabReminderJob>(
      boss,
      queues.labReminder,
      pollingIntervalMs,
      async (job, jobLog) => {
        const outcome = await sendLabReminders(database, job.data);
        jobLog(
          `lab ${job.data.labId} reminder ${job.data.offsetHours} h: ${outcome.skipped ? `nothing sent (${outcome.skipped})` : `${outcome.sent} sent`}`,
        );
      },
      log,
    ),
    runJobs<RereductionJob>(
      boss,
      queues.reductionRevision,
      pollingIntervalMs,
      async (job, jobLog) => {
        const outcome = await runRereduction(database, job.data.runId);
        jobLog(`re-reduction ${job.data.runId}: ${outcome.revised} revised, ${outcome.unreducible.length} not reducible`);
      },
      log,
    ),
    runJobs<LabelPurchaseJob>(
      boss,
      queues.labelPurchase,
      pollingIntervalMs,
      async (job, jobLog) => {
        const outcome = await buyLabels(database, carrier, job.data.shipmentId);
        jobLog(`shipment ${job.data.shipmentId}: ${outcome.bought} labels bought, ${outcome.failed} failed, ${outcome.moved} kits moved`);
      },
      log,
    ),
    runJobs(
      boss,
      queues.kitReturnReminders,
      pollingIntervalMs,
      async (_job, jobLog) => {
        const outcome = await sendOverdueReminders(database);
        jobLog(`kit return reminders: ${outcome.sent} sent`);
      },
      log,
    ),
    runJobs(
      boss,
      queues.housekeeping,
      pollingIntervalMs,
      async (_job, jobLog) => {
        const swept = await sweepExpiredRows(database);
        jobLog(
          `housekeeping: ${Object.entries(swept)
            .map(([table, count]) => `${count} ${table}`)
            .join(", ")} swept`,
        );
      },
      log,
    ),
  ];

  return {
    async stop() {
      await Promise.all(stoppers.map((stop) => stop()));
      await boss.stop({ graceful: false, wait: true });
      options.transport.close?.();
      await pool.end();
    },
  };
}
