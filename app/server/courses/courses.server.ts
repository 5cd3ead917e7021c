/**
 * Courses and their cohorts: creating them, their settings, and which TA marks which cohort.
 */
import { AppError } from "~/lib/app-error";
import { and, asc, eq, inArray, isNull, sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, taCohortAssignments, users } from "~/db/schema";
import type { CourseInput } from "~/lib/courses/course-input";
import type { ReturnSettingsInput } from "~/lib/courses/return-settings-input";
import { recordAudit } from "~/server/audit.server";
import { isUniqueViolation, type Executor } from "~/server/db.server";
import { inCohortOrder } from "~/server/courses/cohort-order.server";

export type Course = typeof courses.$inferSelect;

export async function createCourse(executor: Executor, { actorId, input }: { actorId: string; input: CourseInput }): Promise<Course> {
  return executor.transaction(async (tx) => {
    const clash = await tx
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, input.code), eq(courses.term, input.term)));
    if (clash.length)
      throw new AppError({ code: "course_exists", message: `A course ${input.code} already exists for ${input.term}.`, field: "code" });
    const [course] = await tx.insert(courses).values(input).returning();
    await tx.insert(courseMemberships).values({ courseId: course.id, userId: actorId, role: "instructor" });
    await recordAudit(tx, { courseId: course.id, actorId, action: "course.created", subject: `course:${course.id}` });
    return course;
  });
}

export async function updateCourse(
  executor: Executor,
  { courseId, actorId, input }: { courseId: string; actorId: string; input: CourseInput },
): Promise<void> {
  await executor.transaction(async (tx) => {
    const clash = await tx
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, input.code), eq(courses.term, input.term), sql`${courses.id} <> ${courseId}`));
    if (clash.length)
      throw new AppError({
        code: "course_exists",
        message: `Another course ${input.code} already exists for ${input.term}.`,
        field: "code",
      });
    await tx.update(courses).set(input).where(eq(courses.id, courseId));
    await recordAudit(tx, { courseId, actorId, action: "course.settings_changed", subject: `course:${courseId}`, detail: { ...input } });
  });
}

/** The kits' return-by date, reminder days and return address, audited like the other settings. */
export async function updateReturnSettings(
  executor: Executor,
  { courseId, actorId, input }: { courseId: string; actorId: string; input: ReturnSettingsInput },
): Promise<void> {
  await executor.transaction(async (tx) => {
    await tx.update(courses).set(input).where(eq(courses.id, courseId));
    await recordAudit(tx, { courseId, actorId, action: "course.settings_changed", subject: `course:${courseId}`, detail: { ...input } });
  });
}

/** Adds a cohort at the end of the course's order. */
export async function addCohort(
  executor: Executor,
  { courseId, actorId, name }: { courseId: string; actorId: string; name: string },
): Promise<void> {
  const position = sql<number>`(select coalesce(max(c.position) + 1, 0) from cohorts c where c.course_id = ${courseId})`;
  await executor.transaction(async (tx) => {
    const inserted = await tx.insert(cohorts).values({ courseId, name, position }).onConflictDoNothing().returning({ id: cohorts.id });
    if (inserted.length === 0)
      throw new AppError({ code: "cohort_exists", message: `There is already a cohort called ${name}.`, field: "name" });
    await recordAudit(tx, { courseId, actorId, action: "course.cohort_created", subject: `cohort:${inserted[0].id}` });
  });
}

/**
 * Moves a cohort one place earlier or later in the course's order, swapping positions with its
 * neighbour in one statement; at either end nothing changes.
 */
export async function moveCohort(
  executor: Executor,
  { courseId, cohortId, direction }: { courseId: string; cohortId: string; direction: "up" | "down" },
): Promise<void> {
  const step = direction === "up" ? -1 : 1;
  // Renumbers the course's cohorts 0…n−1 in their current order while swapping the two places.
  const moved = await executor.execute<{ id: string }>(sql`
    with ordered as (
      select id, (row_number() over (order by position, name) - 1)::int as place from cohorts where course_id = ${courseId}
    ), target as (
      select place + ${step} as place from ordered where id = ${cohortId} and place + ${step} between 0 and (select count(*) - 1 from ordered)
    )
    update cohorts set position = case
        when ordered.id = ${cohortId} and exists (select 1 from target) then ordered.place + ${step}
        when ordered.place = (select place from target) then ordered.place - ${step}
        else ordered.place end
    from ordered where cohorts.id = ordered.id
    returning cohorts.id`);
  if (!moved.rows.some((row) => row.id === cohortId))
    throw new AppError({ code: "not_found", message: "There is no such cohort in this course.", status: 404 });
}

