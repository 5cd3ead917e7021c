/**
 * Each user's private calendar feed: the due times and cut-offs of their labs, with their own
 * extensions, and kit return-by dates (written as iCalendar by app/lib/calendar/calendar-feed.ts). The
 * address carries a random token whose SHA-256 is kept in `users.calendar_feed_token_hash`; resetting it
 * replaces the hash, so the old address opens nothing from that moment.
 */
import { eq, sql } from "drizzle-orm";
import { users } from "~/db/schema";
import type { CalendarFeedRow } from "~/lib/calendar/calendar-feed";
import { recordAudit } from "~/server/audit.server";
import { generateToken, hashToken } from "~/server/auth/tokens.server";
import { appUrl } from "~/server/config.server";
import { type Executor, db } from "~/server/db.server";
import { effectiveWindowJoin } from "~/server/labs/effective-window.server";

/** The feed's address for a token. */
export const calendarFeedUrl = (token: string) => `${appUrl()}/calendar/${token}.ics`;

/** Whether the user has made a feed address (it cannot be shown again: only its hash is kept). */
export async function hasCalendarFeed(userId: string): Promise<boolean> {
  const [row] = await db
    .select({ made: sql<boolean>`${users.calendarFeedTokenHash} is not null` })
    .from(users)
    .where(eq(users.id, userId));
  return row?.made ?? false;
}

/** Makes the user's feed address, or a new one in place of the old, which stops working at once. Returns the address, shown once. */
export async function resetCalendarFeed(userId: string, request?: Request): Promise<string> {
  const token = generateToken();
  await db.transaction(async (tx) => {
    const [before] = await tx
      .select({ made: sql<boolean>`${users.calendarFeedTokenHash} is not null` })
      .from(users)
      .where(eq(users.id, userId))
      .for("update");
    await tx
      .update(users)
      .set({ calendarFeedTokenHash: hashToken(token) })
      .where(eq(users.id, userId));
    await recordAudit(tx, {
      action: "account.calendar_feed_reset",
      actorId: userId,
      subject: `user:${userId}`,
      detail: { replaced: before?.made ?? false },
      request,
    });
  });
  return calendarFeedUrl(token);
}

/** The user whose feed the token opens, or null. */
export async function calendarFeedOwner(executor: Executor, token: string): Promise<{ id: string; name: string } | null> {
  const [row] = await executor
    .select({ id: users.id, name: users.name })
    .from(users)
    .where(eq(users.calendarFeedTokenHash, hashToken(token)));
  return row ?? null;
}

/** A timestamp column as ISO text; the names are this module's own aliases. */
const iso = (column: string) => sql.raw(`to_json(${column})#>>'{}'`);

/**
 * Everything the user's feed shows, in one statement whatever the number of courses, labs and students:
 * as a student, each lab set for their cohort with their own window and the kit they hold; as staff, the
 * class's times of the course's labs (a TA's: the labs set for their cohorts), the cohort extensions of
 * the cohorts they see, and the course's return-by date. Archived courses and drafts are left out; a
 * student never gets an extension's reason.
 */
export async function loadCalendarFeedRows(executor: Executor, userId: string): Promise<CalendarFeedRow[]> {
  const common = sql.raw(`c.id as "courseId", c.code as "courseCode", c.title as "courseTitle", c.time_zone as "timeZone"`);
  const member = sql`m.user_id = ${userId} and m.removed_at is null and c.archived_at is null`;
  // Raw: a union of four differently joined sets, each over the effective window's raw lateral join.
  const result = await executor.execute<CalendarFeedRow>(sql`
    select 'lab' as kind, ${common}, l.id as "labId", null::uuid as "kitId", l.title, null::uuid as "cohortId", null as "cohortName",
      ${iso("w.due_at")} as "dueAt", ${iso("w.late_cutoff_at")} as "lateCutoffAt",
      ${iso("l.due_at")} as "classDueAt", ${iso("l.late_cutoff_at")} as "classLateCutoffAt",
      w.extended_by as "extendedBy", null as "returnBy"
    from course_memberships m
    join courses c on c.id = m.course_id
    join lab_cohorts lc on lc.cohort_id = m.cohort_id
    join labs l on l.id = lc.lab_id and l.status <> 'draft'
    ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
    where ${member} and m.role = 'student'
    union all
    select 'lab', ${common}, l.id, null, l.title, null, null,
      ${iso("l.due_at")}, ${iso("l.late_cutoff_at")}, ${iso("l.due_at")}, ${iso("l.late_cutoff_at")}, null, null
    from course_memberships m
    join courses c on c.id = m.course_id
    join labs l on l.course_id = c.id and l.status <> 'draft'
    where ${member} and m.role <> 'student'
      and (m.role = 'instructor' or exists (
        select 1 from lab_cohorts lc join ta_cohort_assignments t on t.cohort_id = lc.cohort_id
        where lc.lab_id = l.id and t.membership_id = m.id))
    union all
    -- A cohort stands in for a member without an extension of their own, so the window's one rule decides its times.
    select 'cohort-extension', ${common}, l.id, null, l.title, co.id, co.name,
      ${iso("w.due_at")}, ${iso("w.late_cutoff_at")}, ${iso("l.due_at")}, ${iso("l.late_cutoff_at")},
      w.extended_by, null
    from course_memberships m
    join courses c on c.id = m.course_id
    join labs l on l.course_id = c.id and l.status <> 'draft'
    join lab_cohorts lc on lc.lab_id = l.id
    join cohorts co on co.id = lc.cohort_id
    join lateral (select null::uuid as id, co.id as cohort_id) as cm on true
    ${effectiveWindowJoin({ lab: "l", member: "cm", as: "w" })}
    where ${member} and m.role <> 'student' and w.extended_by = 'cohort'
      and (m.role = 'instructor' or exists (select 1 from ta_cohort_assignments t where t.membership_id = m.id and t.cohort_id = co.id))
    union all
    select 'kit-return', ${common}, null, k.id, k.number, null, null, null, null, null, null, null, coalesce(k.return_by, c.kit_return_by)::text
    from course_memberships m
    join courses c on c.id = m.course_id
    join kits k on k.holder_membership_id = m.id and k.state in ('packed', 'in_transit', 'at_home')
    where ${member} and m.role = 'student' and coalesce(k.return_by, c.kit_return_by) is not null
    union all
    select 'course-kit-return', ${common}, null, null, null, null, null, null, null, null, null, null, c.kit_return_by::text
    from course_memberships m
    join courses c on c.id = m.course_id
    where ${member} and m.role <> 'student' and c.kit_return_by is not null`);
  return result.rows;
}
