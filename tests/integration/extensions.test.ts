/**
 * Extensions: a student's own extension, else their cohort's, else the lab's times decide whether a
 * hand-in is on time, late or refused, across the daylight-saving change in Europe/Dublin
 * (2027-03-28 01:00 UTC, when Irish clocks go from 01:00 GMT to 02:00 IST: timeanddate.com, Dublin).
 */
import { AppError } from "~/lib/app-error";
import { and, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courses, labCohorts, labExtensions, labs } from "~/db/schema";
import { extensionInputFor } from "~/lib/labs/extension-input";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { handInDropLog, loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { listLabsForMember } from "~/server/drop-logs/lab-list.server";
import { queues } from "~/server/jobs/boss.server";
import { getExtensionsPage, listExtensions, removeExtension, setExtensions } from "~/server/labs/extensions.server";
import { getLab } from "~/server/labs/labs.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { dublin } from "../support/dublin-time";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { seedMarkingClass } from "../support/marking-class";
import { countAllStatements } from "../support/count-statements";

let fixture: AccessFixture;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
// The class is due at 00:30 local on the night the clocks change (still GMT), with no late hand-ins.
const classDue = dublin("2027-03-28T00:30");
// The extension is due at 09:00 local the same morning, which is already IST (UTC+1): 08:00 UTC.
const extendedDue = dublin("2027-03-28T09:00");

function studentAccess(): CourseAccess {
  return {
    user: { id: fixture.userIds.ownStudent, email: "ownstudent@extensions.example", name: "ownStudent", sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "ext-A", term: "Test term", timeZone: "Europe/Dublin" },
    membership: { id: fixture.membershipIds.ownStudent, role: "student", cohortId: fixture.cohortId },
    cohortIds: [fixture.cohortId],
  } as unknown as CourseAccess;
}

async function createLab(values: Partial<typeof labs.$inferInsert> = {}, cohortIds = [fixture.cohortId]) {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title: "Extended lab",
      kind: "drag",
      status: "published",
      opensAt: dublin("2027-03-20T09:00"),
      dueAt: classDue,
      requiredDrops: 5,
      resolutions,
      ...values,
    })
    .returning();
  await db.insert(labCohorts).values(cohortIds.map((cohortId) => ({ labId: lab.id, cohortId })));
  return lab;
}

