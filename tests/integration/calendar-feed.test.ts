/**
 * Calendar feeds, read back with ical.js (an independent parser) through the built app: each person sees
 * their own labs with their own times, a student their extension and their kit's return-by day, and a
 * reset address stops working at once.
 */
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, cohorts, courseMemberships, courses, labCohorts, labExtensions, labs } from "~/db/schema";
import { db } from "~/server/db.server";
import { loadCalendarFeedRows, resetCalendarFeed } from "~/server/calendar/feed.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { eventByUid, parseFeed } from "../support/calendar-feed";
import { countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let handle: AppHandler;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
const at = (iso: string) => new Date(iso);
let bothCohortsLab: string;
let draftLab: string;
let otherCourseLab: string;
let archivedLab: string;

async function createLab(courseId: string, cohortIds: string[], values: Partial<typeof labs.$inferInsert> = {}) {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId,
      title: "Falling-ball viscometry",
      kind: "viscometry",
      status: "published",
      opensAt: at("2027-03-01T09:00:00Z"),
      dueAt: at("2027-03-20T17:00:00Z"),
      resolutions,
      ...values,
    })
    .returning();
  if (cohortIds.length) await db.insert(labCohorts).values(cohortIds.map((cohortId) => ({ labId: lab.id, cohortId })));
  return lab.id;
}

async function feedOf(userId: string) {
  const url = new URL(await resetCalendarFeed(userId));
  const response = await handle(appRequest(url.pathname));
  expect(response.status).toBe(200);
  return { url, response, ...parseFeed(await response.text()) };
}

beforeAll(async () => {
  fixture = await createAccessFixture("feed");
  handle = await createAppHandler();
  // The fixture's lab (cohort one): due 10 March with a cut-off on the 12th; ownStudent has until the 14th.
  await db
    .update(labs)
    .set({ title: "Drag on a steel sphere", dueAt: at("2027-03-10T17:00:00Z"), lateCutoffAt: at("2027-03-12T17:00:00Z") })
    .where(eq(labs.id, fixture.labId));
  await db.insert(labExtensions).values({
    labId: fixture.labId,
    membershipId: fixture.membershipIds.ownStudent,
    dueAt: at("2027-03-14T17:00:00Z"),
    lateCutoffAt: at("2027-03-15T17:00:00Z"),
    reason: "Kit arrived late",
  });
  // Set for both cohorts; cohort two has until the 22nd, and sameCohortStudent until the 25th (ownStudent keeps the class's).
  bothCohortsLab = await createLab(fixture.courseId, [fixture.cohortId, fixture.otherCohortId]);
  await db.insert(labExtensions).values([
    { labId: bothCohortsLab, cohortId: fixture.otherCohortId, dueAt: at("2027-03-22T17:00:00Z"), reason: "Field trip" },
    { labId: bothCohortsLab, membershipId: fixture.membershipIds.sameCohortStudent, dueAt: at("2027-03-25T17:00:00Z"), reason: "Ill" },
  ]);
  draftLab = await createLab(fixture.courseId, [fixture.cohortId], { status: "draft", title: "Draft lab" });
  await db.update(courses).set({ kitReturnBy: "2027-05-28" }).where(eq(courses.id, fixture.courseId));
  otherCourseLab = await createLab(fixture.otherCourseId, [], { title: "Another course's lab" });
  // ownStudent also belongs to an archived course with a lab for their cohort there: it is left out.
  const [archived] = await db
    .insert(courses)
    .values({ title: "Last term", code: "feed-OLD", term: "Old term", timeZone: "UTC", archivedAt: new Date(), kitReturnBy: "2026-12-01" })
    .returning();
  const [oldCohort] = await db.insert(cohorts).values({ courseId: archived.id, name: "Old cohort" }).returning();
  await db
    .insert(courseMemberships)
    .values({ courseId: archived.id, userId: fixture.userIds.ownStudent, role: "student", cohortId: oldCohort.id });
  archivedLab = await createLab(archived.id, [oldCohort.id], { title: "Old lab" });
});

