/**
 * Archiving a finished course through the built app: after a confirmation it becomes read-only (every
 * change answers 409, on pages and on the API), its pages and exports still open, it leaves the course
 * list and the background jobs, it can still be carried over, and restoring it opens it again.
 */
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courses, emailOutbox, labs } from "~/db/schema";
import { db } from "~/server/db.server";
import { sendOverdueReminders } from "~/server/kits/returns.server";
import { sendLabReminders } from "~/server/labs/lab-reminders.server";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let handle: AppHandler;
let instructor: string;
let student: string;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("archive");
  // A return-by date long past, so that the overdue reminders have a kit to chase (ownStudent's, at home).
  await db.update(courses).set({ kitReturnBy: "2020-01-31" }).where(eq(courses.id, fixture.courseId));
  instructor = await sessionCookieFor(fixture.userIds.instructor);
  student = await sessionCookieFor(fixture.userIds.ownStudent);
});

const settings = (form: Record<string, string>) =>
  handle(appRequest(`/courses/${fixture.courseId}/settings`, { cookie: instructor, form }));
const archivedAt = async () => (await db.select({ at: courses.archivedAt }).from(courses).where(eq(courses.id, fixture.courseId)))[0].at;
const audited = async (action: string) =>
  (
    await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, fixture.courseId), eq(auditEvents.action, action)))
  ).length;

/** The two jobs, at a moment when each has something to send in an open course. */
async function runJobs() {
  const [lab] = await db.select().from(labs).where(eq(labs.id, fixture.labId));
  const reminder = await sendLabReminders(
    db,
    { labId: lab.id, offsetHours: 48, dueAt: lab.dueAt.toISOString() },
    new Date(lab.dueAt.getTime() - 47 * 3_600_000),
  );
  const overdue = await sendOverdueReminders(db, new Date("2026-12-01T12:00:00Z"));
  const overdueMails = await db
    .select()
    .from(emailOutbox)
    .where(and(eq(emailOutbox.courseId, fixture.courseId), eq(emailOutbox.template, "kit-overdue")));
  return { reminder, overdue: overdue.sent, overdueMails: overdueMails.length };
}

describe("archiving a course", () => {
  it("asks for a confirmation, then archives and audits it", async () => {
    const unconfirmed = await settings({ intent: "archive" });
    expect(unconfirmed.status).toBe(400);
    expect(await unconfirmed.text()).toContain("Tick the box to confirm that the course is finished.");
    expect(await archivedAt()).toBeNull();

    expect((await settings({ intent: "archive", confirm: "on" })).status).toBe(200);
    expect(await archivedAt()).toBeInstanceOf(Date);
    expect(await audited("course.archived")).toBe(1);
  });

  it("refuses every change with 409, on the pages and on the API", async () => {
    const posts: { path: string; cookie: string; form: Record<string, string> }[] = [
      { path: `/courses/${fixture.courseId}/settings`, cookie: instructor, form: { intent: "add-cohort", name: "Saturday bench" } },
      { path: `/courses/${fixture.courseId}/settings`, cookie: instructor, form: { intent: "archive", confirm: "on" } },
      { path: `/courses/${fixture.courseId}/kits/new`, cookie: instructor, form: { intent: "probe" } },
      { path: `/courses/${fixture.courseId}/labs/${fixture.labId}/extensions`, cookie: instructor, form: { intent: "probe" } },
      { path: `/courses/${fixture.courseId}/my-address`, cookie: student, form: { name: "Own Student" } },
    ];
    for (const { path, cookie, form } of posts) {
      const response = await handle(appRequest(path, { cookie, form }));
      expect(response.status, path).toBe(409);
      expect(await response.text(), path).toContain("This course is archived and read-only.");
    }
    const handIn = await handle(
      appRequest(`/api/v1/labs/${fixture.labId}/drop-logs`, {
        method: "POST",
        cookie: student,
        headers: { "Content-Type": "application/json", "Idempotency-Key": "archived-hand-in" },
      }),
    );
    expect(handIn.status).toBe(409);
    expect(await handIn.json()).toMatchObject({ error: { code: "course_archived" } });
    expect(await audited("course.archived")).toBe(1);
  });

  it("still opens its pages and exports, with the banner, and lists it apart on the home page", async () => {
    const get = (path: string, cookie = instructor) => handle(appRequest(path, { cookie }));
    const overview = await get(`/courses/${fixture.courseId}`);
    expect(overview.status).toBe(200);
    expect(await overview.text()).toContain("This course is archived and read-only");
    const settingsPage = await (await get(`/courses/${fixture.courseId}/settings`)).text();
    expect(settingsPage).toContain("Restore the course");
    expect(settingsPage).not.toContain("Save the course");
    for (const path of [
      `/courses/${fixture.courseId}/inventory.csv`,
      `/courses/${fixture.courseId}/labs/${fixture.labId}/marks.csv`,
      `/courses/${fixture.courseId}/labs/${fixture.labId}/marks-summary.csv`,
      `/courses/${fixture.courseId}/labs/${fixture.labId}/comparison.csv`,
      `/courses/${fixture.courseId}/audit`,
      `/api/v1/labs/${fixture.labId}/drop-logs`,
    ])
      expect((await get(path)).status, path).toBe(200);
    expect((await get(`/courses/${fixture.courseId}/my-kit`, student)).status).toBe(200);

    const home = await (await get("/")).text();
    const archivedSection = home.slice(home.indexOf("Archived courses"));
    // React's text markers may sit between the words and the count.
    expect(home).toMatch(/Archived courses \((<!-- -->)?1(<!-- -->)?\)/);
    expect(archivedSection).toContain("Settling Spheres");
  });

  it("is skipped by the deadline and overdue-kit reminders", async () => {
    expect(await runJobs()).toEqual({ reminder: { sent: 0, skipped: "course-archived" }, overdue: 0, overdueMails: 0 });
  });

  it("can still be carried over into next term", async () => {
    const preview = await handle(
      appRequest(`/courses/${fixture.courseId}/carry-over`, {
        cookie: instructor,
        form: { intent: "preview", title: "Settling Spheres", code: "archive-A", term: "Next term", timeZone: "UTC", shiftDays: "7" },
      }),
    );
    expect(preview.status).toBe(200);
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/carry-over`, {
        cookie: instructor,
        form: {
          intent: "carry",
          title: "Settling Spheres",
          code: "archive-A",
          term: "Next term",
          timeZone: "UTC",
          shiftDays: "7",
          copyCohorts: "on",
        },
      }),
    );
    expect(response.status).toBe(302);
    const [next] = await db.select().from(courses).where(eq(courses.carriedFromId, fixture.courseId));
    expect(response.headers.get("location")).toBe(`/courses/${next.id}/settings?carried=1`);
    expect(next).toMatchObject({ code: "archive-A", term: "Next term", archivedAt: null });
    // The old course stays archived; only the audit entry was added to it.
    expect(await archivedAt()).toBeInstanceOf(Date);
    expect(await audited("course.carried_over")).toBe(1);
  });

  it("is restored by an instructor, and then takes changes and sends reminders again", async () => {
    expect((await settings({ intent: "restore" })).status).toBe(200);
    expect(await archivedAt()).toBeNull();
    expect(await audited("course.restored")).toBe(1);
    expect((await settings({ intent: "restore" })).status).toBe(409);
    expect((await settings({ intent: "add-cohort", name: "Saturday bench" })).status).toBe(200);
    const jobs = await runJobs();
    expect(jobs.reminder.skipped).toBeNull();
    expect(jobs.reminder.sent).toBeGreaterThan(0);
    expect(jobs.overdueMails).toBe(1);
  });
});
