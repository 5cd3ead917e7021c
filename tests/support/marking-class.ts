/**
 * A class to mark, written straight into the database in a constant number of bulk statements: the
 * comparison's class (users, memberships, drop logs, one version each) with its drop times in each
 * input and their count in each reduction, as a hand-in stores them, for the marking tests and
 * benchmarks. Figures and lateness are chosen by the caller.
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
    -- Times a hand stopwatch reads over a 20 cm column, the same for every student (the tests read their count, not their values).
    set input = v.input || jsonb_build_object('drops', (select jsonb_agg(to_jsonb(to_char(4.1 + (i % 7) * 0.07, 'FM0.00'))) from generate_series(1, ${dropCount}::int) i)),
      reduction = jsonb_build_object('mode', 'drag', 'drops', jsonb_build_object('n', ${dropCount}::int, 'strayDrops', '[]'::jsonb)),
      late = v.drop_log_id in (select value::uuid from json_array_elements_text(${JSON.stringify(lateLogs)}::json))
    from drop_logs d
    where d.id = v.drop_log_id and d.id in (select value::uuid from json_array_elements_text(${JSON.stringify(dropLogIds)}::json))
    returning d.id as drop_log_id, d.membership_id`);
  const membershipOf = new Map(result.rows.map((row) => [row.drop_log_id, row.membership_id]));
  return { membershipIds: dropLogIds.map((id) => membershipOf.get(id)!), dropLogIds };
}
