import { Outlet } from "react-router";
import type { Route } from "./+types/courses.$courseId";
import { CourseNav } from "~/components/course-nav";
import { Notice } from "~/components/ui/notice";
import { anyRole, courseAccessMiddleware, requireCourseRole } from "~/server/auth/access.server";

/** The viewer's access to the course is looked up once, here, for the frame and the page to share. */
export const middleware: Route.MiddlewareFunction[] = [courseAccessMiddleware];

/** The frame of every course page: its name and the rooms the viewer's role opens. Children check their own roles. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  return { course: access.course, role: access.membership.role };
}

export default function CourseFrame({ loaderData }: Route.ComponentProps) {
  const { course, role } = loaderData;
  return (
    <>
      <p className="no-print text-sm text-ink-600">
        {course.code} · {course.term}
      </p>
      <p className="no-print mb-2 text-lg font-medium">{course.title}</p>
      <CourseNav courseId={course.id} role={role} />
      {course.archivedAt ? (
        <div className="mb-4">
          <Notice tone="warning">
            This course is archived and read-only: nothing in it can be changed. Its pages and exports still open.
            {role === "instructor" ? " Restore it in the course settings to change it again." : null}
          </Notice>
        </div>
      ) : null}
      <Outlet />
    </>
  );
}
