/**
 * The labs a member sees on the course's lab list: for a student, the labs set for their cohort with
 * where their drop log stands; for staff, every lab of the course. One statement either way.
 */
import { and, eq, exists, ne, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { courseMemberships, dropLogs, dropLogVersions, labCohorts, labs } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { effectiveWindow } from "~/server/labs/effective-window.server";
import { isoText } from "~/server/sql.server";

export type LabListRow = {
  id: string;
  title: string;
  kind: "drag" | "viscometry";
  status: "draft" | "published" | "closed";
  opensAt: string;
  dueAt: string;
  lateCutoffAt: string | null;
  hasDraft: boolean;
  /** The late flag of the version that counts; null when nothing is handed in. */
  latestLate: boolean | null;
  versionCount: number;
};

export async function listLabsForMember(executor: Executor, access: CourseAccess): Promise<LabListRow[]> {
  const student = access.membership.role === "student";
  const me = access.membership;
  // The window's joins name these aliases.
  const lab = alias(labs, "l");
  const member = alias(courseMemberships, "me");
  return (
    executor
      .select({
        id: lab.id,
        title: lab.title,
        kind: lab.kind,
        status: lab.status,
        opensAt: isoText(lab.opensAt),
        dueAt: sql<string>`to_json(w.due_at)#>>'{}'`,
        lateCutoffAt: sql<string | null>`to_json(w.late_cutoff_at)#>>'{}'`,
        hasDraft: sql<boolean>`coalesce(${dropLogs.draft} is not null, false)`,
        latestLate: dropLogVersions.late,
        versionCount: sql<number>`coalesce(${dropLogVersions.version}, 0)`,
      })
      .from(lab)
      .leftJoin(dropLogs, and(sql`${student}`, eq(dropLogs.labId, lab.id), eq(dropLogs.membershipId, me.id)))
      .leftJoin(dropLogVersions, eq(dropLogVersions.id, dropLogs.latestVersionId))
      // A student sees their own times; staff (no membership row joined) see the lab's.
      .leftJoin(member, and(sql`${student}`, eq(member.id, me.id)))
      .leftJoin(effectiveWindow({ lab: "l", member: "me", as: "w" }), sql`true`)
      .where(
        and(
          eq(lab.courseId, access.course.id),
          or(
            sql`not ${student}`,
            and(
              ne(lab.status, "draft"),
              exists(
                executor
                  .select({ found: sql`1` })
                  .from(labCohorts)
                  .where(and(eq(labCohorts.labId, lab.id), eq(labCohorts.cohortId, sql`${me.cohortId}`))),
              ),
            ),
          ),
        ),
      )
      .orderBy(lab.dueAt, lab.title)
  );
}
