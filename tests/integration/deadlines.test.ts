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
import { insertMany } from "~/server/bulk-insert.server";
import { db } from "~/server/db.server";
import { queues } from "~/server/jobs/boss.server";
import { listScheduledReminders, scheduleLabReminders, sendLabReminders, type LabReminderJob } from "~/server/labs/lab-reminders.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { handInDropLog } from "~/server/drop-logs/hand-in.server";
import { recomputeLateness } from "~/server/labs/effective-window.server";
import { getLabDashboard } from "~/server/labs/lab-dashboard.server";
import { getLab } from "~/server/labs/labs.server";
import { loadMarksJson } from "~/server/marking/mark-export.server";
import { loadMarkingDesk } from "~/server/marking/marking-desk.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { dublin } from "../support/dublin-time";
import { appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countStatements } from "../support/count-statements";
import { formatDateTime } from "~/lib/format-date";

const HOUR = 3_600_000;
let fixture: AccessFixture;

// The class is due on the Friday before the change, still in summer time (UTC+1).
const classDue = dublin("2027-10-29T17:00");
// The extension is due on the Monday after it, in winter time (UTC+0).
const extendedDue = dublin("2027-11-01T09:00");
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

/** A published lab for both of the fixture's cohorts, due at `classDue`, reminding 48 h and 6 h before. */
async function createLab(title = "Settling across the clock change") {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title,
      kind: "drag",
      status: "published",
      opensAt: dublin("2027-10-01T09:00"),
      dueAt: classDue,
      reminderOffsetsHours: [48, 6],
      requiredDrops: 5,
      resolutions,
    })
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
    .select({
      membershipId: labReminders.membershipId,
      dueAt: labReminders.dueAt,
      offsetHours: labReminders.offsetHours,
      props: emailOutbox.props,
    })
    .from(labReminders)
    .leftJoin(emailOutbox, eq(emailOutbox.id, labReminders.outboxId))
    .where(eq(labReminders.labId, labId));
  return rows.map((row) => ({ ...row, props: row.props as { dueAtText: string; hoursLeft: number } }));
}

