/**
 * "Start next term from this course": a new course made from a finished one, in one transaction of a
 * constant number of set-based statements whatever the course's size. It takes the course's settings,
 * its cohorts (if asked), its labs as drafts with every date moved by the chosen number of calendar
 * days, their rubrics and method settings, the kit inventory (parts not retired, with their measured
 * values and measurement history, and the kits on the shelf with their contents) and the instructors.
 * Nothing of the students comes along: no members but instructors, invitations, hand-ins, marks,
 * extensions, e-mails, addresses, shipments or audit.
 */
import { randomUUID } from "node:crypto";
import { asc, eq, getTableColumns, sql, type SQL } from "drizzle-orm";
import type { PgTable } from "drizzle-orm/pg-core";
import { cohorts, courses, kits, labs, parts, rubricCriteria } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { shiftCalendarDay, shiftLabTimes, type CarryOverInput } from "~/lib/courses/carry-over-input";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";

/** The course and its labs' times, as the carry-over page previews them: two statements. */
export async function carryOverSource(executor: Executor, courseId: string) {
  const [[course], labRows] = await Promise.all([
    executor
      .select({
        timeZone: courses.timeZone,
        kitReturnBy: courses.kitReturnBy,
        cohorts: sql<number>`(select count(*)::int from ${cohorts} c where c.course_id = ${courses.id})`,
        parts: sql<number>`(select count(*)::int from ${parts} p where p.course_id = ${courses.id} and p.status <> 'retired')`,
        shelfKits: sql<number>`(select count(*)::int from ${kits} k where k.course_id = ${courses.id} and k.state = 'on_shelf')`,
      })
      .from(courses)
      .where(eq(courses.id, courseId)),
    sourceLabs(executor, courseId),
  ]);
  return { ...course, labs: labRows };
}

function sourceLabs(executor: Executor, courseId: string) {
  return executor
    .select({ id: labs.id, title: labs.title, opensAt: labs.opensAt, dueAt: labs.dueAt, lateCutoffAt: labs.lateCutoffAt })
    .from(labs)
    .where(eq(labs.courseId, courseId))
    .orderBy(asc(labs.opensAt), asc(labs.title));
}

/**
 * The columns a copy takes over as they are: all of the table's but those the copy sets itself. A
 * column added later is carried over unless it is named here, which is the safer default for settings.
 */
function copiedColumns(table: PgTable, setHere: readonly string[]): SQL {
  const names = Object.values(getTableColumns(table))
    .map((column) => column.name)
    .filter((name) => !setHere.includes(name) && name !== "created_at" && name !== "updated_at");
  return sql.join(
    names.map((name) => sql.identifier(name)),
    sql`, `,
  );
}

/** Part events that record a measurement or a status: the others name kits and students of the old course. */
const measurementEvents = sql`(e.action in ('created', 'remeasured') or e.action like 'status:%')`;

