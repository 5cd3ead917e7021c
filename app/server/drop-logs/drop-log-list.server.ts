/**
 * Drop logs of a lab as the API lists them: a student's own, or every drop log of the cohorts a staff
 * member sees, each with its counted version and that version's reduction. One statement whatever
 * the class size.
 */
import { and, eq, inArray, isNotNull, or, sql } from "drizzle-orm";
import { courseMemberships, dropLogs, dropLogVersions, users } from "~/db/schema";
import type { CourseAccess, StudentOwner } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { isoText, uuidList } from "~/server/sql.server";

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

const v = dropLogVersions;

/** The same JSON for a version wherever the API returns one. */
export const versionJson = sql<StoredVersionJson>`json_build_object(
  'id', ${v.id}, 'version', ${v.version}, 'submittedAt', ${isoText(v.submittedAt)}, 'late', ${v.late},
  'sphereId', ${v.sphereId}, 'fluidLotId', ${v.fluidLotId}, 'columnId', ${v.columnId},
  'input', ${v.input}, 'kitRecords', ${v.kitRecords}, 'reduction', ${v.reduction},
  'normalisedFigure', ${v.normalisedFigure}::float8, 'reynolds', ${v.reynolds}::float8, 'dragCoefficient', ${v.dragCoefficient}::float8,
  'viscosityPaS', ${v.viscosityPaS}::float8, 'warningCount', ${v.warningCount}, 'currentRevision', ${v.currentRevision})`;

export async function listLabDropLogs(executor: Executor, access: CourseAccess, labId: string): Promise<DropLogListEntry[]> {
  const student = access.membership.role === "student";
  return executor
    .select({
      id: dropLogs.id,
      membershipId: dropLogs.membershipId,
      studentName: users.name,
      cohortId: courseMemberships.cohortId,
      // Written out: Drizzle's $count over an aliased table names the alias without its table.
      versionCount: sql<number>`(select count(*)::int from ${dropLogVersions} where ${dropLogVersions.dropLogId} = ${dropLogs.id})`,
      latestVersion: sql<StoredVersionJson | null>`case when ${v.id} is null then null else ${versionJson} end`,
    })
    .from(dropLogs)
    .innerJoin(courseMemberships, eq(courseMemberships.id, dropLogs.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(v, eq(v.id, dropLogs.latestVersionId))
    .where(
      and(
        eq(dropLogs.labId, labId),
        or(isNotNull(dropLogs.latestVersionId), eq(dropLogs.membershipId, access.membership.id)),
        student ? eq(dropLogs.membershipId, access.membership.id) : inArray(courseMemberships.cohortId, uuidList(access.cohortIds)),
      ),
    )
    .orderBy(users.name);
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
