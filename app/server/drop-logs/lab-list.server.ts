/**
 * The labs a member sees on the course's lab list: for a student, the labs set for their cohort with
 * where their drop log stands; for staff, every lab of the course. One statement either way.
 */
import { sql } from "drizzle-orm";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { effectiveWindowJoin } from "~/server/labs/effective-window.server";

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
  const result = await executor.execute<LabListRow>(sql`
    select l.id, l.title, l.kind, l.status,
      to_json(l.opens_at)#>>'{}' as "opensAt", to_json(w.due_at)#>>'{}' as "dueAt", to_json(w.late_cutoff_at)#>>'{}' as "lateCutoffAt",
      coalesce(d.draft is not null, false) as "hasDraft", v.late as "latestLate",
      coalesce(v.version, 0) as "versionCount"
    from labs l
    left join drop_logs d on ${student} and d.lab_id = l.id and d.membership_id = ${access.membership.id}
    left join drop_log_versions v on v.id = d.latest_version_id
    -- A student sees their own times; staff (no membership row joined) see the lab's.
    left join course_memberships me on ${student} and me.id = ${access.membership.id}
    ${effectiveWindowJoin({ lab: "l", member: "me", as: "w" })}
    where l.course_id = ${access.course.id}
      and (not ${student} or (l.status <> 'draft'
        and exists (select 1 from lab_cohorts lc where lc.lab_id = l.id and lc.cohort_id = ${access.membership.cohortId})))
    order by l.due_at, l.title`);
  return result.rows;
}