/** Renames one of the course's cohorts; a cohort of another course (or none) is refused with 404 and nothing changes. */
export async function renameCohort(
  executor: Executor,
  { courseId, cohortId, name }: { courseId: string; cohortId: string; name: string },
): Promise<void> {
  let renamed: { id: string }[];
  try {
    renamed = await executor
      .update(cohorts)
      .set({ name })
      .where(and(eq(cohorts.id, cohortId), eq(cohorts.courseId, courseId)))
      .returning({ id: cohorts.id });
  } catch (error) {
    if (isUniqueViolation(error))
      throw new AppError({ code: "cohort_exists", message: `There is already a cohort called ${name}.`, field: "name" });
    throw error;
  }
  if (renamed.length === 0) throw new AppError({ code: "not_found", message: "There is no such cohort in this course.", status: 404 });
}

/** Replaces the set of cohorts a TA marks, in one transaction. */
export async function setTaCohorts(
  executor: Executor,
  { courseId, actorId, membershipId, cohortIds }: { courseId: string; actorId: string; membershipId: string; cohortIds: string[] },
): Promise<void> {
  await executor.transaction(async (tx) => {
    const [member] = await tx
      .select({ role: courseMemberships.role })
      .from(courseMemberships)
      .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt)));
    if (member?.role !== "ta") throw new AppError({ code: "not_a_ta", message: "Only teaching assistants are assigned to cohorts." });
    const known = cohortIds.length
      ? await tx
          .select({ id: cohorts.id })
          .from(cohorts)
          .where(and(eq(cohorts.courseId, courseId), inArray(cohorts.id, cohortIds)))
      : [];
    if (known.length !== cohortIds.length)
      throw new AppError({ code: "unknown_cohort", message: "Some of the chosen cohorts are not in this course.", field: "cohortIds" });
    await tx.delete(taCohortAssignments).where(eq(taCohortAssignments.membershipId, membershipId));
    if (cohortIds.length) await tx.insert(taCohortAssignments).values(cohortIds.map((cohortId) => ({ membershipId, cohortId })));
    await recordAudit(tx, {
      courseId,
      actorId,
      action: "course.ta_cohorts_changed",
      subject: `membership:${membershipId}`,
      detail: { cohortIds },
    });
  });
}

/** The course with its cohorts, each cohort's student count and its TAs: three statements. */
export async function getCourseWithCohorts(executor: Executor, courseId: string) {
  const [course] = await executor.select().from(courses).where(eq(courses.id, courseId));
  if (!course) return null;
  const [cohortRows, taRows] = await Promise.all([
    executor
      .select({
        id: cohorts.id,
        name: cohorts.name,
        // Written out with an alias: interpolated columns lose their table name inside a subquery.
        students: sql<number>`(select count(*)::int from course_memberships m where m.cohort_id = "cohorts"."id" and m.role = 'student' and m.removed_at is null)`,
      })
      .from(cohorts)
      .where(eq(cohorts.courseId, courseId))
      .orderBy(...inCohortOrder),
    executor
      .select({
        membershipId: courseMemberships.id,
        name: users.name,
        email: users.email,
        cohortIds: sql<
          string[]
        >`coalesce(array_agg(${taCohortAssignments.cohortId}) filter (where ${taCohortAssignments.cohortId} is not null), '{}')`,
      })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .leftJoin(taCohortAssignments, eq(taCohortAssignments.membershipId, courseMemberships.id))
      .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "ta"), isNull(courseMemberships.removedAt)))
      .groupBy(courseMemberships.id, users.name, users.email)
      .orderBy(asc(users.name)),
  ]);
  return { course, cohorts: cohortRows, tas: taRows };
}
