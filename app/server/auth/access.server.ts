/**
 * Who may do what. Every loader and action calls one of the `require…` helpers itself: loaders run
 * in parallel, so a parent route never protects its children. The helpers throw a redirect to the
 * sign-in page (anonymous), or a 403 (signed in without the right role), which the root error page
 * explains. Under /api/ they throw JSON errors instead.
 *
 * Staff cannot act as a student: there is no "view as" mode.
 */
import { and, eq, isNull, sql } from "drizzle-orm";
import { createContext, data, redirect, type MiddlewareFunction, type RouterContextProvider } from "react-router";
import { cohorts, courseMemberships, courses, taCohortAssignments } from "~/db/schema";
import { recordAudit } from "~/server/audit.server";
import { db } from "~/server/db.server";
import { preparedStatement } from "~/server/prepared-statements.server";
import { apiErrorResponse, isApiRequest } from "./api-errors.server";
import { authenticateApiToken, readBearerToken } from "./api-tokens.server";
import { readRequestSession, type SessionUser, type SessionValidation } from "./session.server";
import { isEntityId } from "~/lib/forms/ids";

export type CourseRole = "instructor" | "ta" | "student";
export const staffRoles = ["instructor", "ta"] as const satisfies readonly CourseRole[];
export const anyRole = ["instructor", "ta", "student"] as const satisfies readonly CourseRole[];

/** The person behind a request: from a session cookie, or from a personal API token on /api/. */
export type SignedInUser = SessionUser & { sessionId: string | null; via: "session" | "api-token" };

export type CourseAccess = {
  user: SignedInUser;
  course: { id: string; title: string; code: string; term: string; timeZone: string; archivedAt: Date | null };
  membership: { id: string; role: CourseRole; cohortId: string | null };
  /** Cohorts whose students this member may see: all for instructors, the assigned ones for TAs, their own for students. */
  cohortIds: string[];
};

/** What a loader or action is given, as the access checks need it: the request and its router context. */
export type RequestScope = { request: Request; context: Readonly<RouterContextProvider> };

/** The owner of a piece of student work (a membership, a drop log…), as the access check needs it. */
export type StudentOwner = { userId: string; cohortId: string | null };

/**
 * The request's session and signed-in user, each looked up at most once per request and kept in the
 * router context: the root middleware asks for the session, and every check after reads it from there.
 * Each is looked up when first asked for, so a promise nobody awaits never exists to fail unheard.
 */
type Viewer = { session?: Promise<SessionValidation | null>; user?: Promise<SignedInUser | null> };
const viewerContext = createContext<Viewer | null>(null);

function viewerOf({ context }: RequestScope): Viewer {
  let viewer = context.get(viewerContext);
  if (!viewer) {
    viewer = {};
    context.set(viewerContext, viewer);
  }
  return viewer;
}

/** The session the request's cookie names, or null. */
export function getSession(scope: RequestScope): Promise<SessionValidation | null> {
  const viewer = viewerOf(scope);
  viewer.session ??= readRequestSession(scope.request);
  return viewer.session;
}

async function resolveUser(scope: RequestScope): Promise<SignedInUser | null> {
  const bearer = isApiRequest(scope.request) ? readBearerToken(scope.request) : null;
  if (bearer !== null) {
    const user = await authenticateApiToken(bearer);
    return user ? { ...user, sessionId: null, via: "api-token" } : null;
  }
  const validation = await getSession(scope);
  return validation ? { ...validation.user, sessionId: validation.session.id, via: "session" } : null;
}

/** The signed-in user (by session cookie, or by personal API token on /api/), or null. */
export function getOptionalUser(scope: RequestScope): Promise<SignedInUser | null> {
  const viewer = viewerOf(scope);
  viewer.user ??= resolveUser(scope);
  return viewer.user;
}

/** The page to come back to after signing in, without React Router's `.data` suffix. */
function returnPath(request: Request): string {
  const url = new URL(request.url);
  const path = url.pathname.replace(/\/_root\.data$/, "/").replace(/\.data$/, "");
  url.searchParams.delete("_routes");
  const search = url.searchParams.toString();
  return search ? `${path}?${search}` : path;
}

