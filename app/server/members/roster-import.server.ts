/**
 * The roster import's commit: the rows the instructor chose (new and updated ones) are checked again
 * against the course as it is now, then written all at once in one transaction: every row, or none.
 * New people are invited; members and open invitations the file changes are updated in bulk, a few
 * statements whatever the number of rows. Each preview carries its own import key, so the same preview
 * committed twice writes once.
 */
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { cohorts, courseMemberships, invitations, rosterImports, taCohortAssignments, users } from "~/db/schema";
import { checkRosterRows, rosterRole, type RosterCourse, type RosterRow, type RosterRowCheck } from "~/lib/roster/roster-rows";
import { recordAudit, type AuditInput } from "~/server/audit.server";
import type { Database, Executor, Transaction } from "~/server/db.server";
import { createInvitations, type Inviter } from "./invitations.server";
import { openInvitation } from "./open-invitation.server";
import { inCohortOrder } from "~/server/courses/cohort-order.server";

export type RosterImportResult =
  | { ok: true; duplicate: false; invited: number; students: number; tas: number; updated: number; unchanged: number }
  /** This import key was committed before: nothing was written again. */
  | { ok: true; duplicate: true; committedAt: Date; rowCount: number }
  | { ok: false; problems: RosterRowCheck[] };

/** The course's cohorts, members and open invitations: what roster rows are checked against (three statements). */
export async function rosterContext(
  executor: Executor,
  courseId: string,
): Promise<RosterCourse & { cohorts: { id: string; name: string }[] }> {
  const [cohortRows, memberRows, invitationRows] = await Promise.all([
    executor
      .select({ id: cohorts.id, name: cohorts.name })
      .from(cohorts)
      .where(eq(cohorts.courseId, courseId))
      .orderBy(...inCohortOrder),
    executor
      .select({
        id: courseMemberships.id,
        email: users.email,
        name: users.name,
        role: courseMemberships.role,
        cohortNames: sql<string[]>`case when ${courseMemberships.role} = 'ta'
          then array(select h.name from ${taCohortAssignments} a join ${cohorts} h on h.id = a.cohort_id where a.membership_id = ${courseMemberships.id} order by h.name)
          else array(select h.name from ${cohorts} h where h.id = ${courseMemberships.cohortId}) end`,
        studentNumber: users.studentNumber,
      })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(and(eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt))),
    executor
      .select({
        id: invitations.id,
        email: invitations.email,
        name: invitations.name,
        role: invitations.role,
        cohortNames: sql<string[]>`array(select h.name from ${cohorts} h where h.id = ${invitations.cohortId})`,
        studentNumber: invitations.studentNumber,
      })
      .from(invitations)
      .where(and(eq(invitations.courseId, courseId), openInvitation))
      .orderBy(asc(invitations.createdAt)),
  ]);
  // Later entries win when the rows are matched: a member over an invitation, a newer invitation over an older one.
  const people = [
    ...invitationRows.map((row) => ({ ...row, kind: "invitation" as const })),
    ...memberRows.map((row) => ({ ...row, kind: "member" as const })),
  ];
  return { cohorts: cohortRows, cohortNames: cohortRows.map((c) => c.name), people };
}

type Update = { check: RosterRowCheck; cohortId: string | null };

/** The new values of the updated rows, null where the row keeps what the person has. */
function changed(check: RosterRowCheck, field: "name" | "student number") {
  return check.changes.find((change) => change.field === field)?.to ?? null;
}

