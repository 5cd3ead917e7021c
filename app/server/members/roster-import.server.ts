/**
 * The roster import's commit: the rows the instructor previewed are checked again against the course
 * as it is now, then invited all at once in one transaction: every row, or none. Each preview carries
 * its own import key, so the same preview committed twice sends its invitations once.
 */
import { and, eq, isNull } from "drizzle-orm";
import { cohorts, courseMemberships, rosterImports, users } from "~/db/schema";
import { checkRosterRows, rosterRole, type RosterRow, type RosterRowCheck } from "~/lib/roster/roster-rows";
import type { Database, Executor } from "~/server/db.server";
import { createInvitations, type Inviter } from "./invitations.server";

export type RosterImportResult =
  | { ok: true; duplicate: false; invited: number; students: number; tas: number }
  /** This import key was committed before: nothing was sent again. */
  | { ok: true; duplicate: true; committedAt: Date; rowCount: number }
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
  {
    courseId,
    inviter,
    importKey,
    rows,
    request,
  }: { courseId: string; inviter: Inviter; importKey: string; rows: RosterRow[]; request?: Request },
): Promise<RosterImportResult> {
  return db.transaction(async (tx) => {
    // The key is claimed first: a second commit of it waits here for the first one's transaction and
    // then finds its row, so two clicks racing each other cannot both invite.
    const [claimed] = await tx
      .insert(rosterImports)
      .values({ courseId, importKey, createdById: inviter.id, rowCount: rows.length })
      .onConflictDoNothing({ target: [rosterImports.courseId, rosterImports.importKey] })
      .returning({ id: rosterImports.id });
    if (!claimed) {
      const [earlier] = await tx
        .select({ committedAt: rosterImports.committedAt, rowCount: rosterImports.rowCount })
        .from(rosterImports)
        .where(and(eq(rosterImports.courseId, courseId), eq(rosterImports.importKey, importKey)));
      return { ok: true, duplicate: true, ...earlier };
    }

    const context = await rosterContext(tx, courseId);
    const problems = checkRosterRows(rows, context).filter((check) => check.problems.length > 0);
    if (problems.length) {
      // Nothing was imported, so the key stays free for the same preview once the course is fixed.
      await tx.delete(rosterImports).where(eq(rosterImports.id, claimed.id));
      return { ok: false, problems };
    }

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
      duplicate: false,
      invited: result.invited.length,
      students: result.invited.filter((invited) => roleOf.get(invited.email) === "student").length,
      tas: result.invited.filter((invited) => roleOf.get(invited.email) === "ta").length,
    };
  });
}
