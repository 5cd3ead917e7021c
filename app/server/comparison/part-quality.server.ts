/**
 * Kit-part quality: the normalised figures of every counted hand-in of the course's labs, read with the
 * sphere, fluid lot and column they used, and each part compared with its peers of the same kind in the
 * same lab (see `partBiasByPeers`). One statement for the whole course, whatever the number of labs,
 * parts and hand-ins; a part re-measured since counts only the revisions made after its change. The
 * Holm family is always the whole course, also when one part is asked for.
 */
import { sql } from "drizzle-orm";
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

type Row = {
  part_id: string;
  part_kind: PartKind;
  drop_log_id: string;
  lab_id: string;
  lab_title: string;
  lab_kind: "drag" | "viscometry";
  student_name: string;
  user_id: string;
  cohort_id: string | null;
  lab_cohort_ids: string[];
  figure: number;
  submitted_at: Date | string;
  alpha: number;
};

/**
 * The bias report of every part of the course that some counted hand-in used (or of one part), with the
 * course's significance level. A version names its sphere, fluid lot and column; each is tested among
 * the parts of its own kind.
 */
export async function listPartBias(executor: Executor, courseId: string, partId?: string): Promise<Map<string, PartBiasReport>> {
  // The hand-ins that count: the latest version of each drop log of the course's labs, with a figure.
  // A re-measured part is judged only on figures reduced with its new record: revisions made after the change.
  const counted = sql`l.course_id = ${courseId} and v.normalised_figure > 0 and p.part_id is not null
    and (pp.reduction_changed_at is null or exists (
      select 1 from reduction_revisions rr
      where rr.version_id = v.id and rr.revision = v.current_revision and rr.created_at >= pp.reduction_changed_at))`;
  const result = await executor.execute<Row>(sql`
    select p.part_id, p.part_kind, dl.id as drop_log_id, l.id as lab_id, l.title as lab_title, l.kind as lab_kind,
      u.name as student_name, m.user_id, m.cohort_id, coalesce(lab_sets.cohort_ids, '{}') as lab_cohort_ids,
      v.normalised_figure::float8 as figure, v.submitted_at, c.part_bias_alpha::float8 as alpha
    from labs l
    join courses c on c.id = l.course_id
    join drop_logs dl on dl.lab_id = l.id
    join drop_log_versions v on v.id = dl.latest_version_id
    join course_memberships m on m.id = dl.membership_id
    join users u on u.id = m.user_id
    left join (select lc.lab_id, array_agg(lc.cohort_id)::text[] as cohort_ids from lab_cohorts lc join labs cl on cl.id = lc.lab_id
      where cl.course_id = ${courseId} group by lc.lab_id) lab_sets on lab_sets.lab_id = l.id
    cross join lateral (values (v.sphere_id, 'sphere'), (v.fluid_lot_id, 'fluid_lot'), (v.column_id, 'column')) as p(part_id, part_kind)
    join parts pp on pp.id = p.part_id
    where ${counted}
    order by p.part_id, v.submitted_at`);
  const rows = result.rows;
  const alpha = rows[0]?.alpha ?? 0.05;
  const biases = partBiasByPeers(
    rows.map((row) => ({ partId: row.part_id, partKind: row.part_kind, labId: row.lab_id, mode: row.lab_kind, figure: row.figure })),
    alpha,
  );
  const labInfo = new Map<string, { title: string; cohortIds: string[] }>();
  const handInsByPart = new Map<string, PartBiasHandIn[]>();
  for (const row of rows) {
    labInfo.set(row.lab_id, { title: row.lab_title, cohortIds: row.lab_cohort_ids });
    if (partId && row.part_id !== partId) continue;
    let handIns = handInsByPart.get(row.part_id);
    if (!handIns) handInsByPart.set(row.part_id, (handIns = []));
    handIns.push({
      dropLogId: row.drop_log_id,
      labId: row.lab_id,
      labTitle: row.lab_title,
      studentName: row.student_name,
      userId: row.user_id,
      cohortId: row.cohort_id,
      figure: row.figure,
      submittedAt: new Date(row.submitted_at).toISOString(),
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