describe("calendar feed", () => {
  it("gives a student their own due time and cut-off with the extension said, the class's elsewhere, and their kit's return-by day", async () => {
    const { response, events } = await feedOf(fixture.userIds.ownStudent);
    expect(response.headers.get("content-type")).toBe("text/calendar; charset=utf-8");
    expect(response.headers.get("cache-control")).toBe("private, no-store");

    const due = eventByUid(events, `${fixture.labId}-due@benchpost`)!;
    expect(due.summary).toBe("Due: Drag on a steel sphere (feed-A)");
    expect(due.start).toBe("2027-03-14T17:00:00.000Z");
    expect(due.description).toContain("This is your extension; the class is due Wed, 10 Mar 2027, 17:00 UTC.");
    expect(due.description).not.toContain("Kit arrived late");
    expect(due.url).toMatch(new RegExp(`/courses/${fixture.courseId}/labs/${fixture.labId}$`));
    expect(eventByUid(events, `${fixture.labId}-cutoff@benchpost`)!.start).toBe("2027-03-15T17:00:00.000Z");

    // Another student's extension and another cohort's move nothing for ownStudent.
    expect(eventByUid(events, `${bothCohortsLab}-due@benchpost`)!.start).toBe("2027-03-20T17:00:00.000Z");
    expect(eventByUid(events, `${bothCohortsLab}-cutoff@benchpost`)).toBeUndefined();

    const kit = eventByUid(events, `${fixture.kitId}-return@benchpost`)!;
    expect([kit.summary, kit.start, kit.end, kit.allDay]).toEqual(["Kit back by: K-01 (feed-A)", "2027-05-28", "2027-05-29", true]);

    const uids = events.map((event) => event.uid);
    for (const absent of [draftLab, otherCourseLab, archivedLab]) expect(uids.join(" ")).not.toContain(absent);
    expect(uids).toHaveLength(4);
  });

  it("gives another student of the same cohort their own extension, not ownStudent's", async () => {
    const { events } = await feedOf(fixture.userIds.sameCohortStudent);
    expect(eventByUid(events, `${fixture.labId}-due@benchpost`)!.start).toBe("2027-03-10T17:00:00.000Z");
    expect(eventByUid(events, `${fixture.labId}-cutoff@benchpost`)!.start).toBe("2027-03-12T17:00:00.000Z");
    expect(eventByUid(events, `${bothCohortsLab}-due@benchpost`)!.start).toBe("2027-03-25T17:00:00.000Z");
    // sameCohortStudent holds no kit.
    expect(events.filter((event) => event.allDay)).toEqual([]);
  });

  it("gives a student of the extended cohort the cohort's time, said as the cohort's", async () => {
    const { events } = await feedOf(fixture.userIds.otherCohortStudent);
    expect(events.map((event) => event.uid)).toEqual([`${bothCohortsLab}-due@benchpost`]);
    expect(events[0].start).toBe("2027-03-22T17:00:00.000Z");
    expect(events[0].description).toContain("Your cohort's extension; the class is due Sat, 20 Mar 2027, 17:00 UTC.");
  });

  it("gives staff the class's times of the labs they see, their cohorts' extensions as events of their own, and the course's return-by day", async () => {
    const instructor = await feedOf(fixture.userIds.instructor);
    expect(instructor.events.map((event) => [event.uid, event.start]).sort()).toEqual(
      [
        [`${fixture.labId}-due@benchpost`, "2027-03-10T17:00:00.000Z"],
        [`${fixture.labId}-cutoff@benchpost`, "2027-03-12T17:00:00.000Z"],
        [`${bothCohortsLab}-due@benchpost`, "2027-03-20T17:00:00.000Z"],
        [`${bothCohortsLab}-${fixture.otherCohortId}-due@benchpost`, "2027-03-22T17:00:00.000Z"],
        [`${fixture.courseId}-kits-return@benchpost`, "2027-05-28"],
      ].sort(),
    );
    expect(eventByUid(instructor.events, `${bothCohortsLab}-${fixture.otherCohortId}-due@benchpost`)!.summary).toBe(
      "Due (Cohort two, extended): Falling-ball viscometry (feed-A)",
    );

    // The TA of cohort one: both labs, no extension of cohort two.
    const assigned = await feedOf(fixture.userIds.assignedTa);
    expect(assigned.events.map((event) => event.uid).sort()).toEqual(
      [
        `${fixture.labId}-due@benchpost`,
        `${fixture.labId}-cutoff@benchpost`,
        `${bothCohortsLab}-due@benchpost`,
        `${fixture.courseId}-kits-return@benchpost`,
      ].sort(),
    );
    // The TA of cohort two: only the lab set for it, with cohort two's extension.
    const other = await feedOf(fixture.userIds.unassignedTa);
    expect(other.events.map((event) => event.uid).sort()).toEqual(
      [
        `${bothCohortsLab}-due@benchpost`,
        `${bothCohortsLab}-${fixture.otherCohortId}-due@benchpost`,
        `${fixture.courseId}-kits-return@benchpost`,
      ].sort(),
    );
  });

  it("reads everything in one statement", async () => {
    const { statements, result } = await countStatements(() => loadCalendarFeedRows(db, fixture.userIds.instructor));
    expect(result.length).toBeGreaterThan(0);
    expect(statements).toBe(1);
  });

  it("stops the old address at once when it is reset, and answers an unknown one with a bare 404", async () => {
    const first = new URL(await resetCalendarFeed(fixture.userIds.ownStudent));
    const second = new URL(await resetCalendarFeed(fixture.userIds.ownStudent));
    expect(second.pathname).not.toBe(first.pathname);
    const old = await handle(appRequest(first.pathname));
    expect(old.status).toBe(404);
    expect(await old.text()).toBe("Not found");
    expect((await handle(appRequest(second.pathname))).status).toBe(200);
    expect((await handle(appRequest("/calendar/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa.ics"))).status).toBe(404);
    const audited = await db
      .select({ detail: auditEvents.detail })
      .from(auditEvents)
      .where(and(eq(auditEvents.action, "account.calendar_feed_reset"), eq(auditEvents.subject, `user:${fixture.userIds.ownStudent}`)));
    expect(audited.length).toBeGreaterThanOrEqual(2);
    expect(audited.some((event) => event.detail.replaced === true)).toBe(true);
  });

  it("makes the address on the account page, shows it once, and offers a reset after", async () => {
    const cookie = await sessionCookieFor(fixture.userIds.otherInstructor);
    const before = await (await handle(appRequest("/account", { cookie }))).text();
    expect(before).toContain("Make my calendar address");
    const made = await handle(appRequest("/account", { cookie, form: { intent: "calendar-feed" } }));
    expect(made.status).toBe(200);
    const page = await made.text();
    const address = page.match(/value="(http[^"]+\/calendar\/[a-z2-7]+\.ics)"/)?.[1];
    expect(address, "the address is shown in a read-only field").toBeDefined();
    expect(page).toContain("it is shown only this once");
    const feed = await handle(appRequest(new URL(address!).pathname));
    expect(feed.status).toBe(200);
    // otherInstructor's course has a lab, but it is set for no cohort: instructors see it all the same.
    expect(parseFeed(await feed.text()).events.map((event) => event.uid)).toEqual([`${otherCourseLab}-due@benchpost`]);
    const after = await (await handle(appRequest("/account", { cookie }))).text();
    expect(after).toContain("Reset it");
    expect(after).not.toContain(address!);
  });
});
