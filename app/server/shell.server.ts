import { and, asc, eq, isNull, sql } from "drizzle-orm";
import type { ShellViewer } from "~/components/app-shell";
import { courseMemberships, courses } from "~/db/schema";
import { getOptionalUser, type RequestScope } from "~/server/auth/access.server";
import { db } from "~/server/db.server";

/** The signed-in person and the courses they belong to (with their role in each), for the navigation. */
export async function getShellViewer(scope: RequestScope): Promise<ShellViewer | null> {
  const user = await getOptionalUser(scope);
  if (!user) return null;
  const memberships = await db
    .select({
      id: courses.id,
      code: courses.code,
      title: courses.title,
      term: courses.term,
      role: courseMemberships.role,
      archived: sql<boolean>`${courses.archivedAt} is not null`,
    })
    .from(courseMemberships)
    .innerJoin(courses, eq(courses.id, courseMemberships.courseId))
    .where(and(eq(courseMemberships.userId, user.id), isNull(courseMemberships.removedAt)))
    .orderBy(asc(courses.code));
  return { name: user.name, email: user.email, mayCreateCourses: user.mayCreateCourses, courses: memberships };
}
