/**
 * The course frame's middleware looks the viewer's course access up once per request, for the frame's
 * loader and the page's to share (they run side by side): a course page runs one access query.
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
const isAccessQuery = (text: string) => /from courses c\s+left join course_memberships m/.test(text);

async function accessQueriesOf(path: string, cookie: string) {
  const spy = vi.spyOn(pg.Client.prototype, "query");
  try {
    const response = await handle(appRequest(path, { cookie }));
    return { status: response.status, accessQueries: spy.mock.calls.filter(([query]) => isAccessQuery(textOf(query))).length };
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
    expect(await accessQueriesOf(path, cookie)).toEqual({ status: 200, accessQueries: 1 });
  });

  it("still refuses a student the staff pages, the role being each loader's own check", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    expect((await accessQueriesOf(`/courses/${fixture.courseId}/kits`, cookie)).status).toBe(403);
  });
});