/** A new cohort of 197 students, none handed in, for the lab; every third has their own extension to `extendedDue`. */
async function bigCohortFor(labId: string) {
  const [cohort] = await db
    .insert(cohorts)
    .values({ courseId: fixture.courseId, name: `Big cohort ${randomUUID().slice(0, 6)}` })
    .returning();
  await db.insert(labCohorts).values({ labId, cohortId: cohort.id });
  const rows = Array.from({ length: 197 }, (_, index) => ({ userId: randomUUID(), membershipId: randomUUID(), index }));
  await insertMany(
    db,
    users,
    rows.map((row) => ({ id: row.userId, email: `${cohort.id}-${row.index}@class.example`, name: `Deadlines student ${row.index}` })),
  );
  await insertMany(
    db,
    courseMemberships,
    rows.map((row) => ({
      id: row.membershipId,
      courseId: fixture.courseId,
      userId: row.userId,
      role: "student" as const,
      cohortId: cohort.id,
    })),
  );
  await insertMany(
    db,
    labExtensions,
    rows
      .filter((row) => row.index % 3 === 0)
      .map((row) => ({ labId, membershipId: row.membershipId, dueAt: extendedDue, reason: "Kit arrived late" })),
  );
  return cohort.id;
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
    expect(only.props).toMatchObject({ dueAtText: "Fri, 29 Oct 2027, 17:00 GMT+1", hoursLeft: 48 });
  });

  it("reminds only the extended students of their own due time, 48 hours of elapsed time before it across the change", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, extendedDue);
    const now = dublin("2027-10-20T09:00");
    const scheduled = await db.transaction((tx) =>
      scheduleLabReminders(tx, { id: lab.id, dueAt: extendedDue, reminderOffsetsHours: lab.reminderOffsetsHours }, now),
    );
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
    expect(only.props).toMatchObject({ dueAtText: "Mon, 1 Nov 2027, 09:00 GMT", hoursLeft: 48 });
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
    const [email] = await db
      .select()
      .from(emailOutbox)
      .where(eq(emailOutbox.dedupeKey, `reminder:${lab.id}:${fixture.membershipIds.ownStudent}:${extendedDue.toISOString()}:48`));
    expect(email.props).toMatchObject({ dueAtText: "Mon, 1 Nov 2027, 09:00 GMT", hoursLeft: 48 });
  });

  it("does nothing for a due time that is neither the lab's nor an extension's, nor once the extended time has passed", async () => {
    const lab = await createLab();
    await extend(lab.id, { membershipId: fixture.membershipIds.ownStudent }, extendedDue);
    const elsewhere = dublin("2027-11-02T09:00");
    expect(await sendLabReminders(db, job(lab.id, elsewhere, 48), before(elsewhere, 48))).toEqual({ sent: 0, skipped: "due-time-changed" });
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 6), new Date(extendedDue.getTime() + 1))).toEqual({
      sent: 0,
      skipped: "past-due",
    });
    // An extension withdrawn: its job finds no such due time any more.
    await db.delete(labExtensions).where(eq(labExtensions.labId, lab.id));
    expect(await sendLabReminders(db, job(lab.id, extendedDue, 48), before(extendedDue, 48))).toEqual({
      sent: 0,
      skipped: "due-time-changed",
    });
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
    expect(
      listed.map((entry) => ({
        offsetHours: entry.offsetHours,
        dueAt: new Date(entry.dueAt).toISOString(),
        startAfter: new Date(entry.startAfter).toISOString(),
        extension: entry.extension,
      })),
    ).toEqual([
      { offsetHours: 48, dueAt: classDue.toISOString(), startAfter: before(classDue, 48).toISOString(), extension: false },
      { offsetHours: 6, dueAt: classDue.toISOString(), startAfter: before(classDue, 6).toISOString(), extension: false },
      { offsetHours: 48, dueAt: extendedDue.toISOString(), startAfter: before(extendedDue, 48).toISOString(), extension: true },
      { offsetHours: 6, dueAt: extendedDue.toISOString(), startAfter: before(extendedDue, 6).toISOString(), extension: true },
    ]);
  });

  it("runs the same number of statements for a class of 3 and of 200, extensions among them", async () => {
    const small = await createLab("Small class");
    const large = await createLab("Large class");
    // Every third student of the big cohort is extended: the class's job must pass them over.
    await bigCohortFor(large.id);

    const smallRun = await countStatements(() => sendLabReminders(db, job(small.id, classDue, 48), before(classDue, 48)));
    const largeRun = await countStatements(() => sendLabReminders(db, job(large.id, classDue, 48), before(classDue, 48)));
    expect(smallRun.result.sent).toBe(3);
    expect(largeRun.result.sent).toBe(3 + 197 - 66);
    expect(largeRun.statements).toBe(smallRun.statements);
    const extendedRun = await countStatements(() => sendLabReminders(db, job(large.id, extendedDue, 48), before(extendedDue, 48)));
    expect(extendedRun.result.sent).toBe(66);
    expect(extendedRun.statements).toBe(smallRun.statements);
    const reminded = await db
      .select({ count: sql<number>`count(*)::int` })
      .from(labReminders)
      .where(and(eq(labReminders.labId, large.id), eq(labReminders.dueAt, extendedDue)));
    expect(reminded[0].count).toBe(66);
  });
});

function instructorAccess(cohortIds: string[] = [fixture.cohortId, fixture.otherCohortId]): CourseAccess {
  return {
    user: {
      id: fixture.userIds.instructor,
      email: "instructor@deadlines.example",
      name: "Test instructor",
      sessionId: null,
      via: "session",
    },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "deadlines-A", term: "Test term", timeZone: "Europe/Dublin" },
    membership: { id: fixture.membershipIds.instructor, role: "instructor", cohortId: null },
    cohortIds,
  } as unknown as CourseAccess;
}

const studentAccess = {
  get ownStudent(): CourseAccess {
    return {
      user: {
        id: fixture.userIds.ownStudent,
        email: "ownstudent@deadlines.example",
        name: "Test ownStudent",
        sessionId: null,
        via: "session",
      },
      course: { id: fixture.courseId, title: "Settling Spheres", code: "deadlines-A", term: "Test term", timeZone: "Europe/Dublin" },
      membership: { id: fixture.membershipIds.ownStudent, role: "student", cohortId: fixture.cohortId },
      cohortIds: [fixture.cohortId],
    } as unknown as CourseAccess;
  },
};

