/**
 * The router context carries what every check of a request needs, looked up once: the session (the
 * root middleware's), the viewer's course access (the course frame's middleware, shared by the frame's
 * loader and the page's, which run side by side) and, under /api/v1/labs/:labId, the lab the address
 * names (its middleware's). A course page runs one session and one access query.
 */
import pg from "pg";
import { beforeAll, describe, expect, it, vi } from "vitest";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";

let handle: AppHandler;
let fixture: AccessFixture;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("context");
});

const textOf = (query: unknown) => (typeof query === "string" ? query : ((query as { text?: string })?.text ?? ""));
// The course-access statement of app/server/auth/access.server.ts: the course joined to the viewer's membership.
const isAccessQuery = (text: string) => /from "courses" left join "course_memberships"/.test(text);
// The session statement of app/server/auth/session.server.ts, and the lab lookup of app/server/labs/labs.server.ts by id alone.
const isSessionQuery = (text: string) => /^select .* from "sessions" inner join "users"/.test(text);
const isLabByIdQuery = (text: string) => /^select .* from "labs" where "labs"\."id" = \$1$/.test(text);

async function queriesOf(path: string, cookie: string) {
  const spy = vi.spyOn(pg.Client.prototype, "query");
  try {
    const response = await handle(appRequest(path, { cookie }));
    const texts = spy.mock.calls.map(([query]) => textOf(query));
    const count = (test: (text: string) => boolean) => texts.filter(test).length;
    return {
      status: response.status,
      accessQueries: count(isAccessQuery),
      sessionQueries: count(isSessionQuery),
      labLookups: count(isLabByIdQuery),
    };
  } finally {
    spy.mockRestore();
  }
}

describe("the course frame's request context", () => {
  it.each([
    ["the kits page", "/courses/:c/kits", "instructor"],
    ["the lab dashboard", "/courses/:c/labs/:l/dashboard", "instructor"],
    ["the student's lab page", "/courses/:c/labs/:l", "ownStudent"],
  ] as const)("%s runs one access query, frame and page together", async (_name, pattern, actor) => {
    const cookie = await sessionCookieFor(fixture.userIds[actor]);
    const path = pattern.replace(":c", fixture.courseId).replace(":l", fixture.labId);
    expect(await queriesOf(path, cookie)).toMatchObject({ status: 200, accessQueries: 1, sessionQueries: 1 });
  });

  it.each([
    ["the class comparison", "/api/v1/labs/:l/class-comparison", "instructor"],
    ["the marks", "/api/v1/labs/:l/marks", "instructor"],
    ["the drop logs", "/api/v1/labs/:l/drop-logs", "ownStudent"],
  ] as const)("the API's %s of a lab finds the lab by its address once and runs one access query", async (_name, pattern, actor) => {
    const cookie = await sessionCookieFor(fixture.userIds[actor]);
    const path = pattern.replace(":l", fixture.labId);
    expect(await queriesOf(path, cookie)).toEqual({ status: 200, accessQueries: 1, sessionQueries: 1, labLookups: 1 });
  });

  it("still refuses a student the staff pages, the role being each loader's own check", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    expect((await queriesOf(`/courses/${fixture.courseId}/kits`, cookie)).status).toBe(403);
  });
});
