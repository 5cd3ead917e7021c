/**
 * Roster updates mid-term against the real database: a re-import's new, unchanged and updated rows,
 * committed once; a student moved to another cohort keeping their work while the TAs who see it change;
 * invitations sent again and withdrawn, and what their old links then say; student numbers.
 */
import { randomUUID } from "node:crypto";
import { and, desc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courseMemberships, dropLogs, emailOutbox, invitations, kits, labCohorts, users } from "~/db/schema";
import type { RosterRow } from "~/lib/roster/roster-rows";
import { db } from "~/server/db.server";
import { acceptInvitation, findInvitation, resendInvitation } from "~/server/members/invitations.server";
import { listOpenInvitations } from "~/server/members/members.server";
import { importRoster } from "~/server/members/roster-import.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { countAllStatements } from "../support/count-statements";

let handle: AppHandler;
beforeAll(async () => {
  handle = await createAppHandler();
});

const row = (line: number, email: string, fields: Partial<RosterRow> = {}): RosterRow => ({
  line,
  email,
  name: "",
  cohort: "Cohort one",
  role: "student",
  studentNumber: "",
  ...fields,
});
const inviterOf = (fixture: AccessFixture) => ({ id: fixture.userIds.instructor, name: "Test instructor" });
const commit = (fixture: AccessFixture, rows: RosterRow[], importKey = randomUUID()) =>
  importRoster(db, { courseId: fixture.courseId, inviter: inviterOf(fixture), importKey, rows });

async function acceptUrlOf(invitationId: string) {
  const [mail] = await db
    .select({ props: emailOutbox.props })
    .from(emailOutbox)
    .where(eq(emailOutbox.dedupeKey, `invitation:${invitationId}`));
  return new URL(String(mail.props.acceptUrl)).pathname;
}
const tokenIn = (path: string) => path.split("/").pop()!;

async function invitationOf(courseId: string, email: string) {
  const [invitation] = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.courseId, courseId), eq(invitations.email, email)))
    .orderBy(desc(invitations.createdAt))
    .limit(1);
  return invitation;
}

const auditOf = (courseId: string, action: string) =>
  db
    .select({ subject: auditEvents.subject, detail: auditEvents.detail })
    .from(auditEvents)
    .where(and(eq(auditEvents.courseId, courseId), eq(auditEvents.action, action)));

