/**
 * Everything that reads a deadline reads the student's effective one (own extension, else cohort's,
 * else the lab's): the reminders, "missing" on the marking desk, the hand-in dashboard and the marks
 * export, and the "on time" criterion. Times sit around the end of Irish summer time: on Sunday
 * 2027-10-31 at 01:00 UTC the clocks in Europe/Dublin go back from 02:00 IST to 01:00 GMT (the IANA
 * zone's rule, from memory; the conversions are checked in the first test).
 */
import { randomUUID } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { cohorts, courseMemberships, courses, emailOutbox, labCohorts, labExtensions, labReminders, labs, users } from "~/db/schema";
import { wallClockToInstant } from "~/lib/labs/wall-clock";
import { insertMany } from "~/server/bulk-insert.server";
import { db } from "~/server/db.server";
import { queues } from "~/server/jobs/boss.server";
import { listScheduledReminders, scheduleLabReminders, sendLabReminders, type LabReminderJob } from "~/server/labs/lab-reminders.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { countStatements } from "../support/count-statements";

const HOUR = 3_600_000;
let fixture: AccessFixture;

function dublin(wall: string): Date {
  const result = wallClockToInstant(wall, "Europe/Dublin");
  if (!result.ok) throw new Error(`not a Dublin wall-clock time: ${wall}`);
  return result.instant;
}
// The class is due on the Friday before the change, still in summer time (UTC+1).
const classDue = dublin("2027-10-29T17:00");
// The extension is due on the Monday after it, in winter time (UTC+0).
const extendedDue = dublin("2027-11-01T09:00");
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

/** A published lab for both of the fixture's cohorts, due at `classDue`, reminding 48 h and 6 h before. */
async function createLab(title = "Settling across the clock change") {
  const [lab] = await db
    .insert(labs)
    .values({ courseId: fixture.courseId, title, kind: "drag", status: "published", opensAt: dublin("2027-10-01T09:00"), dueAt: classDue, reminderOffsetsHours: [48, 6], requiredDrops: 5, resolutions })
    .returning();
  await db.insert(labCohorts).values([
    { labId: lab.id, cohortId: fixture.cohortId },
    { labId: lab.id, cohortId: fixture.otherCohortId },
  ]);
  return lab;
}

const extend = (labId: string, target: { membershipId: string } | { cohortId: string }, dueAt: Date, lateCutoffAt: Date | null = null) =>
  db.insert(labExtensions).values({ labId, ...target, dueAt, lateCutoffAt, reason: "Flooded lab bench" });

const job = (labId: string, dueAt: Date, offsetHours: number): LabReminderJob => ({ labId, offsetHours, dueAt: dueAt.toISOString() });
const before = (dueAt: Date, hours: number) => new Date(dueAt.getTime() - hours * HOUR);

/** The reminders of the lab: who, for which due time, and what their e-mail said. */
async function remindersOf(labId: string) {
  const rows = await db
    .select({ membershipId: labReminders.membershipId, dueAt: labReminders.dueAt, offsetHours: labReminders.offsetHours, props: emailOutbox.props })
    .from(labReminders)
    .leftJoin(emailOutbox, eq(emailOutbox.id, labReminders.outboxId))
    .where(eq(labReminders.labId, labId));
  return rows.map((row) => ({ ...row, props: row.props as { dueAtText: string; hoursLeft: number } }));
}

beforeAll(async () => {
  fixture = await createAccessFixture("deadlines");
  await db.update(courses).set({ timeZone: "Europe/Dublin" }).where(eq(courses.id, fixture.courseId));
});

describe("the clock change", () => {
  it("turns the local due times into the instants expected either side of it", () => {
    expect(classDue.toISOString()).toBe("2027-10-29T16:00:00.000Z");
    expect(extendedDue.toISOString()).toBe("2027-11-01T09:00:00.000Z");
  });
});

