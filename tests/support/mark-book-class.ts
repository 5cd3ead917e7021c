/**
 * A course for the term mark book, written straight into the database in a constant number of bulk
 * statements: two cohorts, an instructor and a TA of the first cohort, `students` students taking turns
 * between the cohorts, `labs` published labs each with a 10-point rubric, and a mark for every student
 * and lab, released except every `unreleasedEvery`-th. For the mark book's statement counts and its
 * benchmark.
 */
import { sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, labCohorts, labs, marks, rubricCriteria, taCohortAssignments, users } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor } from "~/server/db.server";

export type MarkBookClass = {
  courseId: string;
  cohortIds: [string, string];
  labIds: string[];
  instructor: CourseAccess;
  ta: CourseAccess;
};

const day = 24 * 3600 * 1000;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

/** A viewer of the course as `requireCourseRole` would give it. */
export function courseAccess(
  course: { id: string; code: string },
  viewer: { userId: string; membershipId: string; role: "instructor" | "ta" },
  cohortIds: string[],
): CourseAccess {
  return {
    user: {
      id: viewer.userId,
      email: `${viewer.role}@${course.code}.example`,
      name: `Test ${viewer.role}`,
      sessionId: null,
      via: "session",
    },
    course: { id: course.id, title: "Settling Spheres", code: course.code, term: "Test term", timeZone: "UTC", archivedAt: null },
    membership: { id: viewer.membershipId, role: viewer.role, cohortId: null },
    cohortIds,
  } as CourseAccess;
}

export async function seedMarkBookClass(
  executor: Executor,
  { label, students, labs: labCount, unreleasedEvery = 13 }: { label: string; students: number; labs: number; unreleasedEvery?: number },
): Promise<MarkBookClass> {
  const [course] = await executor
    .insert(courses)
    .values({ title: "Settling Spheres", code: label, term: "Test term", timeZone: "UTC" })
    .returning();
  const cohortRows = await executor
    .insert(cohorts)
    .values([
      { courseId: course.id, name: `${label} cohort one` },
      { courseId: course.id, name: `${label} cohort two` },
    ])
    .returning();
  const cohortIds: [string, string] = [cohortRows[0].id, cohortRows[1].id];
  const staff = await executor
    .insert(users)
    .values([
      { email: `instructor@${label}.example`, name: `${label} instructor` },
      { email: `ta@${label}.example`, name: `${label} TA` },
    ])
    .returning({ id: users.id });
  const staffMemberships = await executor
    .insert(courseMemberships)
    .values([
      { courseId: course.id, userId: staff[0].id, role: "instructor" },
      { courseId: course.id, userId: staff[1].id, role: "ta" },
    ])
    .returning({ id: courseMemberships.id });
  await executor.insert(taCohortAssignments).values({ membershipId: staffMemberships[1].id, cohortId: cohortIds[0] });

  const userIds = await insertMany(
    executor,
    users,
    Array.from({ length: students }, (_, index) => ({
      email: `student${index}@${label}.example`,
      name: `${label} student ${String(index).padStart(4, "0")}`,
      studentNumber: `S${String(index).padStart(6, "0")}`,
    })),
  );
  const membershipIds = await insertMany(
    executor,
    courseMemberships,
    userIds.map((userId, index) => ({ courseId: course.id, userId, role: "student" as const, cohortId: cohortIds[index % 2] })),
  );
  const now = Date.now();
  const labRows = await executor
    .insert(labs)
    .values(
      Array.from({ length: labCount }, (_, index) => ({
        courseId: course.id,
        title: `Lab ${index + 1}`,
        kind: "drag" as const,
        status: "closed" as const,
        opensAt: new Date(now - (60 - index * 7) * day),
        dueAt: new Date(now - (50 - index * 7) * day),
        resolutions,
        publishedAt: new Date(now - (60 - index * 7) * day),
        markWeight: 1 + (index % 3),
      })),
    )
    .returning({ id: labs.id });
  const labIds = labRows.map((lab) => lab.id);
  await executor.insert(labCohorts).values(labIds.flatMap((labId) => cohortIds.map((cohortId) => ({ labId, cohortId }))));
  await executor
    .insert(rubricCriteria)
    .values(labIds.map((labId) => ({ labId, position: 0, title: "Report", kind: "range" as const, minPoints: 0, maxPoints: 10 })));
  // Every mark in one statement, its points spread over 0–10 by student and lab.
  await executor.execute(sql`
    insert into ${marks} (lab_id, membership_id, total, released_at)
    select lab.id::uuid, member.id::uuid, ((member.n * 7 + lab.n * 3) % 11)::float8,
      case when (member.n + lab.n) % ${unreleasedEvery} = 0 then null else now() end
    from json_array_elements_text(${JSON.stringify(membershipIds)}::json) with ordinality as member(id, n)
    cross join json_array_elements_text(${JSON.stringify(labIds)}::json) with ordinality as lab(id, n)`);
  return {
    courseId: course.id,
    cohortIds,
    labIds,
    instructor: courseAccess(course, { userId: staff[0].id, membershipId: staffMemberships[0].id, role: "instructor" }, cohortIds),
    ta: courseAccess(course, { userId: staff[1].id, membershipId: staffMemberships[1].id, role: "ta" }, [cohortIds[0]]),
  };
}