const handIn = (labId: string, key: string, now: Date) =>
  handInDropLog(db, {
    access: studentAccess(),
    labId,
    input: { sphereId: fixture.sphereId, temperatureC: 22.4, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
    idempotencyKey: key,
    now,
  });

beforeAll(async () => {
  fixture = await createAccessFixture("extensions");
  await db.update(courses).set({ timeZone: "Europe/Dublin" }).where(eq(courses.id, fixture.courseId));
});

describe("hand-ins under an extension", () => {
  it("converts the local due times across the clock change as expected", () => {
    expect(classDue.toISOString()).toBe("2027-03-28T00:30:00.000Z");
    expect(extendedDue.toISOString()).toBe("2027-03-28T08:00:00.000Z");
  });

  it("refuses after the class deadline without an extension", async () => {
    const lab = await createLab();
    await expect(handIn(lab.id, "ext-none-1", new Date("2027-03-28T07:30:00Z"))).rejects.toBeInstanceOf(AppError);
  });

  it("takes a hand-in after the class deadline as on time under the student's own extension, late up to its cut-off, refused after", async () => {
    const lab = await createLab();
    await db.insert(labExtensions).values({
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      dueAt: extendedDue,
      lateCutoffAt: dublin("2027-03-28T12:00"),
      reason: "Illness",
    });
    // 07:59 UTC is 08:59 IST: before the extended due time, though after it by GMT wall reading.
    const onTime = await handIn(lab.id, "ext-own-1", new Date("2027-03-28T07:59:00Z"));
    expect(onTime.version.late).toBe(false);
    const late = await handIn(lab.id, "ext-own-2", new Date("2027-03-28T08:01:00Z"));
    expect(late.version.late).toBe(true);
    await expect(handIn(lab.id, "ext-own-3", new Date("2027-03-28T11:01:00Z"))).rejects.toMatchObject({ code: "past_cutoff" });
  });

  it("prefers the student's own extension over the cohort's", async () => {
    const lab = await createLab();
    await db.insert(labExtensions).values([
      { labId: lab.id, cohortId: fixture.cohortId, dueAt: dublin("2027-03-29T09:00"), reason: "Kits shipped late" },
      { labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extendedDue, reason: "Illness" },
    ]);
    // After the student's own due time (no cut-off) but before the cohort's: the student's own wins, so refused.
    await expect(handIn(lab.id, "ext-prec-1", new Date("2027-03-28T09:00Z"))).rejects.toMatchObject({ code: "past_cutoff" });
    await db.delete(labExtensions).where(eq(labExtensions.membershipId, fixture.membershipIds.ownStudent));
    // With only the cohort's extension left, the same instant is on time.
    const cohortOnly = await handIn(lab.id, "ext-prec-2", new Date("2027-03-28T09:00Z"));
    expect(cohortOnly.version.late).toBe(false);
  });

  it("shows the student their own due time and cut-off on the lab list and the lab page", async () => {
    const lab = await createLab();
    const cutoff = dublin("2027-03-28T12:00");
    await db.insert(labExtensions).values({
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      dueAt: extendedDue,
      lateCutoffAt: cutoff,
      reason: "Illness",
    });
    const row = (await listLabsForMember(db, studentAccess())).find((candidate) => candidate.id === lab.id);
    expect(row && new Date(row.dueAt).toISOString()).toBe(extendedDue.toISOString());
    expect(row?.lateCutoffAt && new Date(row.lateCutoffAt).toISOString()).toBe(cutoff.toISOString());
    const context = await loadStudentLab(db, studentAccess(), lab.id);
    expect(context.window).toMatchObject({ dueAt: extendedDue, lateCutoffAt: cutoff, extendedBy: "student" });
  });

  it("keeps the class's later cut-off for an extension without one, in SQL as in the hand-in", async () => {
    const classCutoff = dublin("2027-04-02T17:00");
    const lab = await createLab({ lateCutoffAt: classCutoff });
    await db
      .insert(labExtensions)
      .values({ labId: lab.id, membershipId: fixture.membershipIds.ownStudent, dueAt: extendedDue, reason: "Illness" });
    const row = (await listLabsForMember(db, studentAccess())).find((candidate) => candidate.id === lab.id);
    expect(row?.lateCutoffAt && new Date(row.lateCutoffAt).toISOString()).toBe(classCutoff.toISOString());
    expect((await loadStudentLab(db, studentAccess(), lab.id)).window).toMatchObject({ dueAt: extendedDue, lateCutoffAt: classCutoff });
  });
});

type Staff = "instructor" | "assignedTa" | "unassignedTa";
function staffAccess(actor: Staff): CourseAccess {
  const cohortIds = {
    instructor: [fixture.cohortId, fixture.otherCohortId],
    assignedTa: [fixture.cohortId],
    unassignedTa: [fixture.otherCohortId],
  }[actor];
  return {
    user: {
      id: fixture.userIds[actor],
      email: `${actor.toLowerCase()}@extensions.example`,
      name: `Test ${actor}`,
      sessionId: null,
      via: "session",
    },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "ext-A", term: "Test term", timeZone: "Europe/Dublin" },
    membership: { id: fixture.membershipIds[actor], role: actor === "instructor" ? "instructor" : "ta", cohortId: null },
    cohortIds,
  } as unknown as CourseAccess;
}

/** The lab as the extension functions take it: with its cohorts. */
const labWithCohorts = async (labId: string) => (await getLab(db, fixture.courseId, labId))!;
const reason = "Learning-support plan: 3 extra days";
const lateOf = async (labId: string) =>
  (
    await db.execute<{ late: boolean }>(
      sql`select v.late from drop_log_versions v join drop_logs d on d.id = v.drop_log_id where d.lab_id = ${labId} order by v.version`,
    )
  ).rows.map((row) => row.late);

async function reminderJobs(labId: string) {
  const result = await db.execute<{ offset_hours: number; due_at: string; start_after: Date }>(sql`
    select (data->>'offsetHours')::int as offset_hours, data->>'dueAt' as due_at, start_after from pgboss.job
    where name = ${queues.labReminder} and data->>'labId' = ${labId} order by start_after`);
  return result.rows.map((row) => ({
    offsetHours: row.offset_hours,
    dueAt: row.due_at,
    startAfter: new Date(row.start_after).toISOString(),
  }));
}