export async function requireUser(scope: RequestScope): Promise<SignedInUser> {
  const { request } = scope;
  const user = await getOptionalUser(scope);
  if (user) return user;
  if (isApiRequest(request))
    throw apiErrorResponse(401, "unauthenticated", "Sign in, or send a personal API token as `Authorization: Bearer …`.");
  throw redirect(`/sign-in?${new URLSearchParams({ redirectTo: returnPath(request) })}`);
}

/** For /api/v1 routes: a session cookie or a personal API token; errors are JSON. */
export const requireApiUser = requireUser;

async function deny(request: Request, user: SignedInUser, courseId: string | null, reason: string): Promise<never> {
  await recordAudit(db, {
    action: "access.denied",
    actorId: user.id,
    courseId,
    subject: `path:${new URL(request.url).pathname}`,
    detail: { method: request.method, reason },
    request,
  });
  if (isApiRequest(request)) throw apiErrorResponse(403, "forbidden", "You have no access to this.");
  throw data("Forbidden", { status: 403 });
}

function notFound(request: Request): never {
  if (isApiRequest(request)) throw apiErrorResponse(404, "not_found", "There is nothing at this address.");
  throw data("Not found", { status: 404 });
}

/**
 * The course and the user's active membership in it, with the cohorts that membership opens, in one
 * query that every course page and API call runs: built once, and a named statement where the switch allows.
 */
const courseAccessLookup = preparedStatement("course_access", (name) =>
  db
    .select({
      course: {
        id: courses.id,
        title: courses.title,
        code: courses.code,
        term: courses.term,
        timeZone: courses.timeZone,
        archivedAt: courses.archivedAt,
      },
      membershipId: courseMemberships.id,
      role: courseMemberships.role,
      cohortId: courseMemberships.cohortId,
      cohortIds: sql<string[]>`case ${courseMemberships.role}
        when 'instructor' then array(select ${cohorts.id} from ${cohorts} where ${cohorts.courseId} = ${courses.id})
        when 'ta' then array(select ${taCohortAssignments.cohortId} from ${taCohortAssignments} where ${taCohortAssignments.membershipId} = ${courseMemberships.id})
        else array_remove(array[${courseMemberships.cohortId}], null)
      end::text[]`,
    })
    .from(courses)
    .leftJoin(
      courseMemberships,
      and(
        eq(courseMemberships.courseId, courses.id),
        eq(courseMemberships.userId, sql.placeholder("userId")),
        isNull(courseMemberships.removedAt),
      ),
    )
    .where(eq(courses.id, sql.placeholder("courseId")))
    .prepare(name),
);

async function loadCourseAccess(userId: string, courseId: string) {
  const [row] = await courseAccessLookup().execute({ userId, courseId });
  return row;
}
type CourseAccessRow = Awaited<ReturnType<typeof loadCourseAccess>>;

/**
 * The viewer's access to one course, looked up once per request: the course frame's middleware starts
 * the lookup, and the frame's loader and the page's (which run side by side) share it through the
 * router context. A role is still checked by each loader and action for itself.
 */
const courseAccessContext = createContext<{ userId: string; courseId: string; row: Promise<CourseAccessRow | undefined> } | null>(null);

function courseAccessRow({ context }: RequestScope, userId: string, courseId: string): Promise<CourseAccessRow | undefined> {
  const known = context.get(courseAccessContext);
  if (known?.userId === userId && known.courseId === courseId) return known.row;
  const row = loadCourseAccess(userId, courseId);
  context.set(courseAccessContext, { userId, courseId, row });
  return row;
}

/** Starts the signed-in viewer's access lookup for a course, for the checks that follow to share; never throws. */
export async function beginCourseAccess(scope: RequestScope, courseId: string | undefined): Promise<void> {
  const user = await getOptionalUser(scope);
  // Started, not awaited: a refusal is for the loaders to answer, each with its own roles.
  if (user && courseId && isEntityId(courseId)) courseAccessRow(scope, user.id, courseId).catch(() => undefined);
}

