/**
 * The demo's extensions, set through the app's own function (late flags and reminders follow as in
 * the app): a student with a learning-support plan has three more days for the drag lab, whose class
 * deadline has passed, and has not handed in yet; and the Thursday bench, whose kits shipped last (some
 * are still on their way), has four more days for the viscometry lab. Seeded before the marking, so
 * the desk sees the student's own due time. Invented demo data: never a test's expected value.
 */
import { and, eq, sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, labs, users } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Database } from "~/server/db.server";
import { setExtensions } from "~/server/labs/extensions.server";
import { getLab } from "~/server/labs/labs.server";
import { demoCohortNames } from "./demo-scenario";

const DAY_MS = 86_400_000;
const later = (instant: Date | null, days: number) => (instant ? new Date(instant.getTime() + days * DAY_MS) : undefined);

export async function seedExtensions(db: Database, { courseId }: { courseId: string }): Promise<void> {
  const [course] = await db.select().from(courses).where(eq(courses.id, courseId));
  const [instructor] = await db
    .select({ userId: users.id, email: users.email, name: users.name, membershipId: courseMemberships.id })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "instructor")));
  const courseCohorts = await db.select({ id: cohorts.id, name: cohorts.name }).from(cohorts).where(eq(cohorts.courseId, courseId));
  const access: CourseAccess = {
    user: {
      id: instructor.userId,
      email: instructor.email,
      name: instructor.name,
      mayCreateCourses: true,
      sessionId: null,
      via: "session",
    },
    course: { id: course.id, title: course.title, code: course.code, term: course.term, timeZone: course.timeZone, archivedAt: null },
    membership: { id: instructor.membershipId, role: "instructor", cohortId: null },
    cohortIds: courseCohorts.map((cohort) => cohort.id),
  };
  const labRows = await db.select({ id: labs.id, kind: labs.kind }).from(labs).where(eq(labs.courseId, courseId));
  const labOf = async (kind: "drag" | "viscometry") => (await getLab(db, courseId, labRows.find((row) => row.kind === kind)!.id))!;
  const [drag, viscometry] = await Promise.all([labOf("drag"), labOf("viscometry")]);
  const thursday = courseCohorts.find((cohort) => cohort.name === demoCohortNames[2])!;

  // A student with their kit at home and no drag hand-in yet, the Thursday bench's first (no TA marks it in the demo).
  const found = await db.execute<{ membershipId: string }>(sql`
    select m.id as "membershipId"
    from course_memberships m
    join users u on u.id = m.user_id
    join kits k on k.holder_membership_id = m.id and k.state = 'at_home'
    where m.course_id = ${courseId} and m.role = 'student'
      and not exists (select 1 from drop_logs d where d.lab_id = ${drag.id} and d.membership_id = m.id and d.latest_version_id is not null)
    order by m.cohort_id = ${thursday.id} desc, u.email
    limit 1`);
  const student = found.rows[0];
  if (!student) throw new Error("The demo has no student with a kit at home who has not handed the drag lab in.");
  await setExtensions(db, {
    access,
    lab: drag,
    target: { membershipIds: [student.membershipId] },
    window: { dueAt: later(drag.dueAt, 3)!, lateCutoffAt: later(drag.lateCutoffAt, 3), reason: "Learning-support plan: 3 extra days" },
  });
  await setExtensions(db, {
    access,
    lab: viscometry,
    target: { cohortId: thursday.id },
    window: {
      dueAt: later(viscometry.dueAt, 4)!,
      lateCutoffAt: later(viscometry.lateCutoffAt, 4),
      reason: "Kits shipped late: the Thursday bench's kits left the store last, and some are still on their way.",
    },
  });
}
