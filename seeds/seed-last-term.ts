/**
 * Last term's run of the demo course, finished and archived: the course the demo could have been
 * started from ("Start next term from this course"), so that the archive shows on the home page and
 * the demo course names where it came from. Its labs are the demo's, 26 weeks earlier and closed;
 * its only member is the instructor (last term's students are not part of the invented scenario).
 */
import { eq, sql } from "drizzle-orm";
import { courseMemberships, courses } from "~/db/schema";
import type { Database } from "~/server/db.server";
import { DEMO_TERM_OPENED_DAYS_AGO, demoCourse, termOf } from "./demo-scenario";

const weeksEarlier = 26;
/** Named, like the demo's own term, after the day its first lab opened. */
export const lastTerm = termOf(new Date(Date.now() - (DEMO_TERM_OPENED_DAYS_AGO + weeksEarlier * 7) * 86_400_000), demoCourse.timeZone);

export async function seedLastTerm(db: Database, { courseId, instructorId }: { courseId: string; instructorId: string }): Promise<void> {
  await db.transaction(async (tx) => {
    const [course] = await tx
      .insert(courses)
      .values({ ...demoCourse, term: lastTerm, kitReturnBy: null, archivedAt: new Date(), archivedById: instructorId })
      .returning();
    await tx.execute(
      sql`insert into cohorts (course_id, name, position) select ${course.id}::uuid, name, position from cohorts where course_id = ${courseId}`,
    );
    await tx.insert(courseMemberships).values({ courseId: course.id, userId: instructorId, role: "instructor" });
    // Moved by calendar days in the course's zone, as a carry-over moves them, so 23:59 stays 23:59.
    const earlier = (column: string) =>
      sql`((${sql.identifier(column)} at time zone ${demoCourse.timeZone}) - interval '${sql.raw(String(weeksEarlier * 7))} days') at time zone ${demoCourse.timeZone}`;
    const labMap = await tx.execute<{ old_id: string; new_id: string }>(sql`
      with copied as (
        select l.*, gen_random_uuid() as new_id from labs l where l.course_id = ${courseId}
      ), inserted as (
        insert into labs (id, course_id, title, kind, status, instructions, opens_at, due_at, late_cutoff_at, required_drops,
          wall_correction, drag_model, comparison_method, comparison_alpha, comparison_max_outliers, comparison_k, resolutions,
          reminder_offsets_hours, published_at, mark_weight)
        select new_id, ${course.id}::uuid, title, kind, 'closed', instructions, ${earlier("opens_at")}, ${earlier("due_at")},
          ${earlier("late_cutoff_at")}, required_drops, wall_correction, drag_model, comparison_method, comparison_alpha,
          comparison_max_outliers, comparison_k, resolutions, reminder_offsets_hours, ${earlier("opens_at")}, mark_weight
        from copied
        returning id
      )
      select id as old_id, new_id from copied`);
    await tx.execute(sql`
      insert into lab_cohorts (lab_id, cohort_id)
      select m.new_id, nc.id
      from lab_cohorts lc
      join json_to_recordset(${JSON.stringify(labMap.rows)}::json) as m(old_id uuid, new_id uuid) on m.old_id = lc.lab_id
      join cohorts oc on oc.id = lc.cohort_id
      join cohorts nc on nc.course_id = ${course.id} and nc.name = oc.name`);
    await tx.update(courses).set({ carriedFromId: course.id }).where(eq(courses.id, courseId));
  });
}
