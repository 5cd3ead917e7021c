/**
 * Kit-part quality: the normalised figures of every counted hand-in of the course's labs, read with the
 * sphere, fluid lot and column they used, and each part compared with its peers of the same kind in the
 * same lab (see `partBiasByPeers`). One statement for the whole course, whatever the number of labs,
 * parts and hand-ins; a part re-measured since counts only the revisions made after its change. The
 * Holm family is always the whole course, also when one part is asked for.
 */
import { and, eq, exists, gt, gte, isNotNull, isNull, or, sql } from "drizzle-orm";
import { courseMemberships, courses, dropLogs, dropLogVersions, labCohorts, labs, parts, reductionRevisions, users } from "~/db/schema";
import { partBiasByPeers, type PartBias, type PartKind, type PeerComparison } from "~/lib/comparison/part-bias";
import { canSeeStudentWork, type CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { mayOpenLab } from "~/server/labs/lab-access.server";

export type PartBiasHandIn = {
  dropLogId: string;
  labId: string;
  labTitle: string;
  studentName: string;
  userId: string;
  cohortId: string | null;
  figure: number;
  submittedAt: string;
};
export type PartLabComparison = PeerComparison & { labTitle: string; labCohortIds: string[] };
export type PartBiasReport = Omit<PartBias, "comparisons"> & {
  partId: string;
  alpha: number;
  comparisons: PartLabComparison[];
  handIns: PartBiasHandIn[];
};

/**
 * A report as one staff member reads it: the tests stay the whole course's, but only the hand-ins they
 * may open are listed (the others are counted), and a lab's comparison is linked only when they may open it.
 */
export type PartBiasView = Omit<PartBiasReport, "comparisons" | "handIns"> & {
  comparisons: (Omit<PartLabComparison, "labCohortIds"> & { mayOpenComparison: boolean })[];
  handIns: Omit<PartBiasHandIn, "userId" | "cohortId">[];
  /** Hand-ins in the tests from students whose work this viewer may not open. */
  otherHandIns: number;
};

/**
 * The bias report of every part of the course that some counted hand-in used (or of one part), with the
 * course's significance level. A version names its sphere, fluid lot and column; each is tested among
 * the parts of its own kind.
 */
export async function listPartBias(executor: Executor, courseId: string, partId?: string): Promise<Map<string, PartBiasReport>> {
  const v = dropLogVersions;
  // Each version once per part it names: its sphere, fluid lot and column.
  const used = { partId: sql<string>`p.part_id`, partKind: sql<PartKind>`p.part_kind` };
  const labSets = executor
    .select({ labId: labCohorts.labId, cohortIds: sql<string[]>`array_agg(${labCohorts.cohortId})::text[]`.as("cohort_ids") })
    .from(labCohorts)
    .innerJoin(labs, eq(labs.id, labCohorts.labId))
    .where(eq(labs.courseId, courseId))
    .groupBy(labCohorts.labId)
    .as("lab_sets");
  // The hand-ins that count: the latest version of each drop log of the course's labs, with a figure.
  // A re-measured part is judged only on figures reduced with its new record: revisions made after the change.
  const reducedSinceChange = executor
    .select({ one: sql`1` })
    .from(reductionRevisions)
    .where(
      and(
        eq(reductionRevisions.versionId, v.id),
        eq(reductionRevisions.revision, v.currentRevision),
        gte(reductionRevisions.createdAt, parts.reductionChangedAt),
      ),
    );
  const rows = await executor
    .select({
      partId: used.partId,
      partKind: used.partKind,
      dropLogId: dropLogs.id,
      labId: labs.id,
      labTitle: labs.title,
      labKind: labs.kind,
      studentName: users.name,
      userId: courseMemberships.userId,
      cohortId: courseMemberships.cohortId,
      labCohortIds: labSets.cohortIds,
      figure: sql<number>`${v.normalisedFigure}::float8`,
      submittedAt: v.submittedAt,
      alpha: sql<number>`${courses.partBiasAlpha}::float8`,
    })
    .from(labs)
    .innerJoin(courses, eq(courses.id, labs.courseId))
    .innerJoin(dropLogs, eq(dropLogs.labId, labs.id))
    .innerJoin(v, eq(v.id, dropLogs.latestVersionId))
    .innerJoin(courseMemberships, eq(courseMemberships.id, dropLogs.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(labSets, eq(labSets.labId, labs.id))
    .crossJoinLateral(
      sql`(values (${v.sphereId}, 'sphere'), (${v.fluidLotId}, 'fluid_lot'), (${v.columnId}, 'column')) as p(part_id, part_kind)`,
    )
    .innerJoin(parts, eq(parts.id, used.partId))
    .where(
      and(
        eq(labs.courseId, courseId),
        gt(v.normalisedFigure, 0),
        isNotNull(used.partId),
        or(isNull(parts.reductionChangedAt), exists(reducedSinceChange)),
      ),
    )
    .orderBy(used.partId, v.submittedAt);
  const alpha = rows[0]?.alpha ?? 0.05;
  const biases = partBiasByPeers(
    rows.map((row) => ({ partId: row.partId, partKind: row.partKind, labId: row.labId, mode: row.labKind, figure: row.figure })),
    alpha,
  );
  const labInfo = new Map<string, { title: string; cohortIds: string[] }>();
  const handInsByPart = new Map<string, PartBiasHandIn[]>();
  for (const row of rows) {
    labInfo.set(row.labId, { title: row.labTitle, cohortIds: row.labCohortIds ?? [] });
    if (partId && row.partId !== partId) continue;
    let handIns = handInsByPart.get(row.partId);
    if (!handIns) handInsByPart.set(row.partId, (handIns = []));
    handIns.push({
      dropLogId: row.dropLogId,
      labId: row.labId,
      labTitle: row.labTitle,
      studentName: row.studentName,
      userId: row.userId,
      cohortId: row.cohortId,
      figure: row.figure,
      submittedAt: row.submittedAt.toISOString(),
    });
  }
  const reports = new Map<string, PartBiasReport>();
  for (const [id, handIns] of handInsByPart) {
    const bias = biases.get(id)!;
    reports.set(id, {
      flagged: bias.flagged,
      testsInFamily: bias.testsInFamily,
      comparisons: bias.comparisons.map((comparison) => ({
        ...comparison,
        labTitle: labInfo.get(comparison.labId)?.title ?? "",
        labCohortIds: labInfo.get(comparison.labId)?.cohortIds ?? [],
      })),
      partId: id,
      alpha,
      handIns,
    });
  }
  return reports;
}

export function partBiasFor(access: CourseAccess, { comparisons, handIns, ...report }: PartBiasReport): PartBiasView {
  const visible = handIns.filter((handIn) => canSeeStudentWork(access, { userId: handIn.userId, cohortId: handIn.cohortId }));
  return {
    ...report,
    comparisons: comparisons.map(({ labCohortIds, ...comparison }) => ({
      ...comparison,
      mayOpenComparison: mayOpenLab(access, { cohortIds: labCohortIds }),
    })),
    handIns: visible.map(({ userId, cohortId, ...handIn }) => handIn),
    otherHandIns: handIns.length - visible.length,
  };
}
