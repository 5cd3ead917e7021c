/**
 * Course settings through the built app: renaming a cohort names one of the course's own, or changes
 * nothing and says so.
 */
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { cohorts } from "~/db/schema";
import { db } from "~/server/db.server";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let handle: AppHandler;
let cookie: string;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("course-settings");
  cookie = await sessionCookieFor(fixture.userIds.instructor);
});

const rename = (cohortId: string, name: string) =>
  handle(appRequest(`/courses/${fixture.courseId}/settings`, { cookie, form: { intent: "rename-cohort", cohortId, name } }));
const nameOf = async (cohortId: string) => (await db.select({ name: cohorts.name }).from(cohorts).where(eq(cohorts.id, cohortId)))[0]?.name;

describe("renaming a cohort", () => {
  it("refuses a cohort of another course with 404, and renames nothing", async () => {
    const [foreign] = await db.insert(cohorts).values({ courseId: fixture.otherCourseId, name: "Their cohort" }).returning();
    const response = await rename(foreign.id, "Taken over");
    expect(response.status).toBe(404);
    const page = await response.text();
    expect(page).toContain("There is no such cohort in this course.");
    expect(page).not.toContain("Saved.");
    expect(await nameOf(foreign.id)).toBe("Their cohort");
  });

  it("refuses an id that is no cohort at all with 404", async () => {
    expect((await rename(randomUUID(), "Nobody")).status).toBe(404);
  });

  it("refuses the name of another cohort of the course with 400, and renames one of its own", async () => {
    expect((await rename(fixture.cohortId, "Cohort two")).status).toBe(400);
    expect(await nameOf(fixture.cohortId)).toBe("Cohort one");
    const renamed = await rename(fixture.cohortId, "Tuesday bench");
    expect(renamed.status).toBe(200);
    expect(await renamed.text()).toContain("Saved.");
    expect(await nameOf(fixture.cohortId)).toBe("Tuesday bench");
  });
});
