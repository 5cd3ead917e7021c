import { eq, inArray } from "drizzle-orm";
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

const row = (line: number, email: string, cohort = "Cohort one", role = "student"): RosterRow => ({ line, email, name: `Person ${line}`, cohort, role });
const inviter = () => ({ id: fixture.userIds.instructor, name: "Test instructor" });

async function invitationsOf(courseId: string) {
  return db.select({ email: invitations.email, role: invitations.role, cohortId: invitations.cohortId }).from(invitations).where(eq(invitations.courseId, courseId));
}

describe("roster import", () => {
  it("writes nothing when one row has a problem the course reveals at commit time", async () => {
    const result = await importRoster(db, {
      courseId: fixture.courseId,
      inviter: inviter(),
      rows: [row(2, "fresh.one@uni.example"), row(3, "ownstudent@roster.example"), row(4, "fresh.two@uni.example")],
    });
    expect(result).toMatchObject({ ok: false, problems: [{ row: { line: 3 }, problems: ["Already a member of this course."] }] });
    expect(await invitationsOf(fixture.courseId)).toEqual([]);
    expect(await db.select().from(emailOutbox).where(eq(emailOutbox.courseId, fixture.courseId))).toEqual([]);
  });

  it("invites every row in one go, students to their cohort and TAs to theirs, each with a queued e-mail", async () => {
    const result = await importRoster(db, {
      courseId: fixture.courseId,
      inviter: inviter(),
      rows: [row(2, "a.student@uni.example"), row(3, "b.student@uni.example", "cohort TWO"), row(4, "c.assistant@uni.example", "Cohort one", "ta")],
    });
    expect(result).toEqual({ ok: true, invited: 3, students: 2, tas: 1 });
    const rows = await invitationsOf(fixture.courseId);
    expect(rows).toEqual(
      expect.arrayContaining([
        { email: "a.student@uni.example", role: "student", cohortId: fixture.cohortId },
        { email: "b.student@uni.example", role: "student", cohortId: fixture.otherCohortId },
        { email: "c.assistant@uni.example", role: "ta", cohortId: fixture.cohortId },
      ]),
    );
    const mail = await db.select({ to: emailOutbox.toAddress, template: emailOutbox.template }).from(emailOutbox).where(eq(emailOutbox.courseId, fixture.courseId));
    expect(mail).toHaveLength(3);
    expect(new Set(mail.map((m) => m.template))).toEqual(new Set(["course-invitation"]));
  });

  it("invites rows whose names have quotes and angle brackets, each with a queued e-mail", async () => {
    const rows = [{ ...row(2, "quoted.one@uni.example"), name: 'Ann "Nan" Lee' }, { ...row(3, "quoted.two@uni.example"), name: "Bo <Bo> Lee" }];
    expect(await importRoster(db, { courseId: fixture.courseId, inviter: inviter(), rows })).toMatchObject({ ok: true, invited: 2 });
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
});
