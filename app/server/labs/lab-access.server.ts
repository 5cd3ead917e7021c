/**
 * Who may open one lab, in one place for every page and API call about it: the course's instructors,
 * the TAs of a cohort the lab is set for and, where a route lets students in, the students of those
 * cohorts once it is published. A draft lab is invisible to students (404, as if it did not exist); a
 * member of none of its cohorts gets the cohort check's 403, recorded like every refusal. Errors are
 * JSON under /api/.
 */
import { createContext, data, type MiddlewareFunction } from "react-router";
import type { labStatus } from "~/db/schema";
import { beginCourseAccess, getOptionalUser, requireApiUser, requireCohortAccess, requireCourseRole } from "~/server/auth/access.server";
import type { CourseAccess, CourseRole, RequestScope } from "~/server/auth/access.server";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";
import { db, type Executor } from "~/server/db.server";
import { findLab, type LabWithCohorts } from "./labs.server";
import { isEntityId } from "~/lib/forms/ids";

/** What the check reads of a lab; each area loads the lab in its own shape, with at least these. */
export type LabGate = { id: string; courseId: string; cohortIds: readonly string[]; status?: (typeof labStatus.enumValues)[number] };

/** An area's loader of the lab it works with: null when the course has no such lab. */
export type LabLoader<Lab extends LabGate> = (executor: Executor, courseId: string, labId: string) => Promise<Lab | null>;

/** Why a member may not open a lab, or null when they may. The hand-in, inside its own transaction, asks the same question. */
export function labRefusal(access: CourseAccess, lab: Pick<LabGate, "cohortIds" | "status">): "no_such_lab" | "not_in_cohort" | null {
  if (access.membership.role === "instructor") return null;
  if (access.membership.role === "student" && lab.status === "draft") return "no_such_lab";
  return lab.cohortIds.some((cohortId) => access.cohortIds.includes(cohortId)) ? null : "not_in_cohort";
}

export const mayOpenLab = (access: CourseAccess, lab: Pick<LabGate, "cohortIds" | "status">) => labRefusal(access, lab) === null;

/** The lab an /api/v1/labs/:labId address names, looked up once: by the middleware, or by the first check. */
const addressedLabContext = createContext<{ labId: string; lab: Promise<LabWithCohorts | null> } | null>(null);

function addressedLab({ context }: RequestScope, labId: string): Promise<LabWithCohorts | null> {
  const known = context.get(addressedLabContext);
  if (known?.labId === labId) return known.lab;
  const lab = findLab(db, labId);
  context.set(addressedLabContext, { labId, lab });
  return lab;
}

/**
 * The middleware of /api/v1/labs/:labId: for a signed-in caller, resolves the lab (which names its
 * course) and starts the caller's access to that course, before the route's loader or action runs.
 */
export const labAddressMiddleware: MiddlewareFunction<Response> = async ({ request, params, context }, next) => {
  const scope = { request, context };
  if (isEntityId(params.labId) && (await getOptionalUser(scope))) {
    // A refusal is for the route to answer, with its own roles: nothing here throws.
    const lab = await addressedLab(scope, params.labId).catch(() => null);
    if (lab) beginCourseAccess(scope, lab.courseId);
  }
  return next();
};

function noSuchLab(request: Request, inCourse: boolean): never {
  if (isApiRequest(request))
    throw apiErrorResponse(404, "not_found", inCourse ? "There is no such lab in this course." : "There is no such lab.");
  throw data("Not found", { status: 404 });
}

/**
 * The viewer's access and the lab, for a route about one lab. `courseId` is the address's course;
 * without one (the API's /labs/:labId addresses) the lab names it. `load` reads the lab in the shape
 * the route needs; without it the route gets the lab with its cohorts.
 */
export async function requireLabAccess(
  scope: RequestScope,
  address: { courseId?: string; labId: string | undefined },
  roles: readonly CourseRole[],
): Promise<{ access: CourseAccess; lab: LabWithCohorts }>;
export async function requireLabAccess<Lab extends LabGate>(
  scope: RequestScope,
  address: { courseId?: string; labId: string | undefined },
  roles: readonly CourseRole[],
  load: LabLoader<Lab>,
): Promise<{ access: CourseAccess; lab: Lab }>;
export async function requireLabAccess(
  scope: RequestScope,
  { courseId, labId }: { courseId?: string; labId: string | undefined },
  roles: readonly CourseRole[],
  load?: LabLoader<LabGate>,
): Promise<{ access: CourseAccess; lab: LabGate }> {
  const inCourse = courseId !== undefined;
  let addressed: LabWithCohorts | null = null;
  if (!inCourse) {
    await requireApiUser(scope);
    addressed = isEntityId(labId) ? await addressedLab(scope, labId) : null;
    if (!addressed) noSuchLab(scope.request, false);
  }
  const access = await requireCourseRole(scope, courseId ?? addressed!.courseId, roles);
  const lab = !isEntityId(labId) ? null : load ? await load(db, access.course.id, labId) : (addressed ?? (await findLab(db, labId)));
  if (!lab || lab.courseId !== access.course.id) noSuchLab(scope.request, inCourse);
  const refusal = labRefusal(access, lab);
  if (refusal === "no_such_lab") noSuchLab(scope.request, inCourse);
  // A member of none of the lab's cohorts: the cohort check refuses, and records the refusal, as it does elsewhere.
  if (refusal === "not_in_cohort") await requireCohortAccess(scope, access.course.id, lab.cohortIds[0] ?? "no-cohort", roles);
  return { access, lab };
}
