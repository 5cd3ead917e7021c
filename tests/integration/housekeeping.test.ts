/**
 * The nightly housekeeping sweep deletes what has expired and keeps everything else, and the worker
 * puts it on pg-boss's cron.
 */
import { sql } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { auditEvents, caughtEmails, emailLinks, rateLimits, sessions, users } from "~/db/schema";
import { db } from "~/server/db.server";
import { housekeepingCron, queues } from "~/server/jobs/boss.server";
import { housekeepingRetentionDays, sweepExpiredRows } from "~/server/jobs/housekeeping.server";
import { smtpTransport } from "~/server/email/email-transport.server";
import { startWorker } from "~/server/jobs/worker.server";

const DAY_MS = 86_400_000;
const now = new Date("2027-03-01T12:00:00Z");
const ago = (days: number) => new Date(now.getTime() - days * DAY_MS);

describe("housekeeping", () => {
  it("sweeps expired sessions, links, counters, old caught mail and old refusals, and keeps the rest", async () => {
    const [user] = await db.insert(users).values({ email: "sweep@benchpost.example", name: "Sweep" }).returning();
    await db.insert(sessions).values([
      { id: "expired-session", userId: user.id, expiresAt: ago(1) },
      { id: "live-session", userId: user.id, expiresAt: ago(-1) },
    ]);
    await db.insert(emailLinks).values([
      { id: "expired-link", userId: user.id, purpose: "sign_in", expiresAt: ago(0.01) },
      { id: "live-link", userId: user.id, purpose: "password_reset", expiresAt: ago(-0.01) },
    ]);
    await db.insert(rateLimits).values([
      { key: "expired-counter", points: 3, expire: ago(0.001).getTime() },
      { key: "live-counter", points: 3, expire: ago(-0.001).getTime() },
      { key: "counter-without-expiry", points: 1, expire: null },
    ]);
    const mail = (subject: string, receivedAt: Date) => ({
      fromAddress: "a@benchpost.example",
      toAddresses: ["b@benchpost.example"],
      subject,
      headers: {},
      receivedAt,
    });
    await db
      .insert(caughtEmails)
      .values([
        mail("old", ago(housekeepingRetentionDays.caughtEmails + 1)),
        mail("recent", ago(housekeepingRetentionDays.caughtEmails - 1)),
      ]);
    await db.insert(auditEvents).values([
      { action: "access.denied", subject: "old", createdAt: ago(housekeepingRetentionDays.accessDeniedAudit + 1) },
      { action: "access.denied", subject: "recent", createdAt: ago(housekeepingRetentionDays.accessDeniedAudit - 1) },
      // Any other audit row is the course's record, however old.
      { action: "auth.sign_in", subject: "old", createdAt: ago(3650) },
    ]);

    expect(await sweepExpiredRows(db, now)).toEqual({ sessions: 1, emailLinks: 1, rateLimits: 1, caughtEmails: 1, accessDeniedAudit: 1 });
    const left = await db.execute<{ what: string }>(sql`
      select id as what from sessions union all select id from email_links union all select key from rate_limits
      union all select subject from caught_emails union all select action || ':' || subject from audit_events order by 1`);
    expect(left.rows.map((row) => row.what)).toEqual(
      ["access.denied:recent", "auth.sign_in:old", "counter-without-expiry", "live-counter", "live-link", "live-session", "recent"].sort(),
    );
    // A second run finds nothing left to sweep.
    expect(Object.values(await sweepExpiredRows(db, now)).every((count) => count === 0)).toBe(true);
  });

  it("is put on pg-boss's cron by the worker", async () => {
    // No mail is sent here: the transport only has to exist.
    const worker = await startWorker({
      connectionString: process.env.DATABASE_URL!,
      transport: smtpTransport("smtp://127.0.0.1:9", "Benchpost <no-reply@benchpost.example>"),
      log: () => undefined,
    });
    try {
      const schedule = await db.execute<{ cron: string; timezone: string }>(
        sql`select cron, timezone from pgboss.schedule where name = ${queues.housekeeping}`,
      );
      expect(schedule.rows).toEqual([{ cron: housekeepingCron, timezone: "UTC" }]);
    } finally {
      await worker.stop();
    }
  });
});
