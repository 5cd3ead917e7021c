/**
 * Labs as instructors set them: drafts, publishing rules, times typed in the course's zone, deadline
 * reminders (scheduled on the publishing transaction, stale after a due-time change, at most once per
 * student and offset), and the hand-in dashboard's constant number of statements.
 */
import { randomUUID } from "node:crypto";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  cohorts,
  courseMemberships,
  dropLogVersions,
  emailOutbox,
  labCohorts,
  labExtensions,
  labReminders,
  labs,
  parts,
  users,
} from "~/db/schema";
import { labInputFor, newLabFormValues, type LabInput } from "~/lib/labs/lab-input";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import { db } from "~/server/db.server";
import { handInDropLog } from "~/server/drop-logs/hand-in.server";
import { queues } from "~/server/jobs/boss.server";
import { getLabDashboard } from "~/server/labs/lab-dashboard.server";
import { sendLabReminders, type LabReminderJob } from "~/server/labs/lab-reminders.server";
import { closeLab, createLab, getLab, updateLab } from "~/server/labs/labs.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { seedClass } from "../support/comparison-class";
import { countStatements } from "../support/count-statements";

const HOUR = 3_600_000;
let fixture: AccessFixture;

function staffAccess(actor: "instructor" | "assignedTa", cohortIds: string[]): CourseAccess {
  return {
    user: {
      id: fixture.userIds[actor],
      email: `${actor}@labs.example`,
      name: actor,
      mayCreateCourses: false,
      sessionId: null,
      via: "session",
    },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "labs-A", term: "Test term", timeZone: "UTC", archivedAt: null },
    membership: { id: fixture.membershipIds[actor], role: actor === "instructor" ? "instructor" : "ta", cohortId: null },
    cohortIds,
  };
}
const instructor = () => staffAccess("instructor", [fixture.cohortId, fixture.otherCohortId]);

/** The form as an instructor fills it, with the new-lab defaults. */
function rawForm(overrides: Record<string, unknown>): Record<string, unknown> {
  return { ...newLabFormValues("drag"), title: "Settling in glycerol", ...overrides };
}
const labForm = (overrides: Record<string, unknown>, timeZone = "UTC"): LabInput => labInputFor(timeZone).parse(rawForm(overrides));

const wallClock = (at: Date) => at.toISOString().slice(0, 16);

async function reminderJobs(labId: string) {
  const result = await db.execute<{ data: LabReminderJob; start_after: Date }>(
    sql`select data, start_after from pgboss.job where name = ${queues.labReminder} and data->>'labId' = ${labId} order by start_after`,
  );
  return result.rows.map((row) => ({ ...row.data, startAfter: new Date(row.start_after) }));
}

beforeAll(async () => {
  fixture = await createAccessFixture("labs");
});