describe("the extension form's schema", () => {
  const schema = extensionInputFor({ timeZone: "Europe/Dublin", opensAt: dublin("2027-03-20T09:00") });
  const issuesOf = (input: Record<string, unknown>) =>
    schema.safeParse(input).error?.issues.map((issue) => `${issue.path.join(".")}: ${issue.message}`) ?? [];

  it("turns the local times into instants in the course's zone, as the lab form does", () => {
    const parsed = schema.parse({
      intent: "extend-students",
      membershipIds: [fixture.membershipIds.ownStudent],
      dueAt: "2027-03-28T09:00",
      lateCutoffAt: "",
      reason,
    });
    expect(parsed).toMatchObject({ dueAt: extendedDue, lateCutoffAt: undefined, reason });
  });

  it("refuses a cut-off before the due time, a due time before the lab opens, a missing reason and a skipped local time", () => {
    expect(
      issuesOf({
        intent: "extend-cohort",
        cohortId: fixture.cohortId,
        dueAt: "2027-03-28T09:00",
        lateCutoffAt: "2027-03-28T08:59",
        reason,
      }),
    ).toEqual(["lateCutoffAt: The late cut-off cannot come before the new due time; give it the new due time for no late hand-ins."]);
    expect(issuesOf({ intent: "extend-cohort", cohortId: fixture.cohortId, dueAt: "2027-03-20T09:00", reason })).toEqual([
      "dueAt: The new due time must come after the lab opens.",
    ]);
    expect(
      issuesOf({
        intent: "extend-students",
        membershipIds: [fixture.membershipIds.ownStudent],
        dueAt: "2027-03-28T09:00",
        reason: "  ",
      })[0],
    ).toMatch(/^reason: /);
    // 01:30 on 2027-03-28 does not exist in Dublin: the clocks go from 01:00 to 02:00.
    expect(
      issuesOf({ intent: "extend-students", membershipIds: [fixture.membershipIds.ownStudent], dueAt: "2027-03-28T01:30", reason })[0],
    ).toMatch(/^dueAt: That time does not exist/);
    expect(issuesOf({ intent: "extend-students", membershipIds: [], dueAt: "2027-03-28T09:00", reason })).toEqual([
      "membershipIds: Choose at least one student.",
    ]);
    expect(issuesOf({ intent: "something-else" })).toHaveLength(1);
  });

  it("allows a cut-off equal to the due time", () => {
    expect(
      issuesOf({
        intent: "extend-cohort",
        cohortId: fixture.cohortId,
        dueAt: "2027-03-28T09:00",
        lateCutoffAt: "2027-03-28T09:00",
        reason,
      }),
    ).toEqual([]);
  });
});