describe("a roster re-import", () => {
  it("invites the new rows, updates members and open invitations, leaves unchanged rows alone, and commits once", async () => {
    const fixture = await createAccessFixture("reimport");
    await commit(fixture, [row(2, "invited@reimport.example", { name: "Invited Person" })]);
    const invited = await invitationOf(fixture.courseId, "invited@reimport.example");
    const mailBefore = await db.select({ id: emailOutbox.id }).from(emailOutbox).where(eq(emailOutbox.courseId, fixture.courseId));

    const rows = [
      row(2, "fresh@reimport.example", { name: "Fresh Person", studentNumber: "S-0001" }),
      row(3, "ownstudent@reimport.example", { name: "Test ownStudent" }),
      row(4, "samecohortstudent@reimport.example", { name: "Renamed Student", studentNumber: "S-0002" }),
      row(5, "invited@reimport.example", { cohort: "Cohort two", studentNumber: "S-0003" }),
    ];
    const importKey = randomUUID();
    const result = await commit(fixture, rows, importKey);
    expect(result).toEqual({ ok: true, duplicate: false, invited: 1, students: 1, tas: 0, updated: 2, unchanged: 1 });

    const [renamed] = await db.select().from(users).where(eq(users.id, fixture.userIds.sameCohortStudent));
    expect({ name: renamed.name, studentNumber: renamed.studentNumber }).toEqual({ name: "Renamed Student", studentNumber: "S-0002" });
    const [unchanged] = await db.select().from(users).where(eq(users.id, fixture.userIds.ownStudent));
    expect({ name: unchanged.name, studentNumber: unchanged.studentNumber }).toEqual({ name: "Test ownStudent", studentNumber: null });
    // The invitation is updated in place: the same row, so the link already e-mailed keeps working.
    const updatedInvitation = await invitationOf(fixture.courseId, "invited@reimport.example");
    expect(updatedInvitation).toMatchObject({
      id: invited.id,
      name: "Invited Person",
      cohortId: fixture.otherCohortId,
      studentNumber: "S-0003",
      replacedById: null,
    });
    expect(await invitationOf(fixture.courseId, "fresh@reimport.example")).toMatchObject({
      name: "Fresh Person",
      cohortId: fixture.cohortId,
      studentNumber: "S-0001",
    });
    const mailAfter = await db.select({ to: emailOutbox.toAddress }).from(emailOutbox).where(eq(emailOutbox.courseId, fixture.courseId));
    expect(mailAfter).toHaveLength(mailBefore.length + 1);

    expect(await auditOf(fixture.courseId, "course.roster_updated")).toContainEqual({
      subject: expect.stringMatching(/^roster_import:/),
      detail: { invited: 1, students: 1, tas: 0, updated: 2, unchanged: 1 },
    });
    const memberUpdates = await auditOf(fixture.courseId, "course.member_updated");
    expect(memberUpdates.map((event) => event.subject).sort()).toEqual(
      [`membership:${fixture.membershipIds.sameCohortStudent}`, `invitation:${invited.id}`].sort(),
    );
    expect(memberUpdates.find((event) => event.subject === `invitation:${invited.id}`)?.detail.changes).toEqual([
      { field: "cohort", from: "Cohort one", to: "Cohort two" },
      { field: "student number", from: null, to: "S-0003" },
    ]);

    // The same preview again: nothing is written, not even an audit entry.
    const auditCount = async () =>
      (await db.select({ id: auditEvents.id }).from(auditEvents).where(eq(auditEvents.courseId, fixture.courseId))).length;
    const eventsBefore = await auditCount();
    expect(await commit(fixture, rows, importKey)).toMatchObject({ ok: true, duplicate: true, rowCount: 4 });
    expect(await auditCount()).toBe(eventsBefore);
    expect(await db.select({ id: emailOutbox.id }).from(emailOutbox).where(eq(emailOutbox.courseId, fixture.courseId))).toHaveLength(
      mailAfter.length,
    );
    // A new preview of the same file finds every row as it now is.
    expect(await commit(fixture, rows)).toMatchObject({ ok: true, invited: 0, updated: 0, unchanged: 4 });
  });

  it("runs the same number of statements for 10 rows as for 1,000", async () => {
    async function statementsFor(size: number) {
      const fixture = await createAccessFixture(`reimport-${size}`);
      // Half the rows update members already there, half invite new people.
      const existing = await db
        .insert(users)
        .values(Array.from({ length: size / 2 }, (_, index) => ({ email: `member${index}@size${size}.example`, name: `Member ${index}` })))
        .returning({ id: users.id });
      await db
        .insert(courseMemberships)
        .values(
          existing.map((user) => ({ courseId: fixture.courseId, userId: user.id, role: "student" as const, cohortId: fixture.cohortId })),
        );
      const rows = Array.from({ length: size }, (_, index) =>
        index < size / 2
          ? row(index + 2, `member${index}@size${size}.example`, { cohort: "Cohort two", studentNumber: `N${index}` })
          : row(index + 2, `new${index}@size${size}.example`, { name: `New ${index}` }),
      );
      const { statements, result } = await countAllStatements(() => commit(fixture, rows));
      expect(result).toMatchObject({ ok: true, invited: size / 2, updated: size / 2 });
      return statements;
    }
    expect(await statementsFor(1000)).toBe(await statementsFor(10));
  });
});

describe("moving a student to another cohort", () => {
  const dropLogPath = (fixture: AccessFixture) => `/api/v1/labs/${fixture.labId}/drop-logs/${fixture.dropLogId}`;
  /** The status of the student's hand-in and of their kit's page, for a TA: 200 for both or 403 for both. */
  async function statusFor(fixture: AccessFixture, actor: "assignedTa" | "unassignedTa") {
    const cookie = await sessionCookieFor(fixture.userIds[actor]);
    const statuses = new Set<number>();
    for (const path of [dropLogPath(fixture), `/courses/${fixture.courseId}/kits/${fixture.kitId}`]) {
      const response = await handle(appRequest(path, { cookie }));
      await response.body?.cancel();
      statuses.add(response.status);
    }
    return [...statuses].join(" and ");
  }

  it("keeps their hand-ins and kit, and hands them from the old cohort's TA to the new one's, by import and on the member page", async () => {
    const fixture = await createAccessFixture("cohort-move");
    // The lab runs in both cohorts, so only the student's own cohort decides which TA sees the hand-in.
    await db.insert(labCohorts).values({ labId: fixture.labId, cohortId: fixture.otherCohortId });
    expect({ assigned: await statusFor(fixture, "assignedTa"), other: await statusFor(fixture, "unassignedTa") }).toEqual({
      assigned: "200",
      other: "403",
    });

    expect(await commit(fixture, [row(2, "ownstudent@cohort-move.example", { cohort: "Cohort two" })])).toMatchObject({ updated: 1 });
    const [membership] = await db.select().from(courseMemberships).where(eq(courseMemberships.id, fixture.membershipIds.ownStudent));
    expect(membership.cohortId).toBe(fixture.otherCohortId);
    // The work belongs to the same membership: nothing was copied or lost.
    const [dropLog] = await db.select({ membershipId: dropLogs.membershipId }).from(dropLogs).where(eq(dropLogs.id, fixture.dropLogId));
    expect(dropLog.membershipId).toBe(fixture.membershipIds.ownStudent);
    const [kit] = await db.select({ holder: kits.holderMembershipId }).from(kits).where(eq(kits.id, fixture.kitId));
    expect(kit.holder).toBe(fixture.membershipIds.ownStudent);
    // Cohort two's TA now sees the hand-in; cohort one's no longer does.
    expect({ assigned: await statusFor(fixture, "assignedTa"), other: await statusFor(fixture, "unassignedTa") }).toEqual({
      assigned: "403",
      other: "200",
    });

    // Back again on the member page.
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const saved = await handle(
      appRequest(`/courses/${fixture.courseId}/members/${fixture.membershipIds.ownStudent}`, {
        cookie,
        form: { intent: "change-role", role: "student", cohortId: fixture.cohortId },
      }),
    );
    expect(saved.status).toBe(200);
    expect({ assigned: await statusFor(fixture, "assignedTa"), other: await statusFor(fixture, "unassignedTa") }).toEqual({
      assigned: "200",
      other: "403",
    });
  });
});