describe("lab input", () => {
  it("keeps the due time after the opening and the cut-off after the due time, with the message at the field", () => {
    const result = labInputFor("UTC").safeParse(
      rawForm({ opensAt: "2027-03-10T09:00", dueAt: "2027-03-09T09:00", lateCutoffAt: "2027-03-08T09:00" }),
    );
    expect(result.error?.issues.map((issue) => issue.path.join("."))).toEqual(["dueAt", "lateCutoffAt"]);
    const unreadable = labInputFor("UTC").safeParse(
      rawForm({ opensAt: "2027-03-10T09:00", dueAt: "2027-03-12T09:00", reminderOffsetsHours: "48, soon", resolutions: {} }),
    );
    expect(new Set(unreadable.error?.issues.map((issue) => issue.path.join(".")))).toEqual(
      new Set([
        "reminderOffsetsHours",
        "resolutions.diameterMm",
        "resolutions.massG",
        "resolutions.distanceMm",
        "resolutions.timeS",
        "resolutions.temperatureC",
        "resolutions.thermometerAccuracyC",
      ]),
    );
  });

  it("keeps the after-release policy: refuse unless chosen, an unknown value refused at its field, and stored as chosen", async () => {
    expect(labForm({ opensAt: "2027-03-10T09:00", dueAt: "2027-03-12T09:00" }).afterReleaseHandIns).toBe("refuse");
    const unknown = labInputFor("UTC").safeParse(
      rawForm({ opensAt: "2027-03-10T09:00", dueAt: "2027-03-12T09:00", afterReleaseHandIns: "accept" }),
    );
    expect(unknown.error?.issues.map((issue) => issue.path.join("."))).toEqual(["afterReleaseHandIns"]);
    const lab = await createLab(db, {
      access: instructor(),
      input: labForm({ opensAt: "2027-03-10T09:00", dueAt: "2027-03-12T09:00", afterReleaseHandIns: "reopen" }),
    });
    expect((await getLab(db, fixture.courseId, lab.id))!.afterReleaseHandIns).toBe("reopen");
  });

  it("reads the due time in the course's zone: 23:59 in Dublin in summer is 22:59 UTC", () => {
    const lab = labForm({ opensAt: "2027-07-01T09:00", dueAt: "2027-07-08T23:59" }, "Europe/Dublin");
    expect(lab.dueAt.toISOString()).toBe("2027-07-08T22:59:00.000Z");
    expect(lab.reminderOffsetsHours).toEqual([48, 6]);
    expect(lab.resolutions).toEqual({
      diameterMm: 0.01,
      massG: 0.001,
      distanceMm: 1,
      timeS: 0.01,
      temperatureC: 0.5,
      thermometerAccuracyC: 0.5,
    });
  });
});

describe("the parts a lab allows, per kind", () => {
  it("stores the ticked parts of each kind, and refuses a part ticked under another kind, at that kind's field", async () => {
    const now = new Date();
    const kitParts = await db.select({ id: parts.id, kind: parts.kind }).from(parts).where(eq(parts.courseId, fixture.courseId));
    const idOf = (kind: string) => kitParts.find((part) => part.kind === kind)!.id;
    const times = { opensAt: wallClock(new Date(now.getTime() - HOUR)), dueAt: wallClock(new Date(now.getTime() + 72 * HOUR)) };
    const input = labForm({ ...times, allowedFluidLotIds: [idOf("fluid_lot")], allowedColumnIds: [idOf("column")] });
    const lab = await createLab(db, { access: instructor(), input });
    // No sphere ticked: the stored list holds the lot and the column only, and so limits those kinds.
    expect(new Set(lab.allowedPartIds)).toEqual(new Set([idOf("fluid_lot"), idOf("column")]));
    await expect(
      createLab(db, { access: instructor(), input: labForm({ ...times, allowedSphereIds: [idOf("fluid_lot")] }) }),
    ).rejects.toMatchObject({ field: "allowedSphereIds" });
    await expect(
      createLab(db, { access: instructor(), input: labForm({ ...times, allowedFluidLotIds: [idOf("accessory")] }) }),
    ).rejects.toMatchObject({ field: "allowedFluidLotIds" });
    await expect(
      updateLab(db, {
        access: instructor(),
        labId: lab.id,
        input: labForm({ ...times, allowedColumnIds: [idOf("sphere")] }),
        intent: "save",
      }),
    ).rejects.toMatchObject({
      field: "allowedColumnIds",
    });
  });
});

