/**
 * The demo's one sent message, through the app's own preview and send: the instructor reminds every
 * cohort's students who have not handed in the open viscometry lab. Its copies wait in the outbox and
 * show on each student's record. Invented demo data: never a test's expected value.
 */
import { and, eq } from "drizzle-orm";
import { cohorts, courseMemberships, courses, labs, users } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Database } from "~/server/db.server";
import { previewCourseMessage, sendCourseMessage } from "~/server/messages/course-messages.server";

export async function seedMessages(db: Database, { courseId }: { courseId: string }): Promise<void> {
  const [course] = await db.select().from(courses).where(eq(courses.id, courseId));
  const [instructor] = await db
    .select({ userId: users.id, email: users.email, name: users.name, membershipId: courseMemberships.id })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "instructor")));
  const courseCohorts = await db.select({ id: cohorts.id }).from(cohorts).where(eq(cohorts.courseId, courseId));
  const [viscometry] = await db
    .select({ id: labs.id })
    .from(labs)
    .where(and(eq(labs.courseId, courseId), eq(labs.kind, "viscometry")));
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
  const message = {
    audience: { cohortIds: access.cohortIds, labId: viscometry.id, handInState: "not-handed-in" as const },
    subject: "The viscometry lab is still open",
    body: "Hello,\n\nYou have not handed in the falling-ball viscometry lab yet. Your drop log saves as you type, so you can start now and finish later.\n\nIf your kit is missing a part, report it on your kit page and we will send a replacement.",
  };
  const preview = await previewCourseMessage(db, access, message);
  if (preview.count === 0) return;
  await sendCourseMessage(db, access, { ...message, sendKey: preview.sendKey, expectedCount: preview.count });
}
