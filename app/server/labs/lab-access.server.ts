/**
 * Who may read a lab through the API, when the address names only the lab: its instructors, the TAs
 * of a cohort it is set for, and the students of those cohorts once it is published. A draft lab is
 * invisible to students (404, as if it did not exist); other cohorts get a 403, recorded like every
 * refusal. Errors are JSON.
 */
import { z } from "zod";
import { apiErrorResponse } from "~/server/auth/api-errors.server";
import {
  anyRole,
  requireApiUser,
  requireCohortAccess,
  requireCourseRole,
  type CourseAccess,
  type RequestScope,
} from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { findLab, type LabWithCohorts } from "./labs.server";

const noSuchLab = () => apiErrorResponse(404, "not_found", "There is no such lab.");

export async function requireLabApiAccess(
  scope: RequestScope,
  labId: string | undefined,
): Promise<{ access: CourseAccess; lab: LabWithCohorts }> {
  await requireApiUser(scope.request);
  // The lab first, by its id alone (one statement): it names the course whose role is checked next.
  const lab = labId && z.uuid().safeParse(labId).success ? await findLab(db, labId) : null;
  if (!lab) throw noSuchLab();
  const access = await requireCourseRole(scope, lab.courseId, anyRole);
  if (lab.status === "draft" && access.membership.role === "student") throw noSuchLab();
  if (access.membership.role !== "instructor" && !lab.cohortIds.some((cohortId) => access.cohortIds.includes(cohortId))) {
    // Not one of the lab's cohorts: the cohort check refuses, and records the refusal, as elsewhere.
    await requireCohortAccess(scope, lab.courseId, lab.cohortIds[0] ?? "no-cohort", anyRole);
  }
  return { access, lab };
}
