/**
 * Who may read a lab's class comparison: its instructors (every cohort) and the TAs of a cohort the
 * lab is set for (they see their cohorts' hand-ins, labelled against the whole class). Students never:
 * the comparison names other students.
 */
import { data } from "react-router";
import { z } from "zod";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";
import { requireCohortAccess, requireCourseRole, staffRoles, type CourseAccess, type RequestScope } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { loadComparisonLab, type ComparisonLab } from "./class-comparison.server";

/** Whether a staff member may open the comparison of a lab set for `labCohortIds`: instructors always, TAs of one of those cohorts. */
export function canOpenComparison(access: CourseAccess, labCohortIds: readonly string[]): boolean {
  if (access.membership.role === "instructor") return true;
  return access.membership.role === "ta" && labCohortIds.some((cohortId) => access.cohortIds.includes(cohortId));
}

export async function requireComparisonAccess(
  scope: RequestScope,
  courseId: string | undefined,
  labId: string | undefined,
  roles: readonly ("instructor" | "ta")[] = staffRoles,
): Promise<{ access: CourseAccess; lab: ComparisonLab }> {
  const access = await requireCourseRole(scope, courseId, roles);
  const lab = z.uuid().safeParse(labId).success ? await loadComparisonLab(db, access.course.id, labId!) : null;
  if (!lab) {
    if (isApiRequest(scope.request)) throw apiErrorResponse(404, "not_found", "There is no such lab in this course.");
    throw data("Not found", { status: 404 });
  }
  if (!canOpenComparison(access, lab.cohortIds)) {
    // A TA of none of the lab's cohorts: the cohort check refuses (and records the refusal) as it does elsewhere.
    await requireCohortAccess(scope, access.course.id, lab.cohortIds[0] ?? "no-cohort");
  }
  return { access, lab };
}