describe("invitations sent again and withdrawn", () => {
  let fixture: AccessFixture;
  beforeAll(async () => {
    fixture = await createAccessFixture("resend");
  });

  it("sends again with a new link, and the old link says it was replaced; a kit packed for the invitation follows it", async () => {
    await commit(fixture, [row(2, "again@resend.example", { name: "Again Student", studentNumber: "R-1" })]);
    const first = await invitationOf(fixture.courseId, "again@resend.example");
    const firstPath = await acceptUrlOf(first.id);
    const [spareKit] = await db
      .insert(kits)
      .values({ courseId: fixture.courseId, number: "K-SPARE", state: "packed", holderInvitationId: first.id })
      .returning();

    const resent = await resendInvitation(db, { courseId: fixture.courseId, inviter: inviterOf(fixture), invitationId: first.id });
    expect(resent.email).toBe("again@resend.example");
    expect((await invitationOf(fixture.courseId, "again@resend.example")).id).toBe(resent.invitationId);
    const [old] = await db.select().from(invitations).where(eq(invitations.id, first.id));
    expect(old.replacedById).toBe(resent.invitationId);
    const [moved] = await db.select({ holder: kits.holderInvitationId }).from(kits).where(eq(kits.id, spareKit.id));
    expect(moved.holder).toBe(resent.invitationId);
    expect((await listOpenInvitations(fixture.courseId)).map((open) => open.id)).toEqual([resent.invitationId]);
    expect(await auditOf(fixture.courseId, "course.invitation_resent")).toEqual([
      { subject: `invitation:${first.id}`, detail: { email: "again@resend.example", newInvitationId: resent.invitationId } },
    ]);

    expect(await findInvitation(tokenIn(firstPath))).toMatchObject({ state: "replaced" });
    const page = await (await handle(appRequest(firstPath))).text();
    expect(page).toContain("This invitation was replaced by a newer one");
    expect(page).toContain("use the link in the latest e-mail");
    expect((await handle(appRequest(firstPath, { form: { name: "Again", password: "" } }))).status).toBe(410);
    // Sending again what was sent again already is refused: act on the newer one.
    await expect(
      resendInvitation(db, { courseId: fixture.courseId, inviter: inviterOf(fixture), invitationId: first.id }),
    ).rejects.toMatchObject({ status: 409 });

    // The new link works, and its student number goes to the new account.
    const newPath = await acceptUrlOf(resent.invitationId);
    const accepted = await acceptInvitation(tokenIn(newPath), { name: "Again Student" }, null, new Request("http://127.0.0.1/"));
    expect(accepted.outcome).toBe("accepted");
    const [user] = await db.select().from(users).where(eq(users.email, "again@resend.example"));
    expect(user.studentNumber).toBe("R-1");
    const [kitNow] = await db.select({ member: kits.holderMembershipId }).from(kits).where(eq(kits.id, spareKit.id));
    expect(kitNow.member).not.toBeNull();
  });

  it("refuses to withdraw an invitation while a kit is packed for it, then withdraws it and its link says so", async () => {
    await commit(fixture, [row(3, "withdrawn@resend.example", { name: "Withdrawn Student" })]);
    const invitation = await invitationOf(fixture.courseId, "withdrawn@resend.example");
    const path = await acceptUrlOf(invitation.id);
    const [kit] = await db
      .insert(kits)
      .values({ courseId: fixture.courseId, number: "K-HELD", state: "packed", holderInvitationId: invitation.id })
      .returning();
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const members = `/courses/${fixture.courseId}/members`;

    const refused = await handle(appRequest(members, { cookie, form: { intent: "revoke-invitation", invitationId: invitation.id } }));
    expect(refused.status).toBe(409);
    expect(await refused.text()).toContain("Kit K-HELD is packed for Withdrawn Student; check it in first, then withdraw the invitation.");
    expect((await invitationOf(fixture.courseId, "withdrawn@resend.example")).revokedAt).toBeNull();

    await db.update(kits).set({ holderInvitationId: null, state: "on_shelf" }).where(eq(kits.id, kit.id));
    const withdrawn = await handle(appRequest(members, { cookie, form: { intent: "revoke-invitation", invitationId: invitation.id } }));
    expect(withdrawn.status).toBe(200);
    expect(await withdrawn.text()).toContain("Invitation to withdrawn@resend.example withdrawn");
    const [withdrawnRow] = await db.select().from(invitations).where(eq(invitations.id, invitation.id));
    expect(withdrawnRow.revokedAt).not.toBeNull();
    expect(withdrawnRow.revokedById).toBe(fixture.userIds.instructor);
    expect((await listOpenInvitations(fixture.courseId)).map((open) => open.email)).not.toContain("withdrawn@resend.example");
    expect(await auditOf(fixture.courseId, "course.invitation_revoked")).toEqual([
      { subject: `invitation:${invitation.id}`, detail: { email: "withdrawn@resend.example", role: "student" } },
    ]);

    const page = await (await handle(appRequest(path))).text();
    expect(page).toContain("This invitation was withdrawn");
    expect((await handle(appRequest(path, { form: { name: "Withdrawn", password: "" } }))).status).toBe(410);
    // Withdrawn cannot be sent again from its old row.
    const again = await handle(appRequest(members, { cookie, form: { intent: "resend-invitation", invitationId: invitation.id } }));
    expect(again.status).toBe(409);
    expect(await again.text()).toContain("It was withdrawn already.");
  });

  it("sends an invitation again from the members page without JavaScript", async () => {
    await commit(fixture, [row(4, "button@resend.example")]);
    const invitation = await invitationOf(fixture.courseId, "button@resend.example");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const response = await handle(
      appRequest(`/courses/${fixture.courseId}/members`, { cookie, form: { intent: "resend-invitation", invitationId: invitation.id } }),
    );
    expect(response.status).toBe(200);
    expect(await response.text()).toContain("Invitation sent again to button@resend.example, with a new link");
    const mail = await db
      .select({ id: emailOutbox.id })
      .from(emailOutbox)
      .where(and(eq(emailOutbox.toAddress, "button@resend.example"), eq(emailOutbox.template, "course-invitation")));
    expect(mail).toHaveLength(2);
  });
});

