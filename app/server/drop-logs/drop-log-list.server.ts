/**
 * Drop logs of a lab as the API lists them: a student's own, or every drop log of the cohorts a staff
 * member sees, each with its counted version and that version's reduction. One statement whatever
 * the class size.
 */
import { and, eq, sql } from "drizzle-orm";
import { courseMemberships, dropLogs, users } from "~/db/schema";
import type { CourseAccess, StudentOwner } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";

export type StoredVersionJson = {
  id: string;
  version: number;
  submittedAt: string;
  late: boolean;
  sphereId: string | null;
  fluidLotId: string | null;
  columnId: string | null;
  input: Record<string, unknown>;
  kitRecords: Record<string, unknown>;
  reduction: Record<string, unknown>;
  normalisedFigure: number | null;
  reynolds: number | null;
  dragCoefficient: number | null;
  viscosityPaS: number | null;
  warningCount: number;
  currentRevision: number;
};

export type DropLogListEntry = {
  id: string;
  membershipId: string;
  studentName: string;
  cohortId: string | null;
  versionCount: number;
  latestVersion: StoredVersionJson | null;
};

/** The same JSON for a version wherever the API returns one. */
export const versionJson = sql`json_build_object(
  'id', v.id, 'version', v.version, 'submittedAt', to_json(v.submitted_at)#>>'{}', 'late', v.late,
  'sphereId', v.sphere_id, 'fluidLotId', v.fluid_lot_id, 'columnId', v.column_id,
  'input', v.input, 'kitRecords', v.kit_records, 'reduction', v.reduction,
  'normalisedFigure', v.normalised_figure::float8, 'reynolds', v.reynolds::float8, 'dragCoefficient', v.drag_coefficient::float8,
  'viscosityPaS', v.viscosity_pa_s::float8, 'warningCount', v.warning_count, 'currentRevision', v.current_revision)`;

export async function listLabDropLogs(executor: Executor, access: CourseAccess, labId: string): Promise<DropLogListEntry[]> {
  const student = access.membership.role === "student";
  const result = await executor.execute<DropLogListEntry>(sql`
    select d.id, d.membership_id as "membershipId", u.name as "studentName", m.cohort_id as "cohortId",
      (select count(*)::int from drop_log_versions c where c.drop_log_id = d.id) as "versionCount",
      case when v.id is null then null else ${versionJson} end as "latestVersion"
    from drop_logs d
    join course_memberships m on m.id = d.membership_id
    join users u on u.id = m.user_id
    left join drop_log_versions v on v.id = d.latest_version_id
    where d.lab_id = ${labId}
      and (d.latest_version_id is not null or d.membership_id = ${access.membership.id})
      and ${
        student
          ? sql`d.membership_id = ${access.membership.id}`
          : sql`m.cohort_id in (select value::uuid from json_array_elements_text(${JSON.stringify(access.cohortIds)}::json))`
      }
    order by u.name`);
  return result.rows;
}

/** The owner of one drop log of the lab, for the access check before it is read; null when there is none. */
export async function findDropLogOwner(
  executor: Executor,
  labId: string,
  dropLogId: string,
): Promise<(StudentOwner & { membershipId: string; studentName: string }) | null> {
  const [row] = await executor
    .select({
      membershipId: dropLogs.membershipId,
      userId: courseMemberships.userId,
      cohortId: courseMemberships.cohortId,
      studentName: users.name,
    })
    .from(dropLogs)
    .innerJoin(courseMemberships, eq(courseMemberships.id, dropLogs.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .where(and(eq(dropLogs.id, dropLogId), eq(dropLogs.labId, labId)));
  return row ?? null;
}
