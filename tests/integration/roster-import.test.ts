import { randomUUID } from "node:crypto";
import { and, eq, inArray, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { emailOutbox, invitations } from "~/db/schema";
import type { RosterRow } from "~/lib/roster/roster-rows";
import { db } from "~/server/db.server";
import { importRoster } from "~/server/members/roster-import.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
beforeAll(async () => {
  fixture = await createAccessFixture("roster");
});

const row = (line: number, email: string, cohort = "Cohort one", role = "student"): RosterRow => ({
  line,
  email,
  name: `Person ${line}`,
  cohort,
  role,
  studentNumber: "",
});
const inviter = (of = fixture) => ({ id: of.userIds.instructor, name: "Test instructor" });

async function invitationsOf(courseId: string) {
  return db
    .select({ email: invitations.email, role: invitations.role, cohortId: invitations.cohortId })
    .from(invitations)
    .where(eq(invitations.courseId, courseId));
}

async function openInvitationsOf(courseId: string) {
  return db
    .select({ id: invitations.id, email: invitations.email })
    .from(invitations)
    .where(sql`${invitations.courseId} = ${courseId} and ${invitations.acceptedAt} is null and ${invitations.expiresAt} > now()`);
}

// The fixture's hand-ins queue their receipts in the same course: only invitations are the import's.
const invitationEmailsOf = (courseId: string) => and(eq(emailOutbox.courseId, courseId), eq(emailOutbox.template, "course-invitation"));

describe("roster import", () => {
  it("writes nothing when one row has a problem the course reveals at commit time", async () => {
    const result = await importRoster(db, {
      courseId: fixture.courseId,
      inviter: inviter(),
      importKey: randomUUID(),
      rows: [row(2, "fresh.one@uni.example"), row(3, "ownstudent@roster.example", "Cohort one", "ta"), row(4, "fresh.two@uni.example")],
    });
    expect(result).toMatchObject({
      ok: false,
      problems: [
        { row: { line: 3 }, problems: ["Already a student in this course: an import does not change roles (do that on the member page)."] },
      ],
    });
    expect(await invitationsOf(fixture.courseId)).toEqual([]);
    expect(await db.select().from(emailOutbox).where(invitationEmailsOf(fixture.courseId))).toEqual([]);
  });

  it("invites every row in one go, students to their cohort and TAs to theirs, each with a queued e-mail", async () => {
    const result = await importRoster(db, {
      courseId: fixture.courseId,
      inviter: inviter(),
      importKey: randomUUID(),
      rows: [
        row(2, "a.student@uni.example"),
        row(3, "b.student@uni.example", "cohort TWO"),
        row(4, "c.assistant@uni.example", "Cohort one", "ta"),
      ],
    });
    expect(result).toEqual({ ok: true, duplicate: false, invited: 3, students: 2, tas: 1, updated: 0, unchanged: 0 });
    const rows = await invitationsOf(fixture.courseId);
    expect(rows).toEqual(
      expect.arrayContaining([
        { email: "a.student@uni.example", role: "student", cohortId: fixture.cohortId },
        { email: "b.student@uni.example", role: "student", cohortId: fixture.otherCohortId },
        { email: "c.assistant@uni.example", role: "ta", cohortId: fixture.cohortId },
      ]),
    );
    const mail = await db
      .select({ to: emailOutbox.toAddress, template: emailOutbox.template })
      .from(emailOutbox)
      .where(invitationEmailsOf(fixture.courseId));
    expect(mail).toHaveLength(3);
    expect(new Set(mail.map((m) => m.template))).toEqual(new Set(["course-invitation"]));
  });

  it("invites rows whose names have quotes and angle brackets, each with a queued e-mail", async () => {
    const rows = [
      { ...row(2, "quoted.one@uni.example"), name: 'Ann "Nan" Lee' },
      { ...row(3, "quoted.two@uni.example"), name: "Bo <Bo> Lee" },
    ];
    expect(await importRoster(db, { courseId: fixture.courseId, inviter: inviter(), importKey: randomUUID(), rows })).toMatchObject({
      ok: true,
      invited: 2,
    });
    const mail = await db
      .select({ to: emailOutbox.toAddress, toName: emailOutbox.toName, status: emailOutbox.status })
      .from(emailOutbox)
      .where(inArray(emailOutbox.toAddress, ["quoted.one@uni.example", "quoted.two@uni.example"]));
    expect(mail).toEqual(
      expect.arrayContaining([
        { to: "quoted.one@uni.example", toName: 'Ann "Nan" Lee', status: "queued" },
        { to: "quoted.two@uni.example", toName: "Bo <Bo> Lee", status: "queued" },
      ]),
    );
  });

  it("commits the same preview once: the second commit sends nothing and the first e-mails stay valid", async () => {
    const course = await createAccessFixture("roster-twice");
    const courseId = course.courseId;
    const importKey = randomUUID();
    const rows = [row(2, "twice.one@uni.example"), row(3, "twice.two@uni.example")];
    const first = await importRoster(db, { courseId, inviter: inviter(course), importKey, rows });
    expect(first).toMatchObject({ ok: true, duplicate: false, invited: 2 });
    const openAfterFirst = await openInvitationsOf(courseId);
    expect(openAfterFirst).toHaveLength(2);

    const second = await importRoster(db, { courseId, inviter: inviter(course), importKey, rows });
    expect(second).toMatchObject({ ok: true, duplicate: true, rowCount: 2 });
    expect(second.ok && second.duplicate && second.committedAt).toBeInstanceOf(Date);
    // The first invitations are still the open ones: their links keep working.
    expect(await openInvitationsOf(courseId)).toEqual(openAfterFirst);
    expect(await invitationsOf(courseId)).toHaveLength(2);
    expect(await db.select().from(emailOutbox).where(invitationEmailsOf(courseId))).toHaveLength(2);
  });

  it("invites once when two commits of the same preview race each other", async () => {
    const course = await createAccessFixture("roster-race");
    const courseId = course.courseId;
    const importKey = randomUUID();
    const rows = [row(2, "race.one@uni.example"), row(3, "race.two@uni.example"), row(4, "race.three@uni.example")];
    const results = await Promise.all([1, 2].map(() => importRoster(db, { courseId, inviter: inviter(course), importKey, rows })));
    expect(results.map((result) => result.ok && result.duplicate).sort()).toEqual([false, true]);
    expect(await invitationsOf(courseId)).toHaveLength(3);
    expect(await db.select().from(emailOutbox).where(invitationEmailsOf(courseId))).toHaveLength(3);
  });

  it("leaves a refused preview's key free, so the same preview imports once the course allows it", async () => {
    const course = await createAccessFixture("roster-retry");
    const courseId = course.courseId;
    const importKey = randomUUID();
    const refused = await importRoster(db, {
      courseId,
      inviter: inviter(course),
      importKey,
      rows: [row(2, "retry.one@uni.example", "No such cohort")],
    });
    expect(refused.ok).toBe(false);
    const retried = await importRoster(db, { courseId, inviter: inviter(course), importKey, rows: [row(2, "retry.one@uni.example")] });
    expect(retried).toMatchObject({ ok: true, duplicate: false, invited: 1 });
  });
});
