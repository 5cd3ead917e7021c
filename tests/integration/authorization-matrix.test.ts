/**
 * The authorization matrix: every route of the built app, for every kind of person, with the status
 * each must get. Requests go through React Router's own request handler in process, with real session
 * cookies. The test fails when the app has a route the matrix does not list: a new route adds its rows
 * here, one line per path and method, usually with one of the presets below.
 */
import { beforeAll, describe, expect, it } from "vitest";
import type { ServerBuild } from "react-router";
import { appRequest, createAppHandler, loadBuild, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { db } from "~/server/db.server";
import { reportKitProblem } from "~/server/kits/kit-problems.server";
import { type AccessFixture, type Actor, actors, createAccessFixture } from "../support/access-fixture";

type Expectation = Record<Actor, number>;
type Method = "GET" | "POST";
type MatrixRow = { method: Method; path: string; expect: Expectation; query?: string; form?: Record<string, string> };

const students = { ownStudent: 0, sameCohortStudent: 0, otherCohortStudent: 0 };
const fill = <T extends Record<string, number>>(keys: T, status: number) =>
  Object.fromEntries(Object.keys(keys).map((key) => [key, status])) as Record<keyof T, number>;

// Presets: the status for those who may, and what everybody else gets (302 to the sign-in page, or 403).
const everyone = (status: number): Expectation => Object.fromEntries(actors.map((actor) => [actor, status])) as Expectation;
const signedIn = (status: number): Expectation => ({ ...everyone(status), anonymous: 302 });
/** Pages for people who are not signed in yet; signed-in people are sent on (302). */
const signedOutOnly = (status: number): Expectation => ({ ...everyone(302), anonymous: status });
const anyMember = (status: number): Expectation => ({ ...signedIn(status), otherInstructor: 403 });
const staffOnly = (status: number): Expectation => ({ ...anyMember(status), ...fill(students, 403) });
const instructorOnly = (status: number): Expectation => ({ ...signedIn(403), instructor: status });
const studentsOnly = (status: number): Expectation => ({ ...signedIn(403), ...fill(students, status) });
/** An object belonging to `ownStudent` (cohort one), for its owner and the staff of cohort one. */
const ownWork = (status: number): Expectation => ({ ...signedIn(403), ownStudent: status, assignedTa: status, instructor: status });
/** Like ownWork, but for staff only (a kit held by `ownStudent`). */
const cohortStaff = (status: number): Expectation => ({ ...ownWork(status), ownStudent: 403 });
/** Instructor accounts (may open courses), whichever course they teach. */
const courseCreators = (status: number): Expectation => ({ ...signedIn(403), instructor: status, otherInstructor: status });

// A form no action accepts: allowed people get the action's 400 (nothing changes), others their 302/403.
const probe = { intent: "authorization-matrix-probe" };
const row = (method: Method, path: string, expect: Expectation, extra: Partial<MatrixRow> = {}): MatrixRow => ({
  method,
  path,
  expect,
  ...extra,
});

const matrix: MatrixRow[] = [
  row("GET", "/", everyone(200)),
  row("GET", "/healthz", everyone(200)),
  row("GET", "/sign-in", signedOutOnly(200)),
  // A failed form re-runs the loader, which sends signed-in people on.
  row("POST", "/sign-in", signedOutOnly(400), { form: { intent: "password" } }),
  row("GET", "/sign-in/link/:token", everyone(200)),
  row("POST", "/sign-in/link/:token", everyone(410)),
  row("GET", "/sign-up", signedOutOnly(200)),
  row("POST", "/sign-up", signedOutOnly(400)),
  row("GET", "/sign-out", signedIn(200)),
  row("POST", "/sign-out", everyone(302)),
  row("GET", "/forgot-password", everyone(200)),
  row("POST", "/forgot-password", everyone(400)),
  row("GET", "/reset-password/:token", everyone(200)),
  row("POST", "/reset-password/:token", everyone(400)),
  row("GET", "/invitations/:token", everyone(404)),
  row("POST", "/invitations/:token", everyone(410)),
  row("GET", "/account", signedIn(200)),
  row("POST", "/account", signedIn(400)),
  row("GET", "/courses/new", courseCreators(200)),
  row("POST", "/courses/new", courseCreators(400)),
  row("GET", "/courses/:courseId", anyMember(200)),
  row("GET", "/courses/:courseId/settings", instructorOnly(200)),
  row("POST", "/courses/:courseId/settings", instructorOnly(400)),
  // Archiving (unconfirmed: 400) and restoring (the course is not archived: 409) are the instructors'.
  row("POST", "/courses/:courseId/settings", instructorOnly(400), { form: { intent: "archive" } }),
  row("POST", "/courses/:courseId/settings", instructorOnly(409), { form: { intent: "restore" } }),
  // Starting next term from the course is the instructors'.
  row("GET", "/courses/:courseId/carry-over", instructorOnly(200)),
  row("POST", "/courses/:courseId/carry-over", instructorOnly(400)),
  row("GET", "/courses/:courseId/members", instructorOnly(200)),
  row("POST", "/courses/:courseId/members", instructorOnly(400)),
  row("GET", "/courses/:courseId/members/:membershipId", ownWork(200)),
  row("POST", "/courses/:courseId/members/:membershipId", instructorOnly(400)),
  // A student's record: the instructors and the TAs of the student's cohort (not the student: they have their own pages).
  row("GET", "/courses/:courseId/members/:membershipId/record", cohortStaff(200)),
  // Roster updates mid-term: each new intent is for instructors only (a malformed form: 400, nothing changes).
  row("POST", "/courses/:courseId/members", instructorOnly(400), { form: { intent: "resend-invitation", invitationId: "not-an-id" } }),
  row("POST", "/courses/:courseId/members", instructorOnly(400), { form: { intent: "revoke-invitation", invitationId: "not-an-id" } }),
  row("POST", "/courses/:courseId/members/:membershipId", instructorOnly(400), {
    form: { intent: "student-number", studentNumber: "no;such" },
  }),
  row("GET", "/courses/:courseId/roster", instructorOnly(200)),
  row("POST", "/courses/:courseId/roster", instructorOnly(400)),
  row("GET", "/courses/:courseId/audit", instructorOnly(200)),
  row("GET", "/courses/:courseId/kits", staffOnly(200)),
  row("POST", "/courses/:courseId/kits", instructorOnly(400)),
  row("GET", "/courses/:courseId/kits/new", instructorOnly(200)),
  row("POST", "/courses/:courseId/kits/new", instructorOnly(400)),
  // Kits not back after the return-by date: staff (a TA sees their cohorts' kits), read-only.
  row("GET", "/courses/:courseId/kits/overdue", staffOnly(200)),
  // Checking kits in at the bench is the instructors'; the probe names no kits: 400.
  row("GET", "/courses/:courseId/kits/check-in", instructorOnly(200)),
  row("POST", "/courses/:courseId/kits/check-in", instructorOnly(400)),
  row("GET", "/courses/:courseId/kits/:kitId", cohortStaff(200)),
  row("POST", "/courses/:courseId/kits/:kitId", instructorOnly(400)),
  row("GET", "/courses/:courseId/kits/:kitId/packing-slip", instructorOnly(200)),
  // Shipping names students and buys labels: instructors only. The probe names no known intent: 400.
  row("GET", "/courses/:courseId/shipments", instructorOnly(200)),
  row("GET", "/courses/:courseId/shipments/new", instructorOnly(200)),
  row("POST", "/courses/:courseId/shipments/new", instructorOnly(400)),
  row("GET", "/courses/:courseId/shipments/:shipmentId", instructorOnly(200)),
  row("POST", "/courses/:courseId/shipments/:shipmentId", instructorOnly(400)),
  // Kit problems: read by the staff who may open the kit (a TA, their cohorts' students'), changed by instructors.
  row("GET", "/courses/:courseId/kits/problems", staffOnly(200)),
  row("GET", "/courses/:courseId/kits/problems/:problemId", cohortStaff(200)),
  row("POST", "/courses/:courseId/kits/problems/:problemId", instructorOnly(400)),
  row("GET", "/courses/:courseId/kits/tracking-import", instructorOnly(200)),
  row("POST", "/courses/:courseId/kits/tracking-import", instructorOnly(400)),
  row("GET", "/courses/:courseId/kits/tracking-template.csv", instructorOnly(200)),
  // Every label and slip of a shipment, with the students' addresses: the instructors' alone.
  row("GET", "/courses/:courseId/shipments/:shipmentId/print.pdf", instructorOnly(200)),
  row("GET", "/courses/:courseId/parts", staffOnly(200)),
  row("GET", "/courses/:courseId/parts/new", instructorOnly(200)),
  row("POST", "/courses/:courseId/parts/new", instructorOnly(400)),
  row("GET", "/courses/:courseId/parts/import", instructorOnly(200)),
  row("POST", "/courses/:courseId/parts/import", instructorOnly(400)),
  row("GET", "/courses/:courseId/parts/:partId", staffOnly(200)),
  row("POST", "/courses/:courseId/parts/:partId", instructorOnly(400)),
  // Only ownStudent holds a kit; the other students have none to report on.
  row("GET", "/courses/:courseId/my-kit", studentsOnly(200)),
  row("POST", "/courses/:courseId/my-kit", { ...studentsOnly(404), ownStudent: 400 }),
  // A student's own address: nobody else's is reached through it, and staff have none here (403, not an empty page).
  row("GET", "/courses/:courseId/my-address", studentsOnly(200)),
  row("POST", "/courses/:courseId/my-address", studentsOnly(400)),
  // The fixture's students have entered no address: nothing to download.
  row("GET", "/courses/:courseId/my-address.json", studentsOnly(404)),
  row("GET", "/courses/:courseId/addresses/import", instructorOnly(200)),
  row("POST", "/courses/:courseId/addresses/import", instructorOnly(400)),
  row("GET", "/courses/:courseId/addresses/template.csv", instructorOnly(200)),
  row("GET", "/courses/:courseId/labs", anyMember(200)),
  row("GET", "/courses/:courseId/labs/new", instructorOnly(200)),
  row("POST", "/courses/:courseId/labs/new", instructorOnly(400)),
  row("GET", "/courses/:courseId/labs/:labId/edit", instructorOnly(200)),
  row("POST", "/courses/:courseId/labs/:labId/edit", instructorOnly(400)),
  // Hand-in progress names students: instructors, and the TAs of a cohort the lab is set for.
  row("GET", "/courses/:courseId/labs/:labId/dashboard", cohortStaff(200)),
  // Extensions name students and say why: read by instructors and the TAs of a cohort the lab is set for
  // (theirs only); set and removed by instructors alone. The probe names no known intent: 400.
  row("GET", "/courses/:courseId/labs/:labId/extensions", cohortStaff(200)),
  row("POST", "/courses/:courseId/labs/:labId/extensions", instructorOnly(400)),
  // Students of the lab's cohort (with or without a kit); staff are sent on to the lab's dashboard.
  row("GET", "/courses/:courseId/labs/:labId", { ...anyMember(302), ownStudent: 200, sameCohortStudent: 200, otherCohortStudent: 403 }),
  row("POST", "/courses/:courseId/labs/:labId", { ...signedIn(403), ownStudent: 400, sameCohortStudent: 400 }),
  // The probe is not multipart: those who may upload get 400.
  row("POST", "/courses/:courseId/labs/:labId/photos", { ...signedIn(403), ownStudent: 400, sameCohortStudent: 400 }),
  row("GET", "/courses/:courseId/photos/:photoId", ownWork(200)),
  // Only a student takes a photo off their own draft (the probe is no removal: 400); staff may not.
  row("POST", "/courses/:courseId/photos/:photoId", studentsOnly(400)),
  // The class comparison names students: instructors, and the TAs of a cohort the lab is set for.
  row("GET", "/courses/:courseId/labs/:labId/comparison", cohortStaff(200)),
  // The probe's intent is unknown: 400 for the staff who may preview (saving is the instructor's).
  row("POST", "/courses/:courseId/labs/:labId/comparison", cohortStaff(400)),
  row("GET", "/courses/:courseId/labs/:labId/comparison.csv", cohortStaff(200)),
  // Marks name students: instructors, and the TAs of a cohort the lab is set for (their cohorts' rows).
  row("GET", "/courses/:courseId/labs/:labId/marks.csv", cohortStaff(200)),
  row("GET", "/courses/:courseId/labs/:labId/marks-summary.csv", cohortStaff(200)),
  // One hand-in with every version: instructors and the TAs of the student's cohort (the student has their lab page).
  row("GET", "/courses/:courseId/labs/:labId/hand-ins/:dropLogId", cohortStaff(200)),
  // The marking desk: instructors, and the TAs of a cohort the lab is set for. The probe is not JSON: 400.
  row("GET", "/courses/:courseId/labs/:labId/marking", cohortStaff(200)),
  row("POST", "/courses/:courseId/labs/:labId/marking", cohortStaff(400)),
  // One student's marking view (ownStudent, of cohort one): instructors, and the TAs of the student's cohort.
  row("GET", "/courses/:courseId/labs/:labId/marking/students/:membershipId", cohortStaff(200)),
  // The rubric and moderation (release included) are the instructors'; the probe names no intent: 400.
  row("GET", "/courses/:courseId/labs/:labId/rubric", instructorOnly(200)),
  row("POST", "/courses/:courseId/labs/:labId/rubric", instructorOnly(400)),
  row("GET", "/courses/:courseId/labs/:labId/moderation", instructorOnly(200)),
  row("POST", "/courses/:courseId/labs/:labId/moderation", instructorOnly(400)),
  // Messages to students: instructors and TAs (a TA writes to, and sees the messages of, their cohorts only); the probe has no intent: 400.
  row("GET", "/courses/:courseId/messages", staffOnly(200)),
  row("GET", "/courses/:courseId/messages/new", staffOnly(200)),
  row("POST", "/courses/:courseId/messages/new", staffOnly(400)),
  row("GET", "/courses/:courseId/roster-template.csv", instructorOnly(200)),
  row("GET", "/courses/:courseId/parts/template.csv", instructorOnly(200)),
  row("GET", "/courses/:courseId/inventory.csv", staffOnly(200)),
  // A calendar feed needs no session: its token is the key, and an unknown token is a bare 404 for anyone.
  row("GET", "/calendar/:token.ics", everyone(404)),
  // The term mark book: staff (a TA sees their cohorts' students); its weights are the instructors'. The probe fails the form: 400.
  row("GET", "/courses/:courseId/mark-book", staffOnly(200)),
  row("GET", "/courses/:courseId/mark-book/settings", instructorOnly(200)),
  row("POST", "/courses/:courseId/mark-book/settings", instructorOnly(400)),
  row("GET", "/courses/:courseId/mark-book.csv", staffOnly(200)),
  row("GET", "/courses/:courseId/mark-book/oneroster-results.csv", staffOnly(200)),
  // A method an API address does not take is 405 for everyone: it says nothing about the data.
  row("GET", "/api/v1/me", { ...everyone(200), anonymous: 401 }),
  row("POST", "/api/v1/me", everyone(405)),
  // The probe is a form, not JSON: 400 for anyone signed in.
  row("POST", "/api/v1/reduce", { ...everyone(400), anonymous: 401 }),
  row("GET", "/api/v1/reduce", everyone(405)),
  row("GET", "/api/v1/labs/:labId", everyone(404)),
  row("GET", "/api/v1/labs/:labId/class-comparison", { ...cohortStaff(200), anonymous: 401 }),
  row("POST", "/api/v1/labs/:labId/class-comparison", everyone(405)),
  row("GET", "/api/v1/labs/:labId/marks", { ...cohortStaff(200), anonymous: 401 }),
  row("POST", "/api/v1/labs/:labId/marks", everyone(405)),
  row("GET", "/api/v1/courses/:courseId/labs", { ...anyMember(200), anonymous: 401 }),
  row("POST", "/api/v1/courses/:courseId/labs", everyone(405)),
  // The students of the lab's cohort (their own drop log, possibly none), its instructors and cohort TAs.
  row("GET", "/api/v1/labs/:labId/drop-logs", { ...cohortStaff(200), ownStudent: 200, sameCohortStudent: 200, anonymous: 401 }),
  // The probe has no Idempotency-Key: 400 for the students who may hand in; staff never hand in (403).
  row("POST", "/api/v1/labs/:labId/drop-logs", { ...signedIn(403), ownStudent: 400, sameCohortStudent: 400, anonymous: 401 }),
  row("GET", "/api/v1/labs/:labId/drop-logs/:dropLogId", { ...ownWork(200), anonymous: 401 }),
  row("POST", "/api/v1/labs/:labId/drop-logs/:dropLogId", everyone(405)),
  row("GET", "/api/v1/openapi.json", everyone(200)),
  row("POST", "/api/v1/openapi.json", everyone(405)),
  // The development inbox (demo builds only) is for whoever sits at this machine, which the handler's
  // requests come from; tests/integration/dev-inbox.test.ts shows it closed to every other address.
  row("GET", "/dev/inbox", everyone(200)),
  row("GET", "/api/dev/emails", everyone(200), { query: "?to=someone@matrix.example" }),
  // Unknown API addresses: the API's 404, whoever asks.
  row("GET", "/api/*", everyone(404)),
  row("POST", "/api/*", everyone(404)),
  row("GET", "/*", everyone(404)),
];

/** Every path and method the built app answers, from its route table (`routes`: id → { path, parentId, module }). */
function builtRoutes(build: ServerBuild): string[] {
  const fullPath = (id: string): string => {
    const route = build.routes[id]!;
    const parent = route.parentId ? fullPath(route.parentId) : "";
    return route.path ? `${parent.replace(/\/$/, "")}/${route.path}` : parent || "/";
  };
  const keys = new Set<string>();
  for (const [id, route] of Object.entries(build.routes)) {
    // The root's loader and layout run with every page and are checked by every row.
    if (!route || id === "root") continue;
    const module = route.module as { loader?: unknown; action?: unknown; default?: unknown };
    if (module.loader || module.default) keys.add(`GET ${fullPath(id)}`);
    if (module.action) keys.add(`POST ${fullPath(id)}`);
  }
  return [...keys].sort();
}

function concretePath(path: string, fixture: AccessFixture, problemId: string): string {
  const values: Record<string, string> = {
    problemId,
    courseId: fixture.courseId,
    membershipId: fixture.membershipIds.ownStudent,
    kitId: fixture.kitId,
    partId: fixture.partId,
    labId: fixture.labId,
    photoId: fixture.photoId,
    dropLogId: fixture.dropLogId,
    shipmentId: fixture.shipmentId,
    token: "not-a-real-token-aaaaaaaaaaaaaaaa",
  };
  return path
    .replace(/:(\w+)/g, (_, name: string) => {
      if (!(name in values)) throw new Error(`The matrix has no value for :${name}; add one to concretePath.`);
      return values[name];
    })
    .replace(/\/\*$/, "/no-such-page-here");
}

describe("authorization matrix", () => {
  let build: ServerBuild;
  let handle: AppHandler;
  let fixture: AccessFixture;
  let problemId: string;

  beforeAll(async () => {
    // Pinned so that the rows do not depend on the machine: open sign-up, mail to the local catcher.
    process.env.ALLOW_SIGN_UP = "true";
    delete process.env.RESEND_API_KEY;
    build = await loadBuild();
    handle = await createAppHandler();
    fixture = await createAccessFixture();
    ({ problemId } = await reportKitProblem(db, {
      courseId: fixture.courseId,
      kitId: fixture.kitId,
      actorId: fixture.userIds.ownStudent,
      partId: fixture.sphereId,
      problem: "damaged",
      note: "The sphere arrived chipped.",
    }));
  });

  it("lists every route of the built app, and no route that is gone", () => {
    const listed = new Set(matrix.map((entry) => `${entry.method} ${entry.path}`));
    const built = builtRoutes(build);
    expect(
      built.filter((key) => !listed.has(key)),
      "routes missing from the matrix",
    ).toEqual([]);
    expect(
      [...listed].filter((key) => !built.includes(key)),
      "matrix rows for routes that do not exist",
    ).toEqual([]);
  });

  it.each(matrix.map((entry) => [`${entry.method} ${entry.path}`, entry] as const))("%s", async (_name, entry) => {
    const path = concretePath(entry.path, fixture, problemId) + (entry.query ?? "");
    const actual = {} as Expectation;
    for (const actor of actors) {
      // A fresh session per request: some rows (sign-out) end the session they are sent with.
      const cookie = actor === "anonymous" ? null : await sessionCookieFor(fixture.userIds[actor]);
      const response = await handle(
        appRequest(path, { method: entry.method, cookie, form: entry.method === "POST" ? (entry.form ?? probe) : undefined }),
      );
      actual[actor] = response.status;
      if (
        response.status === 302 &&
        actor === "anonymous" &&
        entry.expect.anonymous === 302 &&
        !["/sign-out", "/sign-in"].includes(entry.path)
      ) {
        expect(response.headers.get("location"), `${actor} is sent to sign in`).toMatch(/^\/sign-in\?redirectTo=/);
      }
      await response.body?.cancel();
    }
    expect(actual).toEqual(entry.expect);
  });
});
