/**
 * A record per student: each section shows what was seeded for the student and nothing of another
 * student; a TA of another cohort is refused; the statement count is the same for a student with little
 * history in a class of 10 and one with a long history in a class of 1,000.
 */
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  courseMessageRecipients,
  courseMessages,
  courses,
  dropLogs,
  dropLogVersions,
  emailOutbox,
  invitations,
  kitEvents,
  kits,
  labCohorts,
  labExtensions,
  labs,
  markChanges,
  marks,
  rubricCriteria,
  users,
} from "~/db/schema";
import type { DropLogInput } from "~/lib/drop-logs/drop-log-input";
import type { KitRecords, StoredReduction } from "~/lib/drop-logs/reduce-drop-log";
import type { MarkState } from "~/lib/marking/marks";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import { db } from "~/server/db.server";
import { findRecordMember, loadStudentRecord, type RecordMember } from "~/server/members/student-record.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { seedClass } from "../support/comparison-class";
import { countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let handle: AppHandler;
const base = new Date("2027-02-01T10:00:00Z");
const minutes = (n: number) => new Date(base.getTime() + n * 60_000);

function accessOf(
  courseId: string,
  role: "instructor" | "ta",
  { userId, membershipId, cohortIds }: { userId: string; membershipId: string; cohortIds: string[] },
): CourseAccess {
  return {
    user: { id: userId, email: `${role}@record.example`, name: `Test ${role}`, sessionId: null, via: "session" },
    course: { id: courseId, title: "Settling Spheres", code: "record-A", term: "Test term", timeZone: "UTC", archivedAt: null },
    membership: { id: membershipId, role, cohortId: null },
    cohortIds,
  } as unknown as CourseAccess;
}

const instructorAccess = () =>
  accessOf(fixture.courseId, "instructor", {
    userId: fixture.userIds.instructor,
    membershipId: fixture.membershipIds.instructor,
    cohortIds: [fixture.cohortId, fixture.otherCohortId],
  });

async function memberOf(courseId: string, membershipId: string): Promise<RecordMember> {
  return (await findRecordMember(db, courseId, membershipId))!;
}

const markState = (total: number): MarkState => ({ total, dropLogVersionId: null, scores: {}, feedback: "", latePenaltyPoints: 0 });

beforeAll(async () => {
  fixture = await createAccessFixture("record");
  handle = await createAppHandler();
  const own = fixture.membershipIds.ownStudent;
  const other = fixture.membershipIds.sameCohortStudent;
  const instructor = fixture.userIds.instructor;
  await db.update(users).set({ studentNumber: "S-1001" }).where(eq(users.id, fixture.userIds.ownStudent));

  // Kit K-01 (the fixture's, at ownStudent's home): its journey to them.
  await db.insert(kitEvents).values([
    { kitId: fixture.kitId, actorId: instructor, toState: "on_shelf", action: "created", createdAt: minutes(0) },
    {
      kitId: fixture.kitId,
      actorId: instructor,
      fromState: "on_shelf",
      toState: "packed",
      action: "moved",
      detail: { holderMembershipId: own },
      note: "Packed for own",
      createdAt: minutes(1),
    },
    {
      kitId: fixture.kitId,
      actorId: instructor,
      fromState: "packed",
      toState: "in_transit",
      action: "moved",
      detail: { holderMembershipId: own },
      createdAt: minutes(2),
    },
    {
      kitId: fixture.kitId,
      actorId: instructor,
      fromState: "in_transit",
      toState: "at_home",
      action: "moved",
      detail: { holderMembershipId: own },
      createdAt: minutes(3),
    },
  ]);
  // Kit K-02: held by the other student, then by ownStudent, then by the other student again.
  const [shared] = await db
    .insert(kits)
    .values({ courseId: fixture.courseId, number: "K-02", state: "packed", holderMembershipId: other })
    .returning();
  const move = (from: string | null, to: string, holder: string | null, at: number, note: string | null = null) => ({
    kitId: shared.id,
    actorId: instructor,
    fromState: from as "on_shelf",
    toState: to as "packed",
    action: "moved",
    detail: { holderMembershipId: holder },
    note,
    createdAt: minutes(at),
  });
  await db.insert(kitEvents).values([
    { kitId: shared.id, actorId: instructor, toState: "on_shelf", action: "created", createdAt: minutes(10) },
    move("on_shelf", "packed", other, 11, "First use by the other student"),
    move("packed", "in_transit", other, 12),
    move("in_transit", "at_home", other, 13),
    move("at_home", "coming_back", other, 14),
    move("coming_back", "checked_in", null, 15, "Other student's kit back"),
    move("checked_in", "on_shelf", null, 16),
    move("on_shelf", "packed", own, 20, "Second kit for own"),
    move("packed", "in_transit", own, 21),
    move("in_transit", "at_home", own, 22),
    {
      kitId: shared.id,
      actorId: fixture.userIds.ownStudent,
      action: "reported",
      detail: { problem: "damaged" as const },
      note: "Own's chipped sphere",
      createdAt: minutes(23),
    },
    move("at_home", "coming_back", own, 24),
    move("coming_back", "checked_in", null, 25, "Own's kit back"),
    move("checked_in", "on_shelf", null, 26),
    move("on_shelf", "packed", other, 30, "Second use by the other student"),
  ]);

  // Hand-ins: ownStudent's is the fixture's real one; the other student hands in too.
  const [otherLog] = await db.insert(dropLogs).values({ labId: fixture.labId, membershipId: other }).returning();
  const [otherVersion] = await db
    .insert(dropLogVersions)
    .values({
      dropLogId: otherLog.id,
      version: 1,
      idempotencyKey: "record-other-hand-in",
      input: {} as DropLogInput,
      kitRecords: {} as KitRecords,
      reduction: {} as StoredReduction,
    })
    .returning();
  await db.update(dropLogs).set({ latestVersionId: otherVersion.id }).where(eq(dropLogs.id, otherLog.id));

  // Marks: a rubric of 10 points; ownStudent's mark was changed after release, the other's once.
  await db.insert(rubricCriteria).values({ labId: fixture.labId, position: 1, title: "Drops", kind: "range", maxPoints: 10 });
  const [ownMark, otherMark] = await db
    .insert(marks)
    .values([
      { labId: fixture.labId, membershipId: own, total: 8, releasedAt: minutes(40) },
      { labId: fixture.labId, membershipId: other, total: 3 },
    ])
    .returning();
  await db.insert(markChanges).values([
    {
      markId: ownMark.id,
      labId: fixture.labId,
      membershipId: own,
      changedById: instructor,
      changedAt: minutes(35),
      new: markState(6),
      source: "desk",
    },
    {
      markId: ownMark.id,
      labId: fixture.labId,
      membershipId: own,
      changedById: instructor,
      changedAt: minutes(45),
      old: markState(6),
      new: markState(8),
      reason: "Re-counted the drops",
      source: "moderation",
      afterRelease: true,
    },
    {
      markId: otherMark.id,
      labId: fixture.labId,
      membershipId: other,
      changedById: instructor,
      changedAt: minutes(36),
      new: markState(3),
      reason: "Other student's reason",
      source: "desk",
    },
  ]);

  // Extensions: their own, their cohort's; the other student's own and the other cohort's are not theirs.
  const due = minutes(60 * 24 * 10);
  await db.insert(labExtensions).values([
    { labId: fixture.labId, membershipId: own, dueAt: due, reason: "Own illness", createdById: instructor },
    { labId: fixture.labId, cohortId: fixture.cohortId, dueAt: due, reason: "Cohort one's field trip", createdById: instructor },
    { labId: fixture.labId, membershipId: other, dueAt: due, reason: "Other student's reason", createdById: instructor },
    { labId: fixture.labId, cohortId: fixture.otherCohortId, dueAt: due, reason: "Cohort two's reason", createdById: instructor },
  ]);

  // E-mails: two to ownStudent in this course, one to them from the other course, one to the other student.
  const outbox = (to: string, subject: string, status: "sent" | "failed" | "queued", courseId = fixture.courseId, at = 50) => ({
    toAddress: to,
    template: "kit-shipped",
    props: {},
    subject,
    courseId,
    status,
    createdAt: minutes(at),
    sentAt: status === "sent" ? minutes(at + 1) : null,
    failedAt: status === "failed" ? minutes(at + 1) : null,
  });
  const [, , , messageCopy] = await db
    .insert(emailOutbox)
    .values([
      outbox("ownstudent@record.example", "Your kit is on its way", "sent"),
      outbox("ownstudent@record.example", "Marks released", "failed", fixture.courseId, 52),
      outbox("ownstudent@record.example", "From another course", "sent", fixture.otherCourseId),
      outbox("ownstudent@record.example", "Lab 2 is due Friday", "queued", fixture.courseId, 55),
      outbox("samecohortstudent@record.example", "Other student's e-mail", "sent"),
    ])
    .returning();

  // Messages: one to both students (with ownStudent's outbox copy), one to the other student only.
  const [toBoth, toOther] = await db
    .insert(courseMessages)
    .values([
      {
        courseId: fixture.courseId,
        authorId: instructor,
        subject: "Lab 2 is due Friday",
        body: "Hand in by Friday.",
        audience: {},
        audienceLabel: "Cohort one",
        recipientCount: 2,
        sendKey: "a",
        createdAt: minutes(55),
      },
      {
        courseId: fixture.courseId,
        authorId: instructor,
        subject: "Only for the other student",
        body: "…",
        audience: {},
        audienceLabel: "Not handed in",
        recipientCount: 1,
        sendKey: "b",
        createdAt: minutes(56),
      },
    ])
    .returning();
  await db.insert(courseMessageRecipients).values([
    { messageId: toBoth.id, membershipId: own, outboxId: messageCopy.id },
    { messageId: toBoth.id, membershipId: other },
    { messageId: toOther.id, membershipId: other },
  ]);

  // Audit: entries about them (their membership, their invitation, an extension naming them) and others.
  const [invitation] = await db
    .insert(invitations)
    .values({
      courseId: fixture.courseId,
      email: "ownstudent@record.example",
      role: "student",
      tokenHash: randomUUID(),
      expiresAt: minutes(9999),
    })
    .returning();
  await db.insert(auditEvents).values([
    {
      courseId: fixture.courseId,
      actorId: instructor,
      action: "course.invitation_sent",
      subject: `invitation:${invitation.id}`,
      createdAt: minutes(-10),
    },
    { courseId: fixture.courseId, actorId: instructor, action: "address.viewed", subject: `membership:${own}`, createdAt: minutes(5) },
    {
      courseId: fixture.courseId,
      actorId: instructor,
      action: "lab.extension_set",
      subject: `lab:${fixture.labId}`,
      detail: { membershipIds: [own], reason: "Own illness" },
      createdAt: minutes(6),
    },
    { courseId: fixture.courseId, actorId: instructor, action: "address.viewed", subject: `membership:${other}`, createdAt: minutes(7) },
    {
      courseId: fixture.courseId,
      actorId: instructor,
      action: "lab.extension_set",
      subject: `lab:${fixture.labId}`,
      detail: { membershipIds: [other], reason: "Other student's reason" },
      createdAt: minutes(8),
    },
    { courseId: fixture.otherCourseId, actorId: instructor, action: "address.viewed", subject: `membership:${own}`, createdAt: minutes(9) },
  ]);
});

describe("a student's record", () => {
  it("shows in each section what is theirs, newest first, and nothing of another student", async () => {
    const member = await memberOf(fixture.courseId, fixture.membershipIds.ownStudent);
    expect(member).toMatchObject({
      name: "Test ownStudent",
      studentNumber: "S-1001",
      cohortName: "Cohort one",
      role: "student",
      removedAt: null,
    });
    const record = await loadStudentRecord(db, { access: instructorAccess(), member });

    // Kits: K-02's middle holding (theirs) and K-01's journey; neither of the other student's holdings of K-02.
    const notes = record.kitEvents.rows.map((event) => event.note).filter(Boolean);
    expect(notes).toEqual(["Own's kit back", "Own's chipped sphere", "Second kit for own", "Packed for own"]);
    const k02 = record.kitEvents.rows.filter((event) => event.kitNumber === "K-02");
    expect(k02.map((event) => event.createdAt)).toEqual([26, 25, 24, 23, 22, 21, 20].map(minutes));
    // K-01, theirs now: its journey from its packing for them (its making was nobody's holding).
    expect(record.kitEvents.rows.filter((event) => event.kitNumber === "K-01").map((event) => event.toState)).toEqual([
      "at_home",
      "in_transit",
      "packed",
    ]);

    // Hand-ins: their one version, counting, and none of the other student's.
    expect(record.versions.rows.map((version) => [version.dropLogId, version.version, version.counts])).toEqual([
      [fixture.dropLogId, 1, true],
    ]);

    // Marks: their mark of 8 out of 10, released, with both changes newest first.
    expect(record.marks.rows).toHaveLength(1);
    expect(record.marks.rows[0]).toMatchObject({ total: 8, maxPoints: 10, releasedAt: minutes(40) });
    expect(
      record.marks.rows[0].changes.rows.map((change) => [change.oldTotal, change.newTotal, change.reason, change.afterRelease]),
    ).toEqual([
      [6, 8, "Re-counted the drops", true],
      [null, 6, null, false],
    ]);

    // Extensions: their own and their cohort's.
    expect(record.extensions.rows.map((extension) => [extension.reason, extension.forCohort]).sort()).toEqual([
      ["Cohort one's field trip", true],
      ["Own illness", false],
    ]);

    // E-mails: this course's to their address, newest first, with status (other features' e-mails to them aside).
    expect(record.emails.rows.filter((email) => email.template === "kit-shipped").map((email) => [email.subject, email.status])).toEqual([
      ["Lab 2 is due Friday", "queued"],
      ["Marks released", "failed"],
      ["Your kit is on its way", "sent"],
    ]);

    // Messages: the one they were among the recipients of, with their copy's status.
    expect(record.messages.rows.map((message) => [message.subject, message.status])).toEqual([["Lab 2 is due Friday", "queued"]]);

    // Audit: about them in this course only.
    expect(record.audit!.rows.map((event) => [event.action, event.createdAt])).toEqual([
      ["lab.extension_set", minutes(6)],
      ["address.viewed", minutes(5)],
      ["course.invitation_sent", minutes(-10)],
    ]);

    // The view itself is recorded.
    const views = await db.select().from(auditEvents).where(eq(auditEvents.action, "member.record_viewed"));
    expect(views.map((view) => [view.actorId, view.subject])).toEqual([
      [fixture.userIds.instructor, `membership:${fixture.membershipIds.ownStudent}`],
    ]);
  });

  it("cuts a long list at its latest entries and says so", async () => {
    const member = await memberOf(fixture.courseId, fixture.membershipIds.ownStudent);
    const record = await loadStudentRecord(db, { access: instructorAccess(), member, limit: 2 });
    expect(record.kitEvents).toMatchObject({ more: true });
    expect(record.kitEvents.rows.map((event) => event.createdAt)).toEqual([minutes(26), minutes(25)]);
    expect(record.emails.rows).toHaveLength(2);
    expect(record.emails.more).toBe(true);
    expect(record.versions.more).toBe(false);
  });

  it("gives a TA of the student's cohort the record without the audit section", async () => {
    const member = await memberOf(fixture.courseId, fixture.membershipIds.ownStudent);
    const access = accessOf(fixture.courseId, "ta", {
      userId: fixture.userIds.assignedTa,
      membershipId: fixture.membershipIds.assignedTa,
      cohortIds: [fixture.cohortId],
    });
    const record = await loadStudentRecord(db, { access, member });
    expect(record.audit).toBeNull();
    expect(record.emails.rows.map((email) => email.subject)).toContain("Your kit is on its way");
  });

  it("answers the page for the instructor and the cohort's TA, refuses another cohort's TA, and finds no record for staff", async () => {
    const path = `/courses/${fixture.courseId}/members/${fixture.membershipIds.ownStudent}/record`;
    const get = async (actor: "instructor" | "assignedTa" | "unassignedTa" | "ownStudent", at = path) => {
      const response = await handle(appRequest(at, { cookie: await sessionCookieFor(fixture.userIds[actor]) }));
      return { status: response.status, text: await response.text() };
    };
    const instructor = await get("instructor");
    expect(instructor.status).toBe(200);
    expect(instructor.text).toContain("Re-counted the drops");
    expect(instructor.text).toContain("Audit entries about them");
    const ta = await get("assignedTa");
    expect(ta.status).toBe(200);
    expect(ta.text).toContain("Own illness");
    expect(ta.text).not.toContain("Audit entries about them");
    expect((await get("unassignedTa")).status).toBe(403);
    const denied = await db.select().from(auditEvents).where(eq(auditEvents.actorId, fixture.userIds.unassignedTa));
    expect(denied.map((event) => event.action)).toContain("access.denied");
    // The student has no record page of their own: their lab and kit pages show them their work.
    expect((await get("ownStudent")).status).toBe(403);
    // A TA's membership is not a student's: no record.
    expect((await get("instructor", `/courses/${fixture.courseId}/members/${fixture.membershipIds.assignedTa}/record`)).status).toBe(404);
    expect((await get("instructor", `/courses/${fixture.courseId}/members/not-an-id/record`)).status).toBe(404);
  });

  it("keeps a removed student's record and says they were removed", async () => {
    const [removed] = await db.insert(users).values({ email: "removed@record.example", name: "Removed Student" }).returning();
    const [membership] = await db
      .insert(courseMemberships)
      .values({ courseId: fixture.courseId, userId: removed.id, role: "student", cohortId: fixture.cohortId, removedAt: minutes(100) })
      .returning();
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/members/${membership.id}/record`, {
        cookie: await sessionCookieFor(fixture.userIds.instructor),
      }),
    );
    expect(response.status).toBe(200);
    expect(await response.text()).toContain("Removed from the course on");
  });
});

/** A course with a class of `size` students, one version each, and an instructor. */
async function seedCourse(label: string, size: number) {
  const [course] = await db.insert(courses).values({ title: "Big class", code: label, term: "Test term", timeZone: "UTC" }).returning();
  const [cohort] = await db.insert(cohorts).values({ courseId: course.id, name: "All" }).returning();
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: course.id,
      title: "Lab 1",
      kind: "drag",
      status: "published",
      opensAt: minutes(0),
      dueAt: minutes(600),
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
    })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: cohort.id });
  const dropLogIds = await seedClass(db, {
    courseId: course.id,
    labId: lab.id,
    cohortId: cohort.id,
    members: Array.from({ length: size }, () => ({ figure: 1 })),
    label,
  });
  const [teacher] = await db
    .insert(users)
    .values({ email: `${label}-teacher@record.example`, name: "Teacher" })
    .returning();
  const [teaching] = await db.insert(courseMemberships).values({ courseId: course.id, userId: teacher.id, role: "instructor" }).returning();
  const [first] = await db.select({ membershipId: dropLogs.membershipId }).from(dropLogs).where(eq(dropLogs.id, dropLogIds[0]));
  const access = accessOf(course.id, "instructor", { userId: teacher.id, membershipId: teaching.id, cohortIds: [cohort.id] });
  return { courseId: course.id, labId: lab.id, dropLogId: dropLogIds[0], membershipId: first.membershipId, access, teacherId: teacher.id };
}

describe("the record's statement count", () => {
  it("is the same for little history in a class of 10 and a long history in a class of 1,000", async () => {
    const small = await seedCourse("record-small", 10);
    const large = await seedCourse("record-large", 1000);

    // The large class's student: 40 more versions, 3 kits of 30 moves, 60 mark changes, 150 e-mails, messages and audit entries.
    const { membershipId, courseId, teacherId } = large;
    await insertMany(
      db,
      dropLogVersions,
      Array.from({ length: 40 }, (_, i) => ({
        dropLogId: large.dropLogId,
        version: i + 2,
        idempotencyKey: `long-${i}`,
        input: {} as DropLogInput,
        kitRecords: {} as KitRecords,
        reduction: {} as StoredReduction,
        submittedAt: minutes(i),
      })),
    );
    const kitRows = await db
      .insert(kits)
      .values(
        [1, 2, 3].map((n) => ({
          courseId,
          number: `L-${n}`,
          state: "at_home" as const,
          holderMembershipId: n === 3 ? membershipId : null,
        })),
      )
      .returning();
    await insertMany(
      db,
      kitEvents,
      kitRows.flatMap((kit) =>
        Array.from({ length: 30 }, (_, i) => ({
          kitId: kit.id,
          actorId: teacherId,
          action: "moved",
          fromState: "at_home" as const,
          toState: "at_home" as const,
          detail: { holderMembershipId: membershipId },
          createdAt: minutes(i),
        })),
      ),
    );
    const [mark] = await db.insert(marks).values({ labId: large.labId, membershipId, total: 5 }).returning();
    await insertMany(
      db,
      markChanges,
      Array.from({ length: 60 }, (_, i) => ({
        markId: mark.id,
        labId: large.labId,
        membershipId,
        changedAt: minutes(i),
        new: markState(i),
        source: "desk" as const,
      })),
    );
    const [email] = await db
      .select({ email: users.email })
      .from(users)
      .innerJoin(courseMemberships, eq(courseMemberships.userId, users.id))
      .where(eq(courseMemberships.id, membershipId));
    await insertMany(
      db,
      emailOutbox,
      Array.from({ length: 150 }, (_, i) => ({
        toAddress: email.email,
        template: "kit-shipped",
        props: {},
        subject: `E-mail ${i}`,
        courseId,
        createdAt: minutes(i),
      })),
    );
    const messageRows = await db
      .insert(courseMessages)
      .values(
        Array.from({ length: 20 }, (_, i) => ({
          courseId,
          authorId: teacherId,
          subject: `Message ${i}`,
          body: "…",
          audience: {},
          audienceLabel: "All",
          recipientCount: 1,
          sendKey: `m-${i}`,
        })),
      )
      .returning();
    await db.insert(courseMessageRecipients).values(messageRows.map((message) => ({ messageId: message.id, membershipId })));
    await insertMany(
      db,
      auditEvents,
      Array.from({ length: 150 }, (_, i) => ({
        courseId,
        actorId: teacherId,
        action: "address.viewed",
        subject: `membership:${membershipId}`,
        createdAt: minutes(i),
      })),
    );

    const little = await countStatements(async () =>
      loadStudentRecord(db, { access: small.access, member: await memberOf(small.courseId, small.membershipId) }),
    );
    const long = await countStatements(async () =>
      loadStudentRecord(db, { access: large.access, member: await memberOf(large.courseId, large.membershipId) }),
    );
    // The member, seven sections side by side, the view's audit entry.
    expect(little.statements).toBe(9);
    expect(long.statements).toBe(little.statements);
    expect(little.result.versions.rows).toHaveLength(1);
    expect(long.result.versions.rows).toHaveLength(41);
    expect(long.result.kitEvents).toMatchObject({ more: false });
    expect(long.result.kitEvents.rows).toHaveLength(90);
    expect(long.result.emails).toMatchObject({ more: true });
    expect(long.result.emails.rows).toHaveLength(100);
    expect(long.result.audit).toMatchObject({ more: true });
    expect(long.result.marks.rows[0].changes.rows).toHaveLength(60);
    expect(long.result.messages.rows).toHaveLength(20);
  });
});