export async function carryOverCourse(
  executor: Executor,
  { access, input, request }: { access: CourseAccess; input: CarryOverInput; request?: Request },
): Promise<{ courseId: string }> {
  const from = access.course;
  const actorId = access.user.id;
  return executor.transaction(async (tx) => {
    // One after the other: a transaction's statements share one connection.
    const [old] = await tx.select().from(courses).where(eq(courses.id, from.id));
    const labRows = await sourceLabs(tx, from.id);
    const [created] = await tx
      .insert(courses)
      .values({
        title: input.title,
        code: input.code,
        term: input.term,
        timeZone: input.timeZone,
        localGravity: old.localGravity,
        partBiasAlpha: old.partBiasAlpha,
        returnAddress: old.returnAddress,
        kitReturnBy: old.kitReturnBy && shiftCalendarDay(old.kitReturnBy, input.shiftDays),
        kitReturnReminderDays: old.kitReturnReminderDays,
        markBookDropLowest: old.markBookDropLowest,
        carriedFromId: old.id,
      })
      .onConflictDoNothing({ target: [courses.code, courses.term] })
      .returning({ id: courses.id });
    if (!created)
      throw new AppError({ code: "course_exists", message: `A course ${input.code} already exists for ${input.term}.`, field: "code" });
    const to = created.id;
    const newId = sql`${to}::uuid`;

    // New lab ids and times are made here, so the later statements map old labs to new ones by a join.
    const labMap = JSON.stringify(
      labRows.map((lab) => {
        const shifted = shiftLabTimes(lab, input.shiftDays, old.timeZone, input.timeZone);
        return { old_id: lab.id, new_id: randomUUID(), ...shifted };
      }),
    );
    const labMapRows = sql`json_to_recordset(${labMap}::json) as m(old_id uuid, new_id uuid, "opensAt" timestamptz, "dueAt" timestamptz, "lateCutoffAt" timestamptz)`;

    if (input.copyCohorts)
      await tx.execute(
        sql`insert into cohorts (course_id, name, position) select ${newId}, name, position from cohorts where course_id = ${from.id}`,
      );

    // Parts are matched between the courses by label, unique within a course.
    const partColumns = copiedColumns(parts, ["id", "course_id"]);
    await tx.execute(sql`
      insert into parts (course_id, ${partColumns})
      select ${newId}, ${partColumns} from parts where course_id = ${from.id} and status <> 'retired'`);
    await tx.execute(sql`
      insert into part_events (part_id, actor_id, action, note, detail, created_at)
      select np.id, e.actor_id, e.action, e.note, e.detail, e.created_at
      from part_events e
      join parts op on op.id = e.part_id
      join parts np on np.course_id = ${newId} and np.label = op.label
      where op.course_id = ${from.id} and ${measurementEvents}`);

    // Kits on the shelf, matched by their number; kits with a student stay behind with them.
    await tx.execute(sql`
      insert into kits (course_id, number, state)
      select ${newId}, number, 'on_shelf' from kits where course_id = ${from.id} and state = 'on_shelf'`);
    await tx.execute(sql`
      insert into kit_parts (kit_id, part_id, exclusive)
      select nk.id, np.id, kp.exclusive
      from kit_parts kp
      join kits ok on ok.id = kp.kit_id
      join kits nk on nk.course_id = ${newId} and nk.number = ok.number
      join parts op on op.id = kp.part_id
      join parts np on np.course_id = ${newId} and np.label = op.label
      where ok.course_id = ${from.id}`);
    const note = `Carried over from ${old.code} ${old.term}.`;
    await tx.execute(sql`
      insert into kit_events (kit_id, actor_id, to_state, action, note, detail)
      select k.id, ${actorId}::uuid, 'on_shelf', 'created', ${note},
        jsonb_build_object('partIds', coalesce((select jsonb_agg(kp.part_id) from kit_parts kp where kp.kit_id = k.id), '[]'::jsonb))
      from kits k where k.course_id = ${newId}`);

    const labColumns = copiedColumns(labs, [
      "id",
      "course_id",
      "status",
      "opens_at",
      "due_at",
      "late_cutoff_at",
      "allowed_part_ids",
      "published_at",
    ]);
    await tx.execute(sql`
      insert into labs (id, course_id, status, opens_at, due_at, late_cutoff_at, allowed_part_ids, ${labColumns})
      select m.new_id, ${newId}, 'draft', m."opensAt", m."dueAt", m."lateCutoffAt",
        array(
          select np.id from unnest(l.allowed_part_ids) with ordinality a(part_id, n)
          join parts op on op.id = a.part_id
          join parts np on np.course_id = ${newId} and np.label = op.label
          order by a.n
        ),
        ${labColumns}
      from labs l join ${labMapRows} on m.old_id = l.id`);
    if (input.copyCohorts)
      await tx.execute(sql`
        insert into lab_cohorts (lab_id, cohort_id)
        select m.new_id, nc.id
        from lab_cohorts lc
        join ${labMapRows} on m.old_id = lc.lab_id
        join cohorts oc on oc.id = lc.cohort_id
        join cohorts nc on nc.course_id = ${newId} and nc.name = oc.name`);
    const criterionColumns = copiedColumns(rubricCriteria, ["id", "lab_id"]);
    await tx.execute(sql`
      insert into rubric_criteria (lab_id, ${criterionColumns})
      select m.new_id, ${criterionColumns} from rubric_criteria r join ${labMapRows} on m.old_id = r.lab_id`);

    await tx.execute(sql`
      insert into course_memberships (course_id, user_id, role)
      select ${newId}, u.user_id, 'instructor' from (
        select user_id from course_memberships where course_id = ${from.id} and role = 'instructor' and removed_at is null
        union select ${actorId}::uuid
      ) u`);
    const detail = {
      fromCourseId: from.id,
      toCourseId: to,
      shiftDays: input.shiftDays,
      copyCohorts: input.copyCohorts,
      labs: labRows.length,
    };
    await recordAudit(tx, [
      { courseId: from.id, actorId, action: "course.carried_over", subject: `course:${to}`, detail, request },
      { courseId: to, actorId, action: "course.carried_over", subject: `course:${from.id}`, detail, request },
    ]);
    return { courseId: to };
  });
}
