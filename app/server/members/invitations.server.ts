/**
 * Invitations to a course. An instructor invites people one by one here, or many at once from a roster
 * import; either way `createInvitations` costs the same few statements (plus one queued e-mail per
 * person). The e-mailed link is single-use: accepting marks the row in one `update … returning`,
 * so two clicks racing each other cannot both succeed.
 */
import { randomUUID } from "node:crypto";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, invitations, kits, shippingAddresses, taCohortAssignments, users } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { recordAudit } from "~/server/audit.server";
import type { CourseRole } from "~/server/auth/access.server";
import { createSession } from "~/server/auth/session.server";
import { hashPassword } from "~/server/auth/password.server";
import { normaliseEmail, type NewSession } from "~/server/auth/sign-in.server";
import { generateToken, hashToken } from "~/server/auth/tokens.server";
import { insertMany } from "~/server/bulk-insert.server";
import { appUrl } from "~/server/config.server";
import { db, type Database, type Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { moveInvitationAddress } from "~/server/shipping/addresses.server";
import { openInvitation } from "./open-invitation.server";

export const INVITATION_LIFETIME_DAYS = 14;

export type InvitationInput = {
  email: string;
  name?: string | null;
  role: CourseRole;
  cohortId?: string | null;
  studentNumber?: string | null;
};

export type Inviter = { id: string; name: string };
export type InvitationResult = {
  invited: { invitationId: string; email: string }[];
  /** People left out, and why (already a member, a cohort that is not in this course). */
  skipped: { email: string; reason: "already a member" | "unknown cohort" }[];
};

/**
 * Invites people to the course with the role (and, for students, the cohort; for TAs, the cohort they
 * are assigned to) chosen for each. Earlier open invitations of the same people stop working.
 * Call inside the transaction of the business change; the e-mails are queued on it.
 */
export async function createInvitations(
  tx: Transaction,
  inviter: Inviter,
  courseId: string,
  inputs: InvitationInput[],
  request?: Request,
): Promise<InvitationResult> {
  const rows = inputs.map((input) => ({ ...input, email: normaliseEmail(input.email), cohortId: input.cohortId ?? null }));
  const emails = [...new Set(rows.map((row) => row.email))];
  const [course] = await tx
    .select({ title: courses.title, code: courses.code, timeZone: courses.timeZone })
    .from(courses)
    .where(eq(courses.id, courseId));
  if (!course) throw new Error(`No course ${courseId}`);
  const [courseCohorts, members] = await Promise.all([
    tx.select({ id: cohorts.id, name: cohorts.name }).from(cohorts).where(eq(cohorts.courseId, courseId)),
    emails.length
      ? tx
          .select({ email: users.email })
          .from(courseMemberships)
          .innerJoin(users, eq(users.id, courseMemberships.userId))
          .where(and(eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt), inArray(users.email, emails)))
      : Promise.resolve([]),
  ]);
  const cohortName = new Map(courseCohorts.map((cohort) => [cohort.id, cohort.name]));
  const memberEmails = new Set(members.map((member) => member.email));

  const result: InvitationResult = { invited: [], skipped: [] };
  const accepted: (typeof rows)[number][] = [];
  const seen = new Set<string>();
  for (const row of rows) {
    if (seen.has(row.email)) continue;
    seen.add(row.email);
    if (memberEmails.has(row.email)) result.skipped.push({ email: row.email, reason: "already a member" });
    else if (row.cohortId && !cohortName.has(row.cohortId)) result.skipped.push({ email: row.email, reason: "unknown cohort" });
    else accepted.push(row);
  }
  if (accepted.length === 0) return result;

  const expiresAt = new Date(Date.now() + INVITATION_LIFETIME_DAYS * 24 * 60 * 60 * 1000);
  const tokens = accepted.map(() => generateToken());
  const inserted = accepted.map((row) => ({ id: randomUUID(), email: row.email }));
  await insertMany(
    tx,
    invitations,
    accepted.map((row, index) => ({
      id: inserted[index].id,
      courseId,
      email: row.email,
      name: row.name?.trim() || null,
      role: row.role,
      cohortId: row.cohortId,
      invitedById: inviter.id,
      tokenHash: hashToken(tokens[index]),
      studentNumber: row.studentNumber ?? null,
      expiresAt,
    })),
  );
  await replaceEarlierInvitations(tx, courseId, inserted);

  // One batch for all the e-mails: a roster of thousands costs the same few statements as one person.
  await sendEmails(
    tx,
    accepted.map((row, index) => ({
      to: row.email,
      toName: row.name?.trim() || null,
      template: "course-invitation" as const,
      courseId,
      dedupeKey: `invitation:${inserted[index].id}`,
      props: {
        courseTitle: course.title,
        courseCode: course.code,
        inviterName: inviter.name,
        role: row.role,
        cohortName: row.cohortId ? (cohortName.get(row.cohortId) ?? null) : null,
        acceptUrl: `${appUrl()}/invitations/${tokens[index]}`,
        expiresAt,
        timeZone: course.timeZone,
      },
    })),
  );
  await recordAudit(
    tx,
    inserted.map((invitation, index) => ({
      action: "course.invitation_sent" as const,
      actorId: inviter.id,
      courseId,
      subject: `invitation:${invitation.id}`,
      detail: { email: invitation.email, role: accepted[index].role, cohortId: accepted[index].cohortId },
      request,
    })),
  );
  result.invited = inserted.map((invitation) => ({ invitationId: invitation.id, email: invitation.email }));
  return result;
}