/** Members' names and numbers (on their accounts) and cohorts (on their memberships): two statements. */
async function updateMembers(tx: Transaction, updates: Update[]) {
  if (updates.length === 0) return;
  const payload = JSON.stringify(
    updates.map(({ check, cohortId }) => ({
      membership_id: check.match!.id,
      name: changed(check, "name"),
      student_number: changed(check, "student number"),
      cohort_id: cohortId,
    })),
  );
  await tx.execute(sql`update ${users} u
    set name = coalesce(v.name, u.name), student_number = coalesce(v.student_number, u.student_number)
    from json_to_recordset(${payload}::json) as v(membership_id uuid, name text, student_number text, cohort_id uuid)
    join ${courseMemberships} m on m.id = v.membership_id
    where u.id = m.user_id and (v.name is not null or v.student_number is not null)`);
  // Work (hand-ins, marks, kits) belongs to the membership, so it moves with the student; TA scope follows the cohort.
  await tx.execute(sql`update ${courseMemberships} m set cohort_id = v.cohort_id
    from json_to_recordset(${payload}::json) as v(membership_id uuid, cohort_id uuid)
    where m.id = v.membership_id and v.cohort_id is not null`);
}

/** Open invitations' names, cohorts and numbers: one statement. Their links keep working. */
async function updateInvitations(tx: Transaction, updates: Update[]) {
  if (updates.length === 0) return;
  const payload = JSON.stringify(
    updates.map(({ check, cohortId }) => ({
      id: check.match!.id,
      name: changed(check, "name"),
      student_number: changed(check, "student number"),
      cohort_id: cohortId,
    })),
  );
  await tx.execute(sql`update ${invitations} i
    set name = coalesce(v.name, i.name), student_number = coalesce(v.student_number, i.student_number), cohort_id = coalesce(v.cohort_id, i.cohort_id)
    from json_to_recordset(${payload}::json) as v(id uuid, name text, student_number text, cohort_id uuid)
    where i.id = v.id`);
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
    // then finds its row, so two clicks racing each other cannot both write.
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
    const checks = checkRosterRows(rows, context);
    const problems = checks.filter((check) => check.status === "problem");
    if (problems.length) {
      // Nothing was imported, so the key stays free for the same preview once the course is fixed.
      await tx.delete(rosterImports).where(eq(rosterImports.id, claimed.id));
      return { ok: false, problems };
    }

    const cohortIdByName = new Map(context.cohorts.map((cohort) => [cohort.name.toLowerCase(), cohort.id]));
    const cohortIdOf = (name: string) => (name ? (cohortIdByName.get(name.toLowerCase()) ?? null) : null);
    const fresh = checks.filter((check) => check.status === "new");
    const updates = checks
      .filter((check) => check.status === "updated")
      .map((check) => ({
        check,
        cohortId: check.changes.some((change) => change.field === "cohort") ? cohortIdOf(check.row.cohort) : null,
      }));
    const result = await createInvitations(
      tx,
      inviter,
      courseId,
      fresh.map(({ row }) => ({
        email: row.email,
        name: row.name || null,
        role: rosterRole(row)!,
        cohortId: cohortIdOf(row.cohort),
        studentNumber: row.studentNumber || null,
      })),
      request,
    );
    await updateMembers(
      tx,
      updates.filter(({ check }) => check.match!.kind === "member"),
    );
    await updateInvitations(
      tx,
      updates.filter(({ check }) => check.match!.kind === "invitation"),
    );

    const counts = {
      invited: result.invited.length,
      students: fresh.filter(({ row }) => rosterRole(row) === "student").length,
      tas: fresh.filter(({ row }) => rosterRole(row) === "ta").length,
      updated: updates.length,
      unchanged: checks.filter((check) => check.status === "unchanged").length,
    };
    const events: AuditInput[] = [
      { action: "course.roster_updated", actorId: inviter.id, courseId, subject: `roster_import:${claimed.id}`, detail: counts, request },
      ...updates.map(({ check }) => ({
        action: "course.member_updated" as const,
        actorId: inviter.id,
        courseId,
        subject: `${check.match!.kind === "member" ? "membership" : "invitation"}:${check.match!.id}`,
        detail: { email: check.row.email, changes: check.changes, via: "roster import" },
        request,
      })),
    ];
    await recordAudit(tx, events);
    return { ok: true, duplicate: false, ...counts };
  });
}
