/**
 * pg-boss, our job queue in PostgreSQL: the queue names, their retry policies and the one place that
 * creates them. Later work (deadline reminders, class-comparison jobs) adds its queues here.
 */
import { sql, type SQL } from "drizzle-orm";
import PgBoss from "pg-boss";
import type { Transaction } from "~/server/db.server";
import { environment } from "~/server/env.server";
import { logger } from "~/server/log.server";

export const queues = {
  /** One job per outbox row: render the message and hand it to the transport. */
  emailDelivery: "email-delivery",
  /** Where pg-boss moves a delivery job after its last retry, so that the outbox row is marked failed. */
  emailGaveUp: "email-gave-up",
  /**
   * One job per hand-in or method change, inserted on its transaction. Plain jobs, never singletons:
   * two hand-ins inserting the same singleton key would wait on each other's unique-index entry.
   */
  classComparisonRequested: "class-comparison-requested",
  /** The debounced relabel of one lab (singletonKey = lab id), sent by the worker from the requests above. */
  classComparison: "class-comparison",
  /** One job per lab and reminder offset, starting at due time − offset; a job for an old due time does nothing. */
  labReminder: "lab-reminder",
  /** One job per part correction that enters reductions: re-reduces every version that used the part. */
  reductionRevision: "reduction-revision",
  /** One job per shipment (and per "Retry failed"): buys the labels of its queued items. */
  labelPurchase: "label-purchase",
  /** The hourly round of reminders for kits still at home after their course's return-by date. */
  kitReturnReminders: "kit-return-reminders",
  /** The nightly sweep of expired sessions, links, rate-limit counters, caught mail and old refusals. */
  housekeeping: "housekeeping",
} as const;

/** When the worker runs housekeeping: 03:17 UTC, off the hour when other cron work piles up (common practice). */
export const housekeepingCron = "17 3 * * *";

/**
 * When the worker sends kit return reminders: every hour (at :41, off the busy hour marks), so that each
 * course's reminders go out soon after 09:00 in its own time zone (`reminderHour`).
 */
export const kitReturnRemindersCron = "41 * * * *";

/**
 * Six attempts over roughly half an hour: 30 s, then about 1, 2, 4 and 8 minutes later (pg-boss doubles
 * the delay and adds jitter), which rides out a provider outage or a rate limit without flooding it.
 */
export const emailDeliveryPolicy = { retryLimit: 5, retryDelay: 30, retryBackoff: true, expireInSeconds: 120 } as const;

export function createBoss(connectionString = environment().DATABASE_URL, options: Partial<PgBoss.ConstructorOptions> = {}): PgBoss {
  return new PgBoss({ connectionString, application_name: "benchpost-jobs", ...options });
}

const queueSettings: PgBoss.Queue[] = [
  { name: queues.emailGaveUp },
  { name: queues.emailDelivery, ...emailDeliveryPolicy, deadLetter: queues.emailGaveUp },
  { name: queues.classComparisonRequested, retryLimit: 5, retryDelay: 10, retryBackoff: true },
  { name: queues.classComparison, retryLimit: 5, retryDelay: 10, retryBackoff: true, expireInSeconds: 300 },
  { name: queues.labReminder, retryLimit: 5, retryDelay: 60, retryBackoff: true, expireInSeconds: 300 },
  { name: queues.reductionRevision, retryLimit: 5, retryDelay: 10, retryBackoff: true, expireInSeconds: 600 },
  // A run that dies leaves its items `buying` for ten minutes before another run takes them: the retries outlast that.
  { name: queues.labelPurchase, retryLimit: 5, retryDelay: 60, retryBackoff: true, expireInSeconds: 900 },
  { name: queues.kitReturnReminders, retryLimit: 2, retryDelay: 300, expireInSeconds: 600 },
  { name: queues.housekeeping, retryLimit: 2, retryDelay: 300, expireInSeconds: 600 },
];

/**
 * `send` to a queue that does not exist silently returns null, so every queue is created up front.
 * createQueue leaves an existing queue alone; updateQueue brings its policy in line with the code.
 */
export async function createQueues(boss: PgBoss): Promise<void> {
  for (const settings of queueSettings) {
    await boss.createQueue(settings.name, settings);
    await boss.updateQueue(settings.name, settings);
  }
}

/**
 * Installs (or upgrades) pg-boss's own schema and our queues. Run with the migrations, so that the web
 * process can enqueue before any worker has ever started.
 */
export async function installJobQueues(connectionString: string): Promise<void> {
  const boss = createBoss(connectionString, { max: 1, supervise: false, schedule: false });
  boss.on("error", (error) => logger.error({ err: error }, "pg-boss (install)"));
  await boss.start();
  try {
    await createQueues(boss);
  } finally {
    await boss.stop({ graceful: false, wait: true });
  }
}

// The web process only inserts jobs, always on a caller's transaction (`send(…, { db })`): this
// instance is never started, so it opens no connections of its own.
const globalForBoss = globalThis as unknown as { benchpostEnqueuer?: PgBoss };
export function enqueuer(): PgBoss {
  return (globalForBoss.benchpostEnqueuer ??= createBoss());
}

/** pg-boss's numbered-parameter SQL as Drizzle SQL: split() with a capture group alternates text and parameter numbers ("a $1 b" → ["a ", "1", " b"]). */
function bossSql(text: string, values: unknown[]): SQL {
  const pieces = text.split(/\$(\d+)/);
  return sql.join(pieces.map((piece, index) => (index % 2 === 0 ? sql.raw(piece) : sql.param(values[Number(piece) - 1]))));
}

/**
 * pg-boss accepts a caller's database adapter for `send`. This one runs pg-boss's numbered-parameter SQL
 * through Drizzle on the caller's transaction, so the job insert commits or rolls back with it.
 */
export function transactionAdapter(tx: Transaction) {
  return {
    async executeSql(text: string, values: unknown[] = []) {
      const result = await tx.execute<Record<string, unknown>>(bossSql(text, values));
      return { rows: result.rows };
    },
  };
}

export type JobRequest = { name: (typeof queues)[keyof typeof queues]; data: object };

/**
 * pg-boss's own insert of `jobs` (each with its queue's policy), as a statement for the caller to run
 * inside one of its own (a data-modifying CTE), instead of a round trip of its own: the hand-in's
 * statements are budgeted. pg-boss writes the SQL; an adapter that runs nothing catches it.
 */
export async function jobsInsert(jobs: JobRequest[]): Promise<SQL> {
  let statement: SQL | null = null;
  await enqueuer().insert(jobs, {
    db: {
      async executeSql(text: string, values: unknown[] = []) {
        statement = bossSql(text, values);
        return { rows: [] };
      },
    },
  });
  if (!statement) throw new Error("pg-boss wrote no insert for the jobs.");
  return statement;
}