describe("a student number on the member page", () => {
  it("is checked, kept as typed when refused, saved on the account and audited", async () => {
    const fixture = await createAccessFixture("number");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const path = `/courses/${fixture.courseId}/members/${fixture.membershipIds.ownStudent}`;

    const refused = await handle(appRequest(path, { cookie, form: { intent: "student-number", studentNumber: "12;34" } }));
    expect(refused.status).toBe(400);
    const refusedPage = await refused.text();
    expect(refusedPage).toContain("A student number has letters and digits, with spaces, dots, hyphens or slashes between them.");
    expect(refusedPage).toContain('value="12;34"');

    const saved = await handle(appRequest(path, { cookie, form: { intent: "student-number", studentNumber: "  2026-0042 " } }));
    expect(saved.status).toBe(200);
    const [user] = await db.select({ studentNumber: users.studentNumber }).from(users).where(eq(users.id, fixture.userIds.ownStudent));
    expect(user.studentNumber).toBe("2026-0042");
    expect(await auditOf(fixture.courseId, "course.member_updated")).toEqual([
      {
        subject: `membership:${fixture.membershipIds.ownStudent}`,
        detail: { changes: [{ field: "student number", from: null, to: "2026-0042" }], via: "member page" },
      },
    ]);

    // A TA may see the page but not change the number.
    const byTa = await handle(
      appRequest(path, {
        cookie: await sessionCookieFor(fixture.userIds.assignedTa),
        form: { intent: "student-number", studentNumber: "X" },
      }),
    );
    expect(byTa.status).toBe(403);
    const cleared = await handle(appRequest(path, { cookie, form: { intent: "student-number", studentNumber: "" } }));
    expect(cleared.status).toBe(200);
    const [after] = await db.select({ studentNumber: users.studentNumber }).from(users).where(eq(users.id, fixture.userIds.ownStudent));
    expect(after.studentNumber).toBeNull();
  });
});