/** The lab with a rubric whose only criterion is the automatic "on time" one (1 point, all of it off when late). */
async function markingLabOf(labId: string) {
  const bare = (await loadMarkingLab(db, fixture.courseId, labId))!;
  await saveRubric(db, {
    access: instructorAccess(),
    lab: bare,
    input: { criteria: [{ kind: "auto", title: "On time", rule: "on_time", maxPoints: 1, params: { latePenaltyPoints: 1 } }] },
  });
  return (await loadMarkingLab(db, fixture.courseId, labId))!;
}

const page = { page: 1, pageSize: 50 };

describe("missing only after the student's own due time", () => {
  it("shows an extended student as not due yet on the desk, the dashboard and the export after the class's due time, and missing after their own", async () => {
    const lab = await createLab();
    // An hour repeated by the clock change: 01:30 on Sunday is read as its second occurrence, 01:30 GMT.
    const cohortDue = dublin("2027-10-31T01:30");
    expect(cohortDue.toISOString()).toBe("2027-10-31T01:30:00.000Z");
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, extendedDue, dublin("2027-11-01T12:00"));
    await extend(lab.id, { cohortId: fixture.otherCohortId }, cohortDue);
    const markingLab = await markingLabOf(lab.id);
    const dashboardLab = (await getLab(db, fixture.courseId, lab.id))!;
    const standings = async (now: Date) => {
      const desk = await loadMarkingDesk(db, { access: instructorAccess(), lab: markingLab, filters: page, now });
      const dashboard = await getLabDashboard(db, instructorAccess(), dashboardLab, now);
      const exported = await loadMarksJson(db, { access: instructorAccess(), lab: markingLab, now });
      const byStudent = (rows: { membershipId: string; status: string }[]) =>
        Object.fromEntries(rows.map((row) => [row.membershipId, row.status]));
      return {
        desk: byStudent(desk.rows),
        counts: desk.counts,
        dashboard: byStudent(dashboard.students),
        cohorts: Object.fromEntries(
          dashboard.cohorts.map((cohort) => [cohort.cohortId, { notDue: cohort.notDue, missing: cohort.missing }]),
        ),
        exported: byStudent(exported.marks.map((mark) => ({ membershipId: mark.membershipId, status: mark.handIn }))),
        deskRows: desk.rows,
      };
    };
    const { ownStudent, sameCohortStudent, otherCohortStudent } = fixture.membershipIds;
    const every = (own: string, same: string, other: string) => ({
      [ownStudent]: own,
      [sameCohortStudent]: same,
      [otherCohortStudent]: other,
    });

    // Up to the class's due instant, nobody is missing.
    const atDue = await standings(classDue);
    expect(atDue.desk).toEqual(every("not-due", "not-due", "not-due"));

    // Saturday noon: past the class's due time, before both extensions.
    const saturday = await standings(dublin("2027-10-30T12:00"));
    expect(saturday.desk).toEqual(every("missing", "not-due", "not-due"));
    expect(saturday.dashboard).toEqual(saturday.desk);
    expect(saturday.exported).toEqual(saturday.desk);
    expect(saturday.counts).toMatchObject({ absent: 1, awaited: 2 });
    expect(saturday.cohorts).toEqual({ [fixture.cohortId]: { notDue: 1, missing: 1 }, [fixture.otherCohortId]: { notDue: 1, missing: 0 } });
    // The desk names the student's own due time and why (staff see the reason); the class's students have none.
    const row = (id: string) => saturday.deskRows.find((candidate) => candidate.membershipId === id)!;
    expect(row(sameCohortStudent).deadline).toEqual({
      dueAt: "2027-11-01T09:00:00+00:00",
      lateCutoffAt: "2027-11-01T12:00:00+00:00",
      extendedBy: "student",
      extensionReason: "Flooded lab bench",
    });
    expect(row(otherCohortStudent).deadline).toMatchObject({ extendedBy: "cohort", lateCutoffAt: null });
    expect(new Date(row(otherCohortStudent).deadline.dueAt).toISOString()).toBe(cohortDue.toISOString());
    expect(row(ownStudent).deadline).toMatchObject({ extendedBy: null, extensionReason: null });
    expect(new Date(row(ownStudent).deadline.dueAt).toISOString()).toBe(classDue.toISOString());

    // 01:00 GMT on Sunday, after the clocks went back: the first 01:30 (IST) has passed, the cohort's 01:30 GMT has not.
    expect((await standings(new Date("2027-10-31T01:00:00Z"))).desk).toEqual(every("missing", "not-due", "not-due"));
    expect((await standings(new Date("2027-10-31T01:31:00Z"))).desk).toEqual(every("missing", "not-due", "missing"));
    // Past the student's own due time, inside their cut-off: they may still hand in late, but nothing is there.
    const monday = await standings(dublin("2027-11-01T09:01"));
    expect(monday.desk).toEqual(every("missing", "missing", "missing"));
    expect(monday.cohorts).toEqual({ [fixture.cohortId]: { notDue: 0, missing: 2 }, [fixture.otherCohortId]: { notDue: 0, missing: 1 } });
  });

  it("runs the same number of statements on the desk and the dashboard for 3 and 200 students, extensions among them", async () => {
    const small = await createLab("Small desk");
    const large = await createLab("Large desk");
    const bigCohort = await bigCohortFor(large.id);
    const now = dublin("2027-10-30T12:00");
    const run = async (labId: string, cohortIds: string[]) => {
      const markingLab = await markingLabOf(labId);
      const dashboardLab = (await getLab(db, fixture.courseId, labId))!;
      const access = instructorAccess(cohortIds);
      const desk = await countStatements(() => loadMarkingDesk(db, { access, lab: markingLab, filters: { page: 1, pageSize: 200 }, now }));
      const dashboard = await countStatements(() => getLabDashboard(db, access, dashboardLab, now));
      return { desk, dashboard };
    };
    const few = await run(small.id, [fixture.cohortId, fixture.otherCohortId]);
    const many = await run(large.id, [fixture.cohortId, fixture.otherCohortId, bigCohort]);
    expect(many.desk.statements).toBe(few.desk.statements);
    expect(many.dashboard.statements).toBe(few.dashboard.statements);
    // 66 of the big cohort are extended past Saturday; the other 131 and the fixture's 3 are missing.
    expect(many.desk.result.counts).toMatchObject({ all: 200, awaited: 66, absent: 134 });
    expect(many.dashboard.result.cohorts.find((cohort) => cohort.cohortId === bigCohort)).toMatchObject({
      students: 197,
      notDue: 66,
      missing: 131,
    });
  });
});

