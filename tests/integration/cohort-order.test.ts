/**
 * The instructor's order of cohorts: a new cohort goes last, "Earlier" and "Later" swap neighbours, the
 * order holds on every list (here the settings page and the lab form), and a cohort of another course is refused.
 */
import { asc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { cohorts } from "~/db/schema";
import { db } from "~/server/db.server";
import { getLabFormOptions } from "~/server/labs/labs.server";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let other: AccessFixture;
let handle: AppHandler;
let instructor: string;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("cohort-order");
  other = await createAccessFixture("cohort-order-other");
  instructor = await sessionCookieFor(fixture.userIds.instructor);
});

const settings = (form: Record<string, string>) =>
  handle(appRequest(`/courses/${fixture.courseId}/settings`, { cookie: instructor, form }));
const names = async () =>
  (
    await db
      .select({ name: cohorts.name })
      .from(cohorts)
      .where(eq(cohorts.courseId, fixture.courseId))
      .orderBy(asc(cohorts.position), asc(cohorts.name))
  ).map((row) => row.name);
const idOf = async (name: string) =>
  (await db.select({ id: cohorts.id, name: cohorts.name }).from(cohorts).where(eq(cohorts.courseId, fixture.courseId))).find(
    (row) => row.name === name,
  )!.id;

describe("the order of cohorts", () => {
  it("adds new cohorts at the end, not in alphabetical order", async () => {
    const before = await names();
    expect((await settings({ intent: "add-cohort", name: "Zebra bench" })).status).toBe(200);
    expect((await settings({ intent: "add-cohort", name: "Apple bench" })).status).toBe(200);
    expect(await names()).toEqual([...before, "Zebra bench", "Apple bench"]);
  });

  it("moves a cohort one place earlier or later, and not past either end", async () => {
    const before = await names();
    expect((await settings({ intent: "move-cohort", cohortId: await idOf("Apple bench"), direction: "up" })).status).toBe(200);
    expect(await names()).toEqual([...before.slice(0, -2), "Apple bench", "Zebra bench"]);
    expect((await settings({ intent: "move-cohort", cohortId: await idOf("Zebra bench"), direction: "down" })).status).toBe(200);
    expect(await names()).toEqual([...before.slice(0, -2), "Apple bench", "Zebra bench"]);
    const first = before[0];
    expect((await settings({ intent: "move-cohort", cohortId: await idOf(first), direction: "up" })).status).toBe(200);
    expect((await names())[0]).toBe(first);
    // The lab form lists them in the same order.
    expect((await getLabFormOptions(db, fixture.courseId)).cohorts.map((cohort) => cohort.name)).toEqual(await names());
  });

  it("refuses to move a cohort of another course", async () => {
    const [foreign] = await db.select({ id: cohorts.id }).from(cohorts).where(eq(cohorts.courseId, other.courseId));
    expect((await settings({ intent: "move-cohort", cohortId: foreign.id, direction: "down" })).status).toBe(404);
  });
});
