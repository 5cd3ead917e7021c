/**
 * Nightly housekeeping: rows that have served their purpose are deleted, so the tables that grow with
 * every visit (sessions, e-mailed links, rate-limit counters, caught demo mail, refused-access audit
 * rows) stay small. The worker schedules it with pg-boss's cron; it is safe to run at any time.
 */
import { sql } from "drizzle-orm";
import type { Executor } from "~/server/db.server";

/**
 * How long the rows without an expiry of their own are kept. Caught mail is demo mail; two weeks covers
 * a demo's life. Refused-access rows are kept a term (about four months) for a security review; every
 * other audit row is part of the course's record and is never swept. Both are common practice, not a rule.
 */
export const housekeepingRetentionDays = { caughtEmails: 14, accessDeniedAudit: 120 } as const;

export type HousekeepingOutcome = {
  sessions: number;
  emailLinks: number;
  rateLimits: number;
  caughtEmails: number;
  accessDeniedAudit: number;
};

/**
 * One statement: each sweep is a data-modifying CTE, so all five happen or none does. Raw: five
 * set-based deletes in one statement.
 */
export async function sweepExpiredRows(executor: Executor, now = new Date()): Promise<HousekeepingOutcome> {
  const result = await executor.execute<HousekeepingOutcome>(sql`
    with sessions_swept as (delete from sessions where expires_at < ${now} returning 1),
    links_swept as (delete from email_links where expires_at < ${now} returning 1),
    -- rate-limiter-flexible writes expiry as milliseconds since the epoch.
    limits_swept as (delete from rate_limits where expire is not null and expire < ${now.getTime()} returning 1),
    mail_swept as (
      delete from caught_emails where received_at < ${now}::timestamptz - make_interval(days => ${housekeepingRetentionDays.caughtEmails}) returning 1),
    denied_swept as (
      delete from audit_events where action = 'access.denied'
        and created_at < ${now}::timestamptz - make_interval(days => ${housekeepingRetentionDays.accessDeniedAudit}) returning 1)
    select (select count(*)::int from sessions_swept) as sessions, (select count(*)::int from links_swept) as "emailLinks",
      (select count(*)::int from limits_swept) as "rateLimits", (select count(*)::int from mail_swept) as "caughtEmails",
      (select count(*)::int from denied_swept) as "accessDeniedAudit"`);
  return result.rows[0];
}