describe("reminders of the effective due time", () => {
  it("reminds the class of its due time and passes over the students with an extension of their own or their cohort's", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, extendedDue);
    await extend(lab.id, { cohortId: fixture.otherCohortId }, extendedDue);
    const outcome = await sendLabReminders(db, job(lab.id, classDue, 48), before(classDue, 48));
    expect(outcome).toEqual({ sent: 1, skipped: null });
    const [only] = await remindersOf(lab.id);
    expect(only).toMatchObject({ membershipId: fixture.membershipIds.ownStudent, dueAt: classDue, offsetHours: 48 });
    expect(only.props).toMatchObject({ dueAtText: "Fri, 29 Oct 2027, 17:00 (Europe/Dublin)", hoursLeft: 48 });
  });

  it("reminds only the extended students of their own due time, 48 hours of elapsed time before it across the change", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, extendedDue);
    const now = dublin("2027-10-20T09:00");
    const scheduled = await db.transaction((tx) => scheduleLabReminders(tx, { id: lab.id, dueAt: extendedDue, reminderOffsetsHours: lab.reminderOffsetsHours }, now));
    expect(scheduled).toBe(2);
    const jobs = await db.execute<{ data: LabReminderJob; start_after: Date }>(
      sql`select data, start_after from pgboss.job where name = ${queues.labReminder} and data->>'labId' = ${lab.id} and (data->>'offsetHours')::int = 48`,
    );
    // 48 h before 09:00 GMT on Monday is 10:00 IST on Saturday: the wall clock shows an hour more.
    expect(new Date(jobs.rows[0].start_after).toISOString()).toBe("2027-10-30T09:00:00.000Z");
    expect(dublin("2027-10-30T10:00").toISOString()).toBe("2027-10-30T09:00:00.000Z");

    expect(await sendLabReminders(db, jobs.rows[0].data, new Date(jobs.rows[0].start_after))).toEqual({ sent: 1, skipped: null });
    const [only] = await remindersOf(lab.id);
    expect(only).toMatchObject({ membershipId: fixture.membershipIds.sameCohortStudent, dueAt: extendedDue, offsetHours: 48 });
    expect(only.props).toMatchObject({ dueAtText: "Mon, 1 Nov 2027, 09:00 (Europe/Dublin)", hoursLeft: 48 });
  });

  it("reminds again of an extension granted after the class's reminder, and not of the class's deadline any more", async () => {
    const lab = await createLab();
    expect((await sendLabReminders(db, job(lab.id, classDue, 48), before(classDue, 48))).sent).toBe(3);
    await extend(lab.id, { membershipId: fixture.membershipIds.ownStudent }, extendedDue);

    // The class's 6-hour reminder leaves out the newly extended student: it would be early for them.
    expect((await sendLabReminders(db, job(lab.id, classDue, 6), before(classDue, 6))).sent).toBe(2);
    // The extension's 48-hour reminder is a new one for them, not a repeat of the class's.
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 48), before(extendedDue, 48))).toEqual({ sent: 1, skipped: null });
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 48), before(extendedDue, 48))).toEqual({ sent: 0, skipped: null });

    const own = (await remindersOf(lab.id)).filter((reminder) => reminder.membershipId === fixture.membershipIds.ownStudent);
    expect(own.map((reminder) => [reminder.dueAt.toISOString(), reminder.offsetHours]).sort()).toEqual([
      [classDue.toISOString(), 48],
      [extendedDue.toISOString(), 48],
    ]);
    const [email] = await db.select().from(emailOutbox).where(eq(emailOutbox.dedupeKey, `reminder:${lab.id}:${fixture.membershipIds.ownStudent}:${extendedDue.toISOString()}:48`));
    expect(email.props).toMatchObject({ dueAtText: "Mon, 1 Nov 2027, 09:00 (Europe/Dublin)", hoursLeft: 48 });
  });

  it("does nothing for a due time that is neither the lab's nor an extension's, nor once the extended time has passed", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.ownStudent }, extendedDue);
    const elsewhere = dublin("2027-11-02T09:00");
    expect(await sendLabReminders(db, job(lab.id, elsewhere, 48), before(elsewhere, 48))).toEqual({ sent: 0, skipped: "due-time-changed" });
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 6), new Date(extendedDue.getTime() + 1))).toEqual({ sent: 0, skipped: "past-due" });
    // An extension withdrawn: its job finds no such due time any more.
    await db.delete(labExtensions).where(eq(labExtensions.labId, lab.id));
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 48), before(extendedDue, 48))).toEqual({ sent: 0, skipped: "due-time-changed" });
    expect(await remindersOf(lab.id)).toEqual([]);
  });

  it("lists the waiting jobs of the class's due time and of each extension's, once each, and not those of a withdrawn extension", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.ownStudent }, extendedDue);
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, extendedDue);
    const withdrawn = dublin("2027-11-03T09:00");
    const now = dublin("2027-10-20T09:00");
    await db.transaction(async (tx) => {
      await scheduleLabReminders(tx, { id: lab.id, dueAt: classDue, reminderOffsetsHours: [48, 6] }, now);
      // Two students extended to the same time: two sets of jobs, one reminder each.
      await scheduleLabReminders(tx, { id: lab.id, dueAt: extendedDue, reminderOffsetsHours: [48, 6] }, now);
      await scheduleLabReminders(tx, { id: lab.id, dueAt: extendedDue, reminderOffsetsHours: [48, 6] }, now);
      await scheduleLabReminders(tx, { id: lab.id, dueAt: withdrawn, reminderOffsetsHours: [48] }, now);
    });
    const listed = await listScheduledReminders(db, lab);
    expect(listed.map((entry) => ({ offsetHours: entry.offsetHours, dueAt: new Date(entry.dueAt).toISOString(), startAfter: new Date(entry.startAfter).toISOString(), extension: entry.extension }))).toEqual([
      { offsetHours: 48, dueAt: classDue.toISOString(), startAfter: before(classDue, 48).toISOString(), extension: false },
      { offsetHours: 6, dueAt: classDue.toISOString(), startAfter: before(classDue, 6).toISOString(), extension: false },
      { offsetHours: 48, dueAt: extendedDue.toISOString(), startAfter: before(extendedDue, 48).toISOString(), extension: true },
      { offsetHours: 6, dueAt: extendedDue.toISOString(), startAfter: before(extendedDue, 6).toISOString(), extension: true },
    ]);
  });

  it("runs the same number of statements for a class of 3 and of 200, extensions among them", async () => {
    const small = await createLab("Small class");
    const large = await createLab("Large class");
    const [bigCohort] = await db.insert(cohorts).values({ courseId: fixture.courseId, name: "Big cohort" }).returning();
    await db.insert(labCohorts).values({ labId: large.id, cohortId: bigCohort.id });
    const extra = Array.from({ length: 197 }, (_, index) => ({ userId: randomUUID(), membershipId: randomUUID(), index }));
    await insertMany(db, users, extra.map((row) => ({ id: row.userId, email: `deadlines-${row.index}@class.example`, name: `Deadlines student ${row.index}` })));
    await insertMany(db, courseMemberships, extra.map((row) => ({ id: row.membershipId, courseId: fixture.courseId, userId: row.userId, role: "student" as const, cohortId: bigCohort.id })));
    // Every third extra student is extended: the class's job must pass them over.
    await insertMany(db, labExtensions, extra.filter((row) => row.index % 3 === 0).map((row) => ({ labId: large.id, membershipId: row.membershipId, dueAt: extendedDue, reason: "Kit arrived late" })));

    const smallRun = await countStatements(() => sendLabReminders(db, job(small.id, classDue, 48), before(classDue, 48)));
    const largeRun = await countStatements(() => sendLabReminders(db, job(large.id, classDue, 48), before(classDue, 48)));
    expect(smallRun.result.sent).toBe(3);
    expect(largeRun.result.sent).toBe(3 + 197 - 66);
    expect(largeRun.statements).toBe(smallRun.statements);
    const extendedRun = await countStatements(() => sendLabReminders(db, job(large.id, extendedDue, 48), before(extendedDue, 48)));
    expect(extendedRun.result.sent).toBe(66);
    expect(extendedRun.statements).toBe(smallRun.statements);
    const reminded = await db.select({ count: sql<number>`count(*)::int` }).from(labReminders).where(and(eq(labReminders.labId, large.id), eq(labReminders.dueAt, extendedDue)));
    expect(reminded[0].count).toBe(66);
  });
});