describe("late and on time under an extension", () => {
  it("takes the on-time criterion and the desk's late from the version's flag, re-decided when an extension is granted; the extension's cut-off refuses after it", async () => {
    const [row] = await db
      .insert(labs)
      .values({
        courseId: fixture.courseId,
        title: "Late then extended",
        kind: "drag",
        status: "published",
        opensAt: dublin("2027-10-01T09:00"),
        dueAt: classDue,
        lateCutoffAt: dublin("2027-10-30T17:00"),
        requiredDrops: 5,
        resolutions,
      })
      .returning();
    await db.insert(labCohorts).values({ labId: row.id, cohortId: fixture.cohortId });
    const lab = await markingLabOf(row.id);
    const handIn = (key: string, now: Date) =>
      handInDropLog(db, {
        access: studentAccess.ownStudent,
        labId: lab.id,
        input: { sphereId: fixture.sphereId, temperatureC: 22.4, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
        idempotencyKey: key,
        now,
      });
    const ownRow = async (now: Date) =>
      (await loadMarkingDesk(db, { access: instructorAccess([fixture.cohortId]), lab, filters: page, now })).rows.find(
        (candidate) => candidate.membershipId === fixture.membershipIds.ownStudent,
      )!;
    const ownExport = async (now: Date) =>
      (await loadMarksJson(db, { access: instructorAccess([fixture.cohortId]), lab, now })).marks.find(
        (entry) => entry.membershipId === fixture.membershipIds.ownStudent,
      )!;
    const onTime = lab.rubric[0].id;

    // Saturday 12:00 IST: after the class's due time, inside its cut-off.
    const saturday = dublin("2027-10-30T12:00");
    expect((await handIn("deadlines-late-1", saturday)).version.late).toBe(true);
    expect(await ownRow(saturday)).toMatchObject({ status: "late", suggestions: { [onTime]: { points: 0 } } });
    expect(await ownExport(saturday)).toMatchObject({ handIn: "late", late: true });

    // An extension to Monday granted afterwards: the same version is now on time, and so is its criterion.
    await extend(lab.id, { membershipId: fixture.membershipIds.ownStudent }, extendedDue, dublin("2027-11-01T12:00"));
    expect(await recomputeLateness(db, lab.id)).toBe(1);
    const sunday = dublin("2027-10-31T12:00");
    expect(await ownRow(sunday)).toMatchObject({
      status: "on-time",
      suggestions: { [onTime]: { points: 1 } },
      deadline: { extendedBy: "student" },
    });
    expect(await ownExport(sunday)).toMatchObject({ handIn: "on-time", late: false });

    // The extension's cut-off (12:00 GMT Monday), not the class's (Saturday), decides: 11:59 late, 12:01 refused.
    expect((await handIn("deadlines-late-2", new Date("2027-11-01T11:59:00Z"))).version.late).toBe(true);
    await expect(handIn("deadlines-late-3", new Date("2027-11-01T12:01:00Z"))).rejects.toMatchObject({ code: "past_cutoff" });
    expect(await ownRow(new Date("2027-11-01T12:01:00Z"))).toMatchObject({
      status: "late",
      handIn: { version: 2 },
      suggestions: { [onTime]: { points: 0 } },
    });
  });
});

describe("the staff pages", () => {
  it("show the extended student as not due yet with their own due time and the reason, and the others as missing", async () => {
    // Real time here: the pages read the clock. The class was due an hour ago; one student has until tomorrow.
    const now = Date.now();
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: fixture.courseId,
        title: "Due an hour ago",
        kind: "drag",
        status: "published",
        opensAt: new Date(now - 48 * HOUR),
        dueAt: new Date(now - HOUR),
        requiredDrops: 5,
        resolutions,
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: fixture.cohortId });
    const tomorrow = new Date(now + 24 * HOUR);
    await extend(lab.id, { membershipId: fixture.membershipIds.sameCohortStudent }, tomorrow);
    await markingLabOf(lab.id);
    const handle = await createAppHandler();
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    // The student's own due time, in the course's zone (Dublin), not the class's.
    const ownDue = formatDateTime(tomorrow, "Europe/Dublin", "short");

    const dashboard = await (await handle(appRequest(`/courses/${fixture.courseId}/labs/${lab.id}/dashboard`, { cookie }))).text();
    // Each within the student's own table row.
    expect(dashboard).toMatch(/Test ownStudent<\/th>(?:(?!<\/tr>).)*No drop log/s);
    expect(dashboard).toMatch(
      /Test sameCohortStudent<\/th>(?:(?!<\/tr>).)*Awaited(?:(?!<\/tr>).)*title="own extension: Flooded lab bench"[^>]*>extended to <time/s,
    );
    expect(dashboard).toContain(ownDue);

    // React marks the joins between text pieces with empty comments; read the text without them.
    const desk = (await (await handle(appRequest(`/courses/${fixture.courseId}/labs/${lab.id}/marking`, { cookie }))).text()).replaceAll(
      "<!-- -->",
      "",
    );
    // The legend counts each state; the student's card names theirs beside the extension.
    expect(desk).toMatch(/>Awaited<\/span><\/span><span class="tabular-nums">1<\/span>/);
    expect(desk).toMatch(/>No drop log<\/span><\/span><span class="tabular-nums">1<\/span>/);
    expect(desk).toMatch(
      /Test sameCohortStudent<\/a>(?:(?!<\/article>).)*title="own extension: Flooded lab bench"[^>]*>extended to <time(?:(?!<\/article>).)*Awaited/s,
    );
  });
});