/**
 * Earlier invitations of the same people that were neither accepted nor withdrawn now point at the new
 * one, so their links say they were replaced, and stop working. What was kept for the latest of them,
 * the kit packed and the shipping address, passes to the new invitation. One statement.
 */
async function replaceEarlierInvitations(tx: Transaction, courseId: string, newer: { id: string; email: string }[]) {
  await tx.execute(sql`
    with replaced as (
      update ${invitations} old set replaced_by_id = v.id, expires_at = least(old.expires_at, now())
      from json_to_recordset(${JSON.stringify(newer)}::json) as v(id uuid, email text)
      where old.course_id = ${courseId} and old.email = v.email and old.id <> v.id
        and old.accepted_at is null and old.revoked_at is null and old.replaced_by_id is null
      returning old.id, old.email, old.created_at, v.id as newer_id
    ),
    latest as (select distinct on (email) id, newer_id from replaced order by email, created_at desc),
    kits_moved as (update ${kits} k set holder_invitation_id = latest.newer_id from latest where k.holder_invitation_id = latest.id)
    update ${shippingAddresses} a set invitation_id = latest.newer_id, updated_at = now() from latest where a.invitation_id = latest.id`);
}

/** The invitation an instructor acts on: one of the course's, neither accepted nor withdrawn nor sent again. */
async function pendingInvitation(tx: Transaction, courseId: string, invitationId: string) {
  const [invitation] = await tx
    .select()
    .from(invitations)
    .where(and(eq(invitations.id, invitationId), eq(invitations.courseId, courseId)))
    .for("update");
  if (!invitation) throw new AppError({ code: "not_found", message: "There is no such invitation in this course.", status: 404 });
  const ended = invitation.acceptedAt
    ? "It has been accepted already."
    : invitation.revokedAt
      ? "It was withdrawn already."
      : invitation.replacedById
        ? "It was sent again already; act on the newer one."
        : null;
  if (ended) throw new AppError({ code: "invitation_ended", message: ended, status: 409 });
  return invitation;
}

/**
 * Sends the invitation again with a new token and a new e-mail (for a lost e-mail or an expired link):
 * the old link then says it was replaced.
 */
