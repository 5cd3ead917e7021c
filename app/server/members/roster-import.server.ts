/**
 * The roster import's commit: the rows the instructor previewed are checked again against the course
 * as it is now, then invited all at once in one transaction: every row, or none.
 */
import { and, eq, isNull } from "drizzle-orm";
import { cohorts, courseMemberships, users } from "~/db/schema";
import { checkRosterRows, rosterRole, type RosterRow, type RosterRowCheck } from "~/lib/roster/roster-rows";
import type { Database, Executor } from "~/server/db.server";
import { createInvitations, type Inviter } from "./invitations.server";

export type RosterImportResult =
  | { ok: true; invited: number; students: number; tas: number }
  | { ok: false; problems: RosterRowCheck[] };

/** The course's cohorts and current members' addresses: what roster rows are checked against. */
export async function rosterContext(executor: Executor, courseId: string) {
  const [cohortRows, memberRows] = await Promise.all([
    executor.select({ id: cohorts.id, name: cohorts.name }).from(cohorts).where(eq(cohorts.courseId, courseId)),
    executor
      .select({ email: users.email })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(and(eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt))),
  ]);
  return { cohorts: cohortRows, cohortNames: cohortRows.map((c) => c.name), memberEmails: memberRows.map((m) => m.email) };
}

export async function importRoster(
  db: Database,
  { courseId, inviter, rows, request }: { courseId: string; inviter: Inviter; rows: RosterRow[]; request?: Request },
): Promise<RosterImportResult> {
  return db.transaction(async (tx) => {
    const context = await rosterContext(tx, courseId);
    const problems = checkRosterRows(rows, context).filter((check) => check.problems.length > 0);
    if (problems.length) return { ok: false, problems };

    const cohortIdByName = new Map(context.cohorts.map((cohort) => [cohort.name.toLowerCase(), cohort.id]));
    const result = await createInvitations(
      tx,
      inviter,
      courseId,
      rows.map((row) => ({
        email: row.email,
        name: row.name || null,
        role: rosterRole(row)!,
        cohortId: row.cohort ? (cohortIdByName.get(row.cohort.toLowerCase()) ?? null) : null,
      })),
      request,
    );
    const roleOf = new Map(rows.map((row) => [row.email, rosterRole(row)]));
    return {
      ok: true,
      invited: result.invited.length,
      students: result.invited.filter((invited) => roleOf.get(invited.email) === "student").length,
      tas: result.invited.filter((invited) => roleOf.get(invited.email) === "ta").length,
    };
  });
}