describe("drafts, publishing and closing", () => {
  it("creates a draft, refuses to publish it without a cohort, and refuses another course's cohort", async () => {
    const now = new Date();
    const input = labForm({ opensAt: wallClock(new Date(now.getTime() - HOUR)), dueAt: wallClock(new Date(now.getTime() + 72 * HOUR)) });
    const lab = await createLab(db, { access: instructor(), input });
    expect(lab.status).toBe("draft");
    await expect(updateLab(db, { access: instructor(), labId: lab.id, input, intent: "publish" })).rejects.toMatchObject({
      code: "lab_refused",
    });
    expect((await getLab(db, fixture.courseId, lab.id))!.status).toBe("draft");

    const [foreign] = await db
      .insert(cohorts)
      .values({ courseId: fixture.otherCourseId, name: `Elsewhere ${randomUUID()}` })
      .returning();
    await expect(
      updateLab(db, { access: instructor(), labId: lab.id, input: { ...input, cohortIds: [foreign.id] }, intent: "save" }),
    ).rejects.toMatchObject({ field: "cohortIds" });
  });

  it("schedules one reminder per offset at due − offset when published, and new ones when the due time moves", async () => {
    const now = new Date(Math.floor(Date.now() / 60_000) * 60_000);
    const due = new Date(now.getTime() + 72 * HOUR);
    const input = labForm({ opensAt: wallClock(now), dueAt: wallClock(due), cohortIds: [fixture.cohortId] });
    const lab = await createLab(db, { access: instructor(), input });
    expect(await reminderJobs(lab.id)).toEqual([]);

    await updateLab(db, { access: instructor(), labId: lab.id, input, intent: "publish", now });
    expect(await reminderJobs(lab.id)).toEqual([
      { labId: lab.id, offsetHours: 48, dueAt: due.toISOString(), startAfter: new Date(due.getTime() - 48 * HOUR) },
      { labId: lab.id, offsetHours: 6, dueAt: due.toISOString(), startAfter: new Date(due.getTime() - 6 * HOUR) },
    ]);

    // Saving without moving the due time queues nothing more.
    await updateLab(db, { access: instructor(), labId: lab.id, input: { ...input, title: "Renamed" }, intent: "save", now });
    expect(await reminderJobs(lab.id)).toHaveLength(2);

    const later = new Date(due.getTime() + 24 * HOUR);
    await updateLab(db, { access: instructor(), labId: lab.id, input: { ...input, dueAt: later }, intent: "save", now });
    const jobs = await reminderJobs(lab.id);
    expect(jobs.filter((job) => job.dueAt === later.toISOString()).map((job) => job.offsetHours)).toEqual([48, 6]);

    // A job queued for the old due time finds it changed and sends nothing.
    const stale = jobs.find((job) => job.dueAt === due.toISOString())!;
    expect(await sendLabReminders(db, stale, new Date(due.getTime() - 48 * HOUR))).toEqual({ sent: 0, skipped: "due-time-changed" });

    await closeLab(db, { access: instructor(), labId: lab.id });
    expect(await sendLabReminders(db, { labId: lab.id, offsetHours: 48, dueAt: later.toISOString() }, now)).toEqual({
      sent: 0,
      skipped: "not-published",
    });
    await expect(closeLab(db, { access: instructor(), labId: lab.id })).rejects.toMatchObject({ code: "lab_refused" });
  });

  it("re-decides the late flag of the hand-ins already made when the due time moves, either way", async () => {
    const now = new Date(Math.floor(Date.now() / 60_000) * 60_000);
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: fixture.courseId,
        title: "Moved due time",
        kind: "drag",
        status: "published",
        opensAt: new Date(now.getTime() - 2 * HOUR),
        dueAt: new Date(now.getTime() - HOUR),
        lateCutoffAt: new Date(now.getTime() + HOUR),
        requiredDrops: 5,
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: fixture.cohortId });
    const student = {
      ...instructor(),
      user: { ...instructor().user, id: fixture.userIds.ownStudent },
      membership: { id: fixture.membershipIds.ownStudent, role: "student" as const, cohortId: fixture.cohortId },
      cohortIds: [fixture.cohortId],
    };
    const handedIn = await handInDropLog(db, {
      access: student,
      labId: lab.id,
      input: { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
      idempotencyKey: "labs-moved-due",
      now,
    });
    expect(handedIn.version.late).toBe(true);
    const lateOf = async () =>
      (await db.select({ late: dropLogVersions.late }).from(dropLogVersions).where(eq(dropLogVersions.id, handedIn.version.id)))[0].late;
    const move = (dueAt: Date) =>
      updateLab(db, {
        access: instructor(),
        labId: lab.id,
        input: labForm({ opensAt: wallClock(lab.opensAt), dueAt: wallClock(dueAt), lateCutoffAt: "", cohortIds: [fixture.cohortId] }),
        intent: "save",
        now,
      });
    await move(new Date(now.getTime() + 2 * HOUR));
    expect(await lateOf()).toBe(false);
    await move(new Date(now.getTime() - 30 * 60_000));
    expect(await lateOf()).toBe(true);
  });

  it("queues the reminders of an extension granted while the lab was a draft when it is published", async () => {
    const now = new Date(Math.floor(Date.now() / 60_000) * 60_000);
    const due = new Date(now.getTime() + 72 * HOUR);
    const extended = new Date(due.getTime() + 96 * HOUR);
    const input = labForm({ opensAt: wallClock(now), dueAt: wallClock(due), cohortIds: [fixture.cohortId] });
    const lab = await createLab(db, { access: instructor(), input });
    await db
      .insert(labExtensions)
      .values({ labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extended, reason: "Learning-support plan" });
    await updateLab(db, { access: instructor(), labId: lab.id, input, intent: "publish", now });
    expect((await reminderJobs(lab.id)).map((job) => `${job.dueAt} ${job.offsetHours}`)).toEqual([
      `${due.toISOString()} 48`,
      `${due.toISOString()} 6`,
      `${extended.toISOString()} 48`,
      `${extended.toISOString()} 6`,
    ]);
  });

  it("skips an offset whose time has already passed at publishing", async () => {
    const now = new Date();
    const input = labForm({
      opensAt: wallClock(new Date(now.getTime() - HOUR)),
      dueAt: wallClock(new Date(now.getTime() + 10 * HOUR)),
      cohortIds: [fixture.cohortId],
    });
    const lab = await createLab(db, { access: instructor(), input });
    await updateLab(db, { access: instructor(), labId: lab.id, input, intent: "publish", now });
    expect((await reminderJobs(lab.id)).map((job) => job.offsetHours)).toEqual([6]);
  });
});

