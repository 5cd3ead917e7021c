/**
 * A class to mark, written straight into the database in a constant number of bulk statements: the
 * comparison's class (users, memberships, drop logs, one version each) with a drop count in each
 * reduction, for the marking tests and benchmark. Figures and lateness are chosen by the caller.
 */
import { sql } from "drizzle-orm";
import type { Executor } from "~/server/db.server";
import { seedClass } from "./comparison-class";

export async function seedMarkingClass(
  executor: Executor,
  {
    courseId,
    labId,
    cohortId,
    figures,
    label,
    dropCount = 10,
    late = () => false,
  }: {
    courseId: string;
    labId: string;
    cohortId: string;
    figures: number[];
    label: string;
    dropCount?: number;
    late?: (index: number) => boolean;
  },
): Promise<{ membershipIds: string[]; dropLogIds: string[] }> {
  const dropLogIds = await seedClass(executor, { courseId, labId, cohortId, members: figures.map((figure) => ({ figure })), label });
  const lateLogs = dropLogIds.filter((_, index) => late(index));
  const result = await executor.execute<{ drop_log_id: string; membership_id: string }>(sql`
    update drop_log_versions v
    set reduction = jsonb_build_object('mode', 'drag', 'drops', jsonb_build_object('n', ${dropCount}::int, 'strayDrops', '[]'::jsonb)),
      late = v.drop_log_id in (select value::uuid from json_array_elements_text(${JSON.stringify(lateLogs)}::json))
    from drop_logs d
    where d.id = v.drop_log_id and d.id in (select value::uuid from json_array_elements_text(${JSON.stringify(dropLogIds)}::json))
    returning d.id as drop_log_id, d.membership_id`);
  const membershipOf = new Map(result.rows.map((row) => [row.drop_log_id, row.membership_id]));
  return { membershipIds: dropLogIds.map((id) => membershipOf.get(id)!), dropLogIds };
}
