/**
 * Input the app cannot use is answered with 400, never 500: search parameters PostgreSQL or the page
 * cannot take (NUL, page numbers past any page), filters naming cohorts the viewer may not choose, and
 * API text with NUL or a lone UTF-16 surrogate (which jsonb refuses).
 */
import { randomUUID } from "node:crypto";
import { beforeAll, describe, expect, it } from "vitest";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let handle: AppHandler;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("bad-input");
  for (const actor of ["ownStudent", "assignedTa", "instructor"] as const) cookies[actor] = await sessionCookieFor(fixture.userIds[actor]);
});

const page = (f: AccessFixture) => ({
  kits: `/courses/${f.courseId}/kits`,
  parts: `/courses/${f.courseId}/parts`,
  marking: `/courses/${f.courseId}/labs/${f.labId}/marking`,
  comparison: `/courses/${f.courseId}/labs/${f.labId}/comparison`,
});
const twentyFiveDigits = "1234567890123456789012345";

describe("search parameters", () => {
  it.each([
    ["a NUL in the kit search", (f: AccessFixture) => `${page(f).kits}?q=%00`],
    ["page=Infinity on the kits", (f: AccessFixture) => `${page(f).kits}?page=Infinity`],
    ["a 25-digit page on the kits", (f: AccessFixture) => `${page(f).kits}?page=${twentyFiveDigits}`],
    ["a NUL in the part search", (f: AccessFixture) => `${page(f).parts}?search=%00`],
    ["page=Infinity on the parts", (f: AccessFixture) => `${page(f).parts}?page=Infinity`],
    ["a 25-digit page on the parts", (f: AccessFixture) => `${page(f).parts}?page=${twentyFiveDigits}`],
    ["a cohort the lab does not have, on the marking desk", (f: AccessFixture) => `${page(f).marking}?cohort=${randomUUID()}`],
    ["a cohort that is not a cohort id, on the marking desk", (f: AccessFixture) => `${page(f).marking}?cohort=%00`],
    ["a 25-digit page on the marking desk", (f: AccessFixture) => `${page(f).marking}?page=${twentyFiveDigits}`],
    ["a criterion of no rubric, on the marking desk", (f: AccessFixture) => `${page(f).marking}?criterion=${randomUUID()}`],
    ["a state the desk does not know", (f: AccessFixture) => `${page(f).marking}?status=late`],
    ["a NUL in the comparison's cohort", (f: AccessFixture) => `${page(f).comparison}?cohort=%00`],
  ])("answers %s with the 400 page", async (_, path) => {
    const response = await handle(appRequest(path(fixture), { cookie: cookies.instructor }));
    expect(response.status).toBe(400);
    expect(response.headers.get("content-type")).toMatch(/^text\/html/);
    expect(await response.text()).toContain("That request could not be understood");
  });

  it("answers a TA's filter for a cohort not assigned to them with 400", async () => {
    const response = await handle(appRequest(`${page(fixture).marking}?cohort=${fixture.otherCohortId}`, { cookie: cookies.assignedTa }));
    expect(response.status).toBe(400);
  });

  it("still opens the pages with good parameters", async () => {
    expect((await handle(appRequest(`${page(fixture).kits}?q=K-0&page=1`, { cookie: cookies.instructor }))).status).toBe(200);
    expect((await handle(appRequest(`${page(fixture).parts}?search=S-&page=2`, { cookie: cookies.instructor }))).status).toBe(200);
    expect(
      (await handle(appRequest(`${page(fixture).marking}?cohort=${fixture.cohortId}&page=1`, { cookie: cookies.assignedTa }))).status,
    ).toBe(200);
  });

  it("answers a NUL in the sign-in page's return address with 400, not a broken redirect", async () => {
    const response = await handle(appRequest("/sign-in?redirectTo=/courses%00", { cookie: cookies.instructor }));
    expect(response.status).toBe(400);
  });

  it("answers the API's bad query in the API's error shape", async () => {
    const response = await handle(appRequest(`/api/v1/labs/${fixture.labId}/class-comparison?cohort=%00`, { cookie: cookies.instructor }));
    expect(response.status).toBe(400);
    expect((await response.json()).error).toMatchObject({ code: "invalid_query", issues: [expect.objectContaining({ path: ["cohort"] })] });
  });
});

describe("text in API bodies", () => {
  const handIn = (notes: string) =>
    new Request(new URL(`/api/v1/labs/${fixture.labId}/drop-logs`, appOrigin()), {
      method: "POST",
      // Written out by hand: JSON.stringify would escape a lone surrogate the same way, but a NUL it writes as \u0000 too.
      body: `{"sphereId":"${fixture.sphereId}","temperatureC":22,"drops":[7.4,7.5,7.45],"notes":"${notes}"}`,
      headers: { "Content-Type": "application/json", "Idempotency-Key": randomUUID(), Origin: appOrigin(), Cookie: cookies.ownStudent },
    });

  it.each([
    ["a NUL", "before\\u0000after"],
    ["a lone surrogate", "half \\ud83d of an emoji"],
  ])("refuses notes with %s with 400 at the field", async (_, notes) => {
    const response = await handle(handIn(notes));
    expect(response.status).toBe(400);
    expect((await response.json()).error).toMatchObject({ code: "invalid_input", issues: [expect.objectContaining({ path: ["notes"] })] });
  });

  it("takes notes with a whole emoji", async () => {
    expect((await handle(handIn("bubbles \\ud83d\\ude00 at the top band"))).status).toBe(201);
  });
});