export async function resendInvitation(
  executor: Database,
  { courseId, inviter, invitationId }: { courseId: string; inviter: Inviter; invitationId: string },
  request?: Request,
): Promise<{ email: string; invitationId: string }> {
  return executor.transaction(async (tx) => {
    const invitation = await pendingInvitation(tx, courseId, invitationId);
    const { invited, skipped } = await createInvitations(tx, inviter, courseId, [invitation], request);
    if (skipped.length)
      throw new AppError({ code: "invitation_ended", message: "This person is a member of the course already.", status: 409 });
    await recordAudit(tx, {
      action: "course.invitation_resent",
      actorId: inviter.id,
      courseId,
      subject: `invitation:${invitation.id}`,
      detail: { email: invitation.email, newInvitationId: invited[0].invitationId },
      request,
    });
    return invited[0];
  });
}

/**
 * Withdraws the invitation: its link then says so and opens nothing. Refused while a kit is packed for
 * the invited student: the kit would be left with no one to deliver it to or ask it back from.
 */
export async function revokeInvitation(
  executor: Database,
  { courseId, actorId, invitationId }: { courseId: string; actorId: string; invitationId: string },
  request?: Request,
): Promise<{ email: string }> {
  return executor.transaction(async (tx) => {
    const invitation = await pendingInvitation(tx, courseId, invitationId);
    const [held] = await tx.select({ number: kits.number }).from(kits).where(eq(kits.holderInvitationId, invitation.id));
    if (held)
      throw new AppError({
        code: "invitation_refused",
        message: `Kit ${held.number} is packed for ${invitation.name ?? invitation.email}; check it in first, then withdraw the invitation.`,
        status: 409,
      });
    await tx
      .update(invitations)
      .set({ revokedAt: sql`now()`, revokedById: actorId, expiresAt: sql`least(${invitations.expiresAt}, now())` })
      .where(eq(invitations.id, invitation.id));
    await recordAudit(tx, {
      action: "course.invitation_revoked",
      actorId,
      courseId,
      subject: `invitation:${invitation.id}`,
      detail: { email: invitation.email, role: invitation.role },
      request,
    });
    return { email: invitation.email };
  });
}

export type InvitationView = {
  email: string;
  name: string | null;
  role: CourseRole;
  courseId: string;
  courseTitle: string;
  courseCode: string;
  cohortName: string | null;
  inviterName: string | null;
  courseTimeZone: string;
  expiresAt: Date;
  /** "replaced": a newer invitation to the same course went to the same address, which ended this one; "revoked": an instructor withdrew it. */
  state: "open" | "accepted" | "expired" | "replaced" | "revoked";
  /** When the invitation that replaced this one was sent, if one did. */
  replacedAt: Date | null;
  hasAccount: boolean;
};