describe("reminder job", () => {
  it("reminds each student without a hand-in once per offset, even when run twice or side by side", async () => {
    // The fixture's lab: cohort one holds ownStudent (handed in) and sameCohortStudent (not yet).
    const [lab] = await db.select().from(labs).where(eq(labs.id, fixture.labId));
    const job: LabReminderJob = { labId: lab.id, offsetHours: 48, dueAt: lab.dueAt.toISOString() };
    const at = new Date(lab.dueAt.getTime() - 48 * HOUR);
    const [first, second] = await Promise.all([sendLabReminders(db, job, at), sendLabReminders(db, job, at)]);
    expect(first.sent + second.sent).toBe(1);
    expect(await sendLabReminders(db, job, at)).toEqual({ sent: 0, skipped: null });

    const reminders = await db.select().from(labReminders).where(eq(labReminders.labId, lab.id));
    expect(reminders.map((reminder) => reminder.membershipId)).toEqual([fixture.membershipIds.sameCohortStudent]);
    const [email] = await db.select().from(emailOutbox).where(eq(emailOutbox.id, reminders[0].outboxId!));
    expect(email).toMatchObject({
      template: "deadline-reminder",
      toAddress: "samecohortstudent@labs.example",
      dedupeKey: `reminder:${lab.id}:${fixture.membershipIds.sameCohortStudent}:${lab.dueAt.toISOString()}:48`,
    });
    expect(email.props).toMatchObject({ labTitle: lab.title, hoursLeft: 48 });

    // A second offset is a reminder of its own.
    expect((await sendLabReminders(db, { ...job, offsetHours: 6 }, new Date(lab.dueAt.getTime() - 6 * HOUR))).sent).toBe(1);
    // An offset taken out of the lab since the job was queued sends nothing.
    expect(await sendLabReminders(db, { ...job, offsetHours: 12 }, at)).toEqual({ sent: 0, skipped: "offset-removed" });
  });
});

