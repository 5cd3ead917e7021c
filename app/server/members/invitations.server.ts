/**
 * Invitations to a course. An instructor invites people one by one here, or many at once from a roster
 * import; either way `createInvitations` costs the same few statements (plus one queued e-mail per
 * person). The e-mailed link is single-use: accepting marks the row in one `update … returning`,
 * so two clicks racing each other cannot both succeed.
 */
import { randomUUID } from "node:crypto";
import { and, eq, gt, inArray, isNull, sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, invitations, kits, taCohortAssignments, users } from "~/db/schema";
import { recordAudit } from "~/server/audit.server";
import type { CourseRole } from "~/server/auth/access.server";
import { createSession } from "~/server/auth/session.server";
import { hashPassword } from "~/server/auth/password.server";
import { normaliseEmail, type NewSession } from "~/server/auth/sign-in.server";
import { generateToken, hashToken } from "~/server/auth/tokens.server";
import { insertMany } from "~/server/bulk-insert.server";
import { appUrl } from "~/server/config.server";
import { db, type Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { moveInvitationAddress } from "~/server/shipping/addresses.server";

export const INVITATION_LIFETIME_DAYS = 14;

export type InvitationInput = { email: string; name?: string | null; role: CourseRole; cohortId?: string | null };
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
  const [course] = await tx.select({ title: courses.title, code: courses.code }).from(courses).where(eq(courses.id, courseId));
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

  await tx
    .update(invitations)
    .set({ expiresAt: sql`now()` })
    .where(
      and(
        eq(invitations.courseId, courseId),
        inArray(
          invitations.email,
          accepted.map((row) => row.email),
        ),
        isNull(invitations.acceptedAt),
        gt(invitations.expiresAt, sql`now()`),
      ),
    );
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
      expiresAt,
    })),
  );

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
  /** "replaced": a newer invitation to the same course went to the same address, which ended this one. */
  state: "open" | "accepted" | "expired" | "replaced";
  /** When the latest newer invitation was sent, if there is one. */
  replacedAt: Date | null;
  hasAccount: boolean;
};

/** What the invitation page shows before anyone accepts. */
export async function findInvitation(token: string): Promise<InvitationView | null> {
  const inviter = sql<string | null>`(select u.name from users u where u.id = ${invitations.invitedById})`;
  // Inviting someone again ends their open invitation (see createInvitations); the newer row says why.
  const replacedAt = sql<Date | null>`(select max(newer.created_at) from invitations newer
    where newer.course_id = ${invitations.courseId} and newer.email = ${invitations.email} and newer.created_at > ${invitations.createdAt})`.mapWith(
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
      replacedAt,
      hasAccount: sql<boolean>`exists (select 1 from users u where u.email = ${invitations.email})`,
    })
    .from(invitations)
    .innerJoin(courses, eq(courses.id, invitations.courseId))
    .leftJoin(cohorts, eq(cohorts.id, invitations.cohortId))
    .where(eq(invitations.tokenHash, hashToken(token)));
  if (!row) return null;
  const { acceptedAt, ...view } = row;
  const state = acceptedAt ? "accepted" : row.expiresAt.getTime() > Date.now() ? "open" : row.replacedAt ? "replaced" : "expired";
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
      .where(and(eq(invitations.tokenHash, hashToken(token)), isNull(invitations.acceptedAt), gt(invitations.expiresAt, sql`now()`)))
      .returning();
    if (!invitation) return { outcome: "invalid" as const };

    let [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, invitation.email));
    if (!user) {
      [user] = await tx
        .insert(users)
        .values({ email: invitation.email, name: input.name?.trim() || invitation.name || invitation.email, passwordHash })
        .returning({ id: users.id });
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