describe("setting and removing extensions", () => {
  it("makes a late hand-in on time when the student is given a later due time, and late again when it is removed", async () => {
    const lab = await createLab({ lateCutoffAt: dublin("2027-03-30T09:00") });
    // 07:30 UTC is after the class's 00:30 deadline: stored late.
    const handedIn = await handIn(lab.id, "ext-relabel-1", new Date("2027-03-28T07:30:00Z"));
    expect(handedIn.version.late).toBe(true);
    const outcome = await setExtensions(db, {
      access: staffAccess("instructor"),
      lab: await labWithCohorts(lab.id),
      target: { membershipIds: [fixture.membershipIds.ownStudent] },
      window: { dueAt: extendedDue, reason },
    });
    expect(outcome).toMatchObject({ extended: 1, relabelled: 1 });
    expect(await lateOf(lab.id)).toEqual([false]);
    const [stored] = await db.select().from(labExtensions).where(eq(labExtensions.labId, lab.id));
    expect(stored).toMatchObject({
      membershipId: fixture.membershipIds.ownStudent,
      cohortId: null,
      dueAt: extendedDue,
      lateCutoffAt: null,
      reason,
      createdById: fixture.userIds.instructor,
    });

    const removed = await removeExtension(db, { access: staffAccess("instructor"), lab, extensionId: stored.id });
    expect(removed.relabelled).toBe(1);
    expect(await lateOf(lab.id)).toEqual([true]);
    const audit = await db
      .select({ action: auditEvents.action, detail: auditEvents.detail })
      .from(auditEvents)
      .where(eq(auditEvents.subject, `lab:${lab.id}`));
    expect(audit.map((event) => event.action).sort()).toEqual(["lab.extension_removed", "lab.extension_set"]);
    expect(audit.find((event) => event.action === "lab.extension_set")?.detail).toMatchObject({
      membershipIds: [fixture.membershipIds.ownStudent],
      dueAt: extendedDue.toISOString(),
      reason,
    });
  });

  it("extends a whole cohort, and a second save replaces the times rather than adding a row", async () => {
    const lab = await createLab();
    const access = staffAccess("instructor");
    const target = { cohortId: fixture.cohortId };
    await setExtensions(db, {
      access,
      lab: await labWithCohorts(lab.id),
      target,
      window: { dueAt: dublin("2027-03-29T09:00"), reason: "Kits shipped late" },
    });
    await setExtensions(db, {
      access,
      lab: await labWithCohorts(lab.id),
      target,
      window: { dueAt: extendedDue, lateCutoffAt: dublin("2027-03-29T12:00"), reason: "Kits shipped late, courier's date" },
    });
    const rows = await db.select().from(labExtensions).where(eq(labExtensions.labId, lab.id));
    expect(rows).toHaveLength(1);
    expect(rows[0]).toMatchObject({
      cohortId: fixture.cohortId,
      membershipId: null,
      dueAt: extendedDue,
      lateCutoffAt: dublin("2027-03-29T12:00"),
      reason: "Kits shipped late, courier's date",
    });
    const context = await loadStudentLab(db, studentAccess(), lab.id);
    expect(context.window).toMatchObject({ dueAt: extendedDue, extendedBy: "cohort" });
  });

  it("refuses, writing nothing, a student outside the lab's cohorts, a staff member, a cohort the lab is not set for, and a TA", async () => {
    const lab = await labWithCohorts((await createLab()).id);
    const window = { dueAt: extendedDue, reason };
    const instructor = staffAccess("instructor");
    // ownStudent is fine, otherCohortStudent's cohort is not the lab's: the whole batch is refused.
    await expect(
      setExtensions(db, {
        access: instructor,
        lab,
        target: { membershipIds: [fixture.membershipIds.ownStudent, fixture.membershipIds.otherCohortStudent] },
        window,
      }),
    ).rejects.toMatchObject({
      code: "extension_refused",
      field: "membershipIds",
      status: 400,
    });
    await expect(
      setExtensions(db, { access: instructor, lab, target: { membershipIds: [fixture.membershipIds.assignedTa] }, window }),
    ).rejects.toMatchObject({ field: "membershipIds" });
    await expect(setExtensions(db, { access: instructor, lab, target: { cohortId: fixture.otherCohortId }, window })).rejects.toMatchObject(
      { field: "cohortId" },
    );
    const ta = setExtensions(db, {
      access: staffAccess("assignedTa"),
      lab,
      target: { membershipIds: [fixture.membershipIds.ownStudent] },
      window,
    });
    await expect(ta).rejects.toBeInstanceOf(AppError);
    await expect(ta).rejects.toMatchObject({ status: 403 });
    expect(await db.select().from(labExtensions).where(eq(labExtensions.labId, lab.id))).toEqual([]);

    await setExtensions(db, { access: instructor, lab, target: { cohortId: fixture.cohortId }, window });
    const [stored] = await db.select().from(labExtensions).where(eq(labExtensions.labId, lab.id));
    await expect(removeExtension(db, { access: staffAccess("assignedTa"), lab, extensionId: stored.id })).rejects.toMatchObject({
      status: 403,
    });
    expect(await db.select().from(labExtensions).where(eq(labExtensions.labId, lab.id))).toHaveLength(1);
  });

  it("extends 500 students in one transaction with the same statements as 5, and their late hand-ins become on time", async () => {
    const labRow = await createLab({ lateCutoffAt: dublin("2027-03-30T09:00") });
    const seeded = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: labRow.id,
      cohortId: fixture.cohortId,
      figures: Array(505).fill(1),
      label: "ext-bulk",
      late: () => true,
    });
    // The seeded versions were handed in now, in 2026: moved to just after the class deadline.
    await db.execute(
      sql`update drop_log_versions v set submitted_at = ${new Date("2027-03-28T07:00:00Z")} from drop_logs d where d.id = v.drop_log_id and d.lab_id = ${labRow.id}`,
    );
    const lab = await labWithCohorts(labRow.id);
    const access = staffAccess("instructor");
    const reason = "Snow closed the post office";
    const now = new Date("2027-03-20T12:00:00Z");
    // Two due times, so that each batch queues its own two reminders (the lab's default 48 h and 6 h).
    const few = await countAllStatements(() =>
      setExtensions(db, {
        access,
        lab,
        target: { membershipIds: seeded.membershipIds.slice(0, 5) },
        window: { dueAt: extendedDue, reason },
        now,
      }),
    );
    const later = new Date(extendedDue.getTime() + 3_600_000);
    const many = await countAllStatements(() =>
      setExtensions(db, { access, lab, target: { membershipIds: seeded.membershipIds.slice(5) }, window: { dueAt: later, reason }, now }),
    );
    expect(few.result).toMatchObject({ extended: 5, relabelled: 5, remindersScheduled: 2 });
    expect(many.result).toMatchObject({ extended: 500, relabelled: 500, remindersScheduled: 2 });
    // Begin, the upsert, the late flags, two reminder jobs, the audit entry, commit.
    expect(few.statements).toBe(7);
    expect(many.statements).toBe(few.statements);
    const rows = await db.select({ updatedAt: labExtensions.updatedAt }).from(labExtensions).where(eq(labExtensions.labId, lab.id));
    expect(rows).toHaveLength(505);
    // now() is the transaction's start: one value over the 500 rows means one transaction wrote them.
    const bulkRows = await db.execute<{ n: number }>(sql`
      select count(distinct updated_at)::int as n from lab_extensions where lab_id = ${lab.id}
        and membership_id in (select value::uuid from json_array_elements_text(${JSON.stringify(seeded.membershipIds.slice(5))}::json))`);
    expect(bulkRows.rows[0].n).toBe(1);
    expect((await lateOf(lab.id)).filter(Boolean)).toEqual([]);
    const audit = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.subject, `lab:${lab.id}`), eq(auditEvents.action, "lab.extension_set")));
    expect(audit).toHaveLength(2);
  });
});