/** What the invitation page shows before anyone accepts. */
export async function findInvitation(token: string): Promise<InvitationView | null> {
  const inviter = sql<string | null>`(select u.name from users u where u.id = ${invitations.invitedById})`;
  const replacedAt =
    sql<Date | null>`(select newer.created_at from invitations newer where newer.id = ${invitations.replacedById})`.mapWith(
      invitations.createdAt,
    );
  const [row] = await db
    .select({
      email: invitations.email,
      name: invitations.name,
      role: invitations.role,
      courseId: invitations.courseId,
      courseTitle: courses.title,
      courseCode: courses.code,
      courseTimeZone: courses.timeZone,
      cohortName: cohorts.name,
      inviterName: inviter,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      replacedAt,
      hasAccount: sql<boolean>`exists (select 1 from users u where u.email = ${invitations.email})`,
    })
    .from(invitations)
    .innerJoin(courses, eq(courses.id, invitations.courseId))
    .leftJoin(cohorts, eq(cohorts.id, invitations.cohortId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!row) return null;
  const { acceptedAt, revokedAt, ...view } = row;
  const state = acceptedAt
    ? "accepted"
    : revokedAt
      ? "revoked"
      : row.replacedAt
        ? "replaced"
        : row.expiresAt.getTime() > Date.now()
          ? "open"
          : "expired";
  return { ...view, state };
}

export type AcceptInput = { name?: string; password?: string | null };
export type AcceptOutcome =
  ({ outcome: "accepted"; courseId: string } & NewSession) | { outcome: "invalid" } | { outcome: "other-account"; invitedEmail: string };

/**
 * Accepts the invitation: creates the account (name, optional password) or attaches the course to the
 * existing account of that address, with the invited role and cohort, and signs that account in — the
 * link proves control of the mailbox, as an e-mailed sign-in link does. A browser signed in as someone
 * else is refused rather than switched silently.
 */
export async function acceptInvitation(
  token: string,
  input: AcceptInput,
  signedInUserId: string | null,
  request: Request,
): Promise<AcceptOutcome> {
  if (signedInUserId) {
    const [invited] = await db
      .select({ email: invitations.email, userId: users.id })
      .from(invitations)
      .leftJoin(users, eq(users.email, invitations.email))
      .where(eq(invitations.tokenHash, hashToken(token)));
    if (invited && invited.userId !== signedInUserId) return { outcome: "other-account", invitedEmail: invited.email };
  }
  // Hashed before the transaction: argon2 takes a while and the invitation row is locked inside.
  const passwordHash = input.password ? await hashPassword(input.password) : null;
  return db.transaction(async (tx) => {
    const [invitation] = await tx
      .update(invitations)
      .set({ acceptedAt: sql`now()` })
      .where(and(eq(invitations.tokenHash, hashToken(token)), openInvitation))
      .returning();
    if (!invitation) return { outcome: "invalid" as const };

    let [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, invitation.email));
    if (!user) {
      [user] = await tx
        .insert(users)
        .values({
          email: invitation.email,
          name: input.name?.trim() || invitation.name || invitation.email,
          passwordHash,
          studentNumber: invitation.studentNumber,
        })
        .returning({ id: users.id });
    } else if (invitation.studentNumber) {
      await tx.update(users).set({ studentNumber: invitation.studentNumber }).where(eq(users.id, user.id));
    }
    const [membership] = await tx
      .insert(courseMemberships)
      .values({
        courseId: invitation.courseId,
        userId: user.id,
        role: invitation.role,
        cohortId: invitation.role === "student" ? invitation.cohortId : null,
      })
      .onConflictDoUpdate({
        target: [courseMemberships.courseId, courseMemberships.userId],
        set: { role: invitation.role, cohortId: invitation.role === "student" ? invitation.cohortId : null, removedAt: null },
      })
      .returning({ id: courseMemberships.id });
    if (invitation.role === "ta" && invitation.cohortId) {
      await tx.insert(taCohortAssignments).values({ membershipId: membership.id, cohortId: invitation.cohortId }).onConflictDoNothing();
    }
    await tx.update(invitations).set({ acceptedById: user.id }).where(eq(invitations.id, invitation.id));
    // What was kept for the invited student is now the member's: the address, and a kit packed for them
    // (unless an earlier membership still holds one out, which the one-kit-per-student index forbids).
    await moveInvitationAddress(tx, { invitationId: invitation.id, membershipId: membership.id });
    await tx
      .update(kits)
      .set({ holderMembershipId: membership.id, holderInvitationId: null })
      .where(
        and(
          eq(kits.holderInvitationId, invitation.id),
          sql`not exists (select 1 from ${kits} held where held.holder_membership_id = ${membership.id} and held.state <> 'coming_back')`,
        ),
      );
    await recordAudit(tx, {
      action: "course.invitation_accepted",
      actorId: user.id,
      courseId: invitation.courseId,
      subject: `invitation:${invitation.id}`,
      detail: { role: invitation.role, cohortId: invitation.cohortId },
      request,
    });
    const { token: sessionToken, session } = await createSession(tx, user.id, request);
    await recordAudit(tx, { action: "auth.sign_in", actorId: user.id, subject: `user:${user.id}`, detail: { how: "invitation" }, request });
    return { outcome: "accepted" as const, courseId: invitation.courseId, token: sessionToken, session, userId: user.id };
  });
}
