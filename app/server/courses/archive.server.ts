/**
 * Archiving a finished course, and restoring it. An archived course is read-only (`requireCourseRole`
 * refuses every change with 409), leaves the course lists and the background jobs, and keeps its pages
 * and exports.
 */
import { and, eq, isNotNull, isNull } from "drizzle-orm";
import { courses } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { recordAudit } from "~/server/audit.server";
import type { Executor } from "~/server/db.server";

type CourseChange = { courseId: string; actorId: string; request?: Request };

export async function archiveCourse(executor: Executor, { courseId, actorId, request }: CourseChange): Promise<void> {
  await executor.transaction(async (tx) => {
    const archived = await tx
      .update(courses)
      .set({ archivedAt: new Date(), archivedById: actorId })
      .where(and(eq(courses.id, courseId), isNull(courses.archivedAt)))
      .returning({ id: courses.id });
    if (archived.length === 0) throw new AppError({ code: "already_archived", message: "This course is archived already.", status: 409 });
    await recordAudit(tx, { courseId, actorId, action: "course.archived", subject: `course:${courseId}`, request });
  });
}

export async function restoreCourse(executor: Executor, { courseId, actorId, request }: CourseChange): Promise<void> {
  await executor.transaction(async (tx) => {
    const restored = await tx
      .update(courses)
      .set({ archivedAt: null, archivedById: null })
      .where(and(eq(courses.id, courseId), isNotNull(courses.archivedAt)))
      .returning({ id: courses.id });
    if (restored.length === 0) throw new AppError({ code: "not_archived", message: "This course is not archived.", status: 409 });
    await recordAudit(tx, { courseId, actorId, action: "course.restored", subject: `course:${courseId}`, request });
  });
}