describe("who sees which extensions", () => {
  it("shows the instructor every extension, and a TA only those of their own cohorts", async () => {
    const labRow = await createLab({}, [fixture.cohortId, fixture.otherCohortId]);
    const lab = await labWithCohorts(labRow.id);
    const instructor = staffAccess("instructor");
    const window = { dueAt: extendedDue, reason };
    await setExtensions(db, { access: instructor, lab, target: { membershipIds: [fixture.membershipIds.ownStudent] }, window });
    await setExtensions(db, { access: instructor, lab, target: { membershipIds: [fixture.membershipIds.otherCohortStudent] }, window });
    await setExtensions(db, {
      access: instructor,
      lab,
      target: { cohortId: fixture.otherCohortId },
      window: { ...window, reason: "Kits shipped late" },
    });
    const seen = async (actor: Staff) =>
      (await listExtensions(db, staffAccess(actor), lab)).map((row) => row.studentName ?? `cohort ${row.cohortName}`);
    expect(await seen("instructor")).toEqual(["cohort Cohort two", "Test ownStudent", "Test otherCohortStudent"]);
    expect(await seen("assignedTa")).toEqual(["Test ownStudent"]);
    expect(await seen("unassignedTa")).toEqual(["cohort Cohort two", "Test otherCohortStudent"]);

    const taPage = await getExtensionsPage(db, staffAccess("assignedTa"), lab);
    expect(taPage.cohorts.map((cohort) => cohort.name)).toEqual(["Cohort one"]);
    expect(taPage.students).toEqual([]);
    const instructorPage = await getExtensionsPage(db, instructor, lab);
    // The fixture's own students (other tests add classes of their own to cohort one).
    expect(instructorPage.students.map((student) => student.name).filter((name) => name.startsWith("Test "))).toEqual([
      "Test ownStudent",
      "Test sameCohortStudent",
      "Test otherCohortStudent",
    ]);
    expect(instructorPage.extensions[1]).toMatchObject({ reason, setBy: "Test instructor", cohortName: "Cohort one" });
  });
});

