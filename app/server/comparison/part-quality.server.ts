/**
 * Kit-part quality: the normalised figures of every counted hand-in of the course's labs, grouped by
 * the sphere, fluid lot and column they used, and tested for bias (see `partBias`). A part re-measured
 * since counts only the revisions made after its change. One statement for
 * the whole course, whatever the number of labs, parts and hand-ins.
 */
import { sql } from "drizzle-orm";
import { partBias, type PartBias } from "~/lib/comparison/part-bias";
import type { Executor } from "~/server/db.server";

export type PartBiasHandIn = { dropLogId: string; labId: string; labTitle: string; studentName: string; figure: number; submittedAt: string };
export type PartBiasReport = PartBias & { partId: string; alpha: number; handIns: PartBiasHandIn[] };

type Row = {
  part_id: string;
  drop_log_id: string;
  lab_id: string;
  lab_title: string;
  student_name: string;
  figure: number;
  submitted_at: Date | string;
  alpha: number;
};

/**
 * The bias report of every part of the course that some counted hand-in used (or of one part), with the
 * course's significance level. A version names its sphere, fluid lot and column; each is one group.
 */
export async function listPartBias(executor: Executor, courseId: string, partId?: string): Promise<Map<string, PartBiasReport>> {
  const result = await executor.execute<Row>(sql`
    select p.part_id, dl.id as drop_log_id, l.id as lab_id, l.title as lab_title, u.name as student_name,
      v.normalised_figure::float8 as figure, v.submitted_at, c.part_bias_alpha::float8 as alpha
    from labs l
    join courses c on c.id = l.course_id
    join drop_logs dl on dl.lab_id = l.id
    join drop_log_versions v on v.id = dl.latest_version_id
    join course_memberships m on m.id = dl.membership_id
    join users u on u.id = m.user_id
    cross join lateral (values (v.sphere_id), (v.fluid_lot_id), (v.column_id)) as p(part_id)
    join parts pp on pp.id = p.part_id
    where l.course_id = ${courseId} and v.normalised_figure > 0
      -- A re-measured part is judged only on figures reduced with its new record: revisions made after the change.
      and (pp.reduction_changed_at is null or exists (
        select 1 from reduction_revisions rr
        where rr.version_id = v.id and rr.revision = v.current_revision and rr.created_at >= pp.reduction_changed_at))
      ${partId ? sql`and p.part_id = ${partId}` : sql``}
    order by p.part_id, v.submitted_at`);
  const grouped = new Map<string, { alpha: number; handIns: PartBiasHandIn[] }>();
  for (const row of result.rows) {
    let group = grouped.get(row.part_id);
    if (!group) grouped.set(row.part_id, (group = { alpha: row.alpha, handIns: [] }));
    group.handIns.push({
      dropLogId: row.drop_log_id,
      labId: row.lab_id,
      labTitle: row.lab_title,
      studentName: row.student_name,
      figure: row.figure,
      submittedAt: new Date(row.submitted_at).toISOString(),
    });
  }
  const reports = new Map<string, PartBiasReport>();
  for (const [id, group] of grouped) {
    reports.set(id, { ...partBias(group.handIns.map((handIn) => handIn.figure), group.alpha), partId: id, alpha: group.alpha, handIns: group.handIns });
  }
  return reports;
}