/** The course frame's middleware: resolves the viewer's access to the course before its loaders run. */
export const courseAccessMiddleware: MiddlewareFunction<Response> = async ({ request, params, context }, next) => {
  await beginCourseAccess({ request, context }, params.courseId);
  return next();
};

/** Reading methods: everything else changes something, which an archived course refuses. */
const readingMethods = new Set(["GET", "HEAD", "OPTIONS"]);

function refuseArchived(request: Request): never {
  const message = "This course is archived and read-only. An instructor can restore it in the course settings.";
  if (isApiRequest(request)) throw apiErrorResponse(409, "course_archived", message);
  throw data(message, { status: 409 });
}

/**
 * The user's membership in the course, if it has one of `roles`; otherwise a redirect or a 403. In an
 * archived course every change is refused with a 409, except by the one action that restores it
 * (`whileArchived`).
 */
export async function requireCourseRole(
  scope: RequestScope,
  courseId: string | undefined,
  roles: readonly CourseRole[],
  { whileArchived = false }: { whileArchived?: boolean } = {},
): Promise<CourseAccess> {
  const { request } = scope;
  const user = await requireUser(scope);
  if (!courseId || !isEntityId(courseId)) notFound(request);
  const row = await courseAccessRow(scope, user.id, courseId);
  if (!row) notFound(request);
  if (!row.membershipId || !row.role) return deny(request, user, courseId, "not a member");
  if (!roles.includes(row.role)) return deny(request, user, courseId, `role ${row.role}`);
  if (row.course.archivedAt && !whileArchived && !readingMethods.has(request.method)) refuseArchived(request);
  return {
    user,
    course: row.course,
    membership: { id: row.membershipId, role: row.role, cohortId: row.cohortId },
    cohortIds: row.cohortIds,
  };
}

/** Staff of the course who may see this cohort: its instructors, and the TAs assigned to it. */
export async function requireCohortAccess(
  scope: RequestScope,
  courseId: string | undefined,
  cohortId: string | undefined,
  roles: readonly CourseRole[] = staffRoles,
): Promise<CourseAccess> {
  const access = await requireCourseRole(scope, courseId, roles);
  if (!cohortId || !access.cohortIds.includes(cohortId)) return deny(scope.request, access.user, access.course.id, "cohort not assigned");
  return access;
}

/** Whether a member may see a student's own work: the student, the course's instructors, the TAs of the student's cohort. */
export function canSeeStudentWork(access: CourseAccess, owner: StudentOwner): boolean {
  if (access.user.id === owner.userId || access.membership.role === "instructor") return true;
  return access.membership.role === "ta" && owner.cohortId !== null && access.cohortIds.includes(owner.cohortId);
}

/**
 * Whether a staff member may open a kit's page: instructors any kit, TAs the kits held by students of
 * their cohorts (a kit on the shelf has no holder and so no cohort). Pages link a kit only when this holds.
 */
export function canOpenKit(access: CourseAccess, holderCohortId: string | null | undefined): boolean {
  if (access.membership.role === "instructor") return true;
  return access.membership.role === "ta" && holderCohortId != null && access.cohortIds.includes(holderCohortId);
}

/** The holder cohorts a staff member's kit lists and counts are narrowed to: none for instructors (every kit), the assigned ones for TAs. */
export const kitCohortScope = (access: CourseAccess): string[] | undefined =>
  access.membership.role === "instructor" ? undefined : access.cohortIds;

/** Access to one student's own object (a hand-in, their membership…); `viewingOwnWork` tells the student apart from staff. */
export async function requireStudentAccess(
  scope: RequestScope,
  courseId: string | undefined,
  owner: StudentOwner,
): Promise<CourseAccess & { viewingOwnWork: boolean }> {
  const access = await requireCourseRole(scope, courseId, anyRole);
  if (!canSeeStudentWork(access, owner)) return deny(scope.request, access.user, access.course.id, "another student's work");
  return { ...access, viewingOwnWork: access.user.id === owner.userId };
}

/** Instructors and TAs of the course. */
export const isStaff = (access: CourseAccess) => access.membership.role !== "student";