describe("reminders for an extended due time", () => {
  const hour = 3_600_000;
  it("queues the lab's reminders for a new due time once, and none for a draft lab", async () => {
    const now = new Date("2027-03-25T12:00:00Z");
    const lab = await labWithCohorts((await createLab({ reminderOffsetsHours: [48, 6] }, [fixture.cohortId, fixture.otherCohortId])).id);
    const access = staffAccess("instructor");
    const first = await setExtensions(db, {
      access,
      lab,
      target: { membershipIds: [fixture.membershipIds.ownStudent] },
      window: { dueAt: extendedDue, reason },
      now,
    });
    expect(first.remindersScheduled).toBe(2);
    expect(await reminderJobs(lab.id)).toEqual([
      { offsetHours: 48, dueAt: extendedDue.toISOString(), startAfter: new Date(extendedDue.getTime() - 48 * hour).toISOString() },
      { offsetHours: 6, dueAt: extendedDue.toISOString(), startAfter: new Date(extendedDue.getTime() - 6 * hour).toISOString() },
    ]);
    // Another student, the same due time: its jobs are already queued.
    const again = await setExtensions(db, {
      access,
      lab,
      target: { membershipIds: [fixture.membershipIds.otherCohortStudent] },
      window: { dueAt: extendedDue, reason },
      now,
    });
    expect(again.remindersScheduled).toBe(0);
    // A cohort with a due time 40 h after now: the 48 h reminder's moment has passed, the 6 h one is queued.
    const soon = new Date(now.getTime() + 40 * hour);
    await setExtensions(db, {
      access,
      lab,
      target: { cohortId: fixture.otherCohortId },
      window: { dueAt: soon, reason: "Kits shipped late" },
      now,
    });
    expect((await reminderJobs(lab.id)).filter((job) => job.dueAt === soon.toISOString()).map((job) => job.offsetHours)).toEqual([6]);

    const draft = await labWithCohorts((await createLab({ status: "draft", reminderOffsetsHours: [48, 6] })).id);
    const drafted = await setExtensions(db, {
      access,
      lab: draft,
      target: { membershipIds: [fixture.membershipIds.ownStudent] },
      window: { dueAt: extendedDue, reason },
      now,
    });
    expect(drafted.remindersScheduled).toBe(0);
    expect(await reminderJobs(draft.id)).toEqual([]);
  });
});

describe("the extensions page over HTTP", () => {
  let handle: AppHandler;
  beforeAll(async () => {
    handle = await createAppHandler();
  });
  const post = async (actor: "instructor" | "assignedTa", fields: Record<string, string>) =>
    handle(
      new Request(new URL(`/courses/${fixture.courseId}/labs/${fixture.labId}/extensions.data`, appOrigin()), {
        method: "POST",
        body: new URLSearchParams(fields),
        headers: { Cookie: await sessionCookieFor(fixture.userIds[actor]), Origin: appOrigin() },
      }),
    );
  const stored = () => db.select().from(labExtensions).where(eq(labExtensions.labId, fixture.labId));

  it("answers a refused form with 400, the message at its field and the input kept; a good one is stored", async () => {
    const fields = {
      intent: "extend-students",
      membershipIds: fixture.membershipIds.ownStudent,
      dueAt: "2027-04-02T17:00",
      lateCutoffAt: "2027-04-01T17:00",
      reason: "Hospital appointment",
    };
    const refused = await post("instructor", fields);
    expect(refused.status).toBe(400);
    const text = await refused.text();
    expect(text).toContain("lateCutoffAt");
    expect(text).toContain("The late cut-off cannot come before the new due time");
    expect(text).toContain("Hospital appointment");
    expect(await stored()).toEqual([]);

    const accepted = await post("instructor", { ...fields, lateCutoffAt: "" });
    expect(accepted.status).toBe(200);
    expect(await stored()).toMatchObject([
      {
        membershipId: fixture.membershipIds.ownStudent,
        dueAt: dublin("2027-04-02T17:00"),
        lateCutoffAt: null,
        reason: "Hospital appointment",
      },
    ]);
  });

  it("refuses a TA's write with 403, and shows the TA the list without the forms", async () => {
    const before = await stored();
    const refused = await post("assignedTa", {
      intent: "extend-cohort",
      cohortId: fixture.cohortId,
      dueAt: "2027-04-03T17:00",
      reason: "Kits shipped late",
    });
    expect(refused.status).toBe(403);
    expect(await stored()).toEqual(before);
    const page = await handle(
      appRequest(`/courses/${fixture.courseId}/labs/${fixture.labId}/extensions`, {
        cookie: await sessionCookieFor(fixture.userIds.assignedTa),
      }),
    );
    expect(page.status).toBe(200);
    const html = await page.text();
    expect(html).toContain("Instructors set and remove extensions.");
    expect(html).not.toContain("Extend the whole cohort");
  });
});