describe("hand-in dashboard", () => {
  /** A published lab for both cohorts with `students` students: two in three have handed in, one in six late. */
  async function classOf(students: number) {
    const label = `dash${students}-${randomUUID().slice(0, 6)}`;
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: fixture.courseId,
        title: label,
        kind: "drag",
        status: "published",
        opensAt: new Date(Date.now() - 48 * HOUR),
        dueAt: new Date(Date.now() + 48 * HOUR),
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
      })
      .returning();
    await db.execute(
      sql`insert into lab_cohorts (lab_id, cohort_id) values (${lab.id}, ${fixture.cohortId}), (${lab.id}, ${fixture.otherCohortId})`,
    );
    const handedIn = Math.round((students * 2) / 3);
    const members = Array.from({ length: handedIn }, (_, index) => ({
      figure: 1 + (index % 7) / 100,
      cohortId: index % 2 ? fixture.otherCohortId : fixture.cohortId,
    }));
    const dropLogIds = await seedClass(db, { courseId: fixture.courseId, labId: lab.id, cohortId: fixture.cohortId, members, label });
    await db.execute(
      sql`update drop_log_versions set late = true where drop_log_id in (select value::uuid from json_array_elements_text(${JSON.stringify(dropLogIds.filter((_, index) => index % 4 === 0))}::json))`,
    );
    const missing = Array.from({ length: students - handedIn }, (_, index) => ({ userId: randomUUID(), index }));
    await insertMany(
      db,
      users,
      missing.map((row) => ({
        id: row.userId,
        email: `${label}-missing-${row.index}@class.example`,
        name: `${label} missing ${row.index}`,
      })),
    );
    await insertMany(
      db,
      courseMemberships,
      missing.map((row) => ({
        courseId: fixture.courseId,
        userId: row.userId,
        role: "student" as const,
        cohortId: row.index % 2 ? fixture.otherCohortId : fixture.cohortId,
      })),
    );
    return { lab: (await getLab(db, fixture.courseId, lab.id))!, handedIn, late: dropLogIds.filter((_, index) => index % 4 === 0).length };
  }

  it("runs the same number of statements for 10 and 300 students", async () => {
    const small = await classOf(10);
    const large = await classOf(300);
    const smallRun = await countStatements(() => getLabDashboard(db, instructor(), small.lab));
    const largeRun = await countStatements(() => getLabDashboard(db, instructor(), large.lab));
    expect(largeRun.statements).toBe(smallRun.statements);
    expect(largeRun.statements).toBeLessThanOrEqual(3);

    // The fixture's own students of both cohorts are in the class too; count only this lab's seeded ones.
    const totals = largeRun.result.cohorts.reduce(
      (sum, cohort) => ({ onTime: sum.onTime + cohort.onTime, late: sum.late + cohort.late, students: sum.students + cohort.students }),
      { onTime: 0, late: 0, students: 0 },
    );
    expect(totals.onTime + totals.late).toBe(large.handedIn);
    expect(totals.late).toBe(large.late);
    expect(largeRun.result.students.filter((student) => student.version === null).length).toBe(totals.students - large.handedIn);
  });

  it("shows a TA only the students of their cohorts", async () => {
    const { lab } = await classOf(12);
    const dashboard = await getLabDashboard(db, staffAccess("assignedTa", [fixture.cohortId]), lab);
    expect(dashboard.cohorts.map((cohort) => cohort.cohortId)).toEqual([fixture.cohortId]);
    expect(new Set(dashboard.students.map((student) => student.cohortId))).toEqual(new Set([fixture.cohortId]));
    const all = await getLabDashboard(db, instructor(), lab);
    expect(all.students.length).toBeGreaterThan(dashboard.students.length);
    const [sample] = await db
      .select({ id: courseMemberships.id })
      .from(courseMemberships)
      .where(and(eq(courseMemberships.cohortId, fixture.otherCohortId), eq(courseMemberships.role, "student")));
    expect(dashboard.students.some((student) => student.membershipId === sample.id)).toBe(false);
  });
});
