/**
 * A course's members as the members page shows them, and role changes. Moving students between cohorts
 * and removing members live with the course rules (`~/server/courses/courses.server`).
 */
import { AppError } from "~/lib/app-error";
import { and, asc, eq, isNull, sql } from "drizzle-orm";
import { cohorts, courseMemberships, invitations, kits, taCohortAssignments, users } from "~/db/schema";
import { recordAudit } from "~/server/audit.server";
import type { CourseRole } from "~/server/auth/access.server";
import { revokeTokensOfFormerStaff } from "~/server/auth/api-tokens.server";
import { db } from "~/server/db.server";
import { openInvitation } from "./open-invitation.server";
import { inCohortOrder } from "~/server/courses/cohort-order.server";

/** Every active member with their cohort, or the cohorts a TA marks: one statement. */
export function listMembers(courseId: string) {
  return db
    .select({
      membershipId: courseMemberships.id,
      userId: users.id,
      name: users.name,
      email: users.email,
      role: courseMemberships.role,
      cohortId: courseMemberships.cohortId,
      cohortName: cohorts.name,
      taCohortNames: sql<
        string[]
      >`array(select h.name from ${taCohortAssignments} a join ${cohorts} h on h.id = a.cohort_id where a.membership_id = ${courseMemberships.id} order by h.name)`,
    })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .where(and(eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt)))
    .orderBy(sql`case ${courseMemberships.role} when 'instructor' then 0 when 'ta' then 1 else 2 end`, asc(users.name));
}

/** Invitations sent and not yet accepted, still within their lifetime, neither withdrawn nor sent again. */
export function listOpenInvitations(courseId: string) {
  return db
    .select({
      id: invitations.id,
      email: invitations.email,
      name: invitations.name,
      role: invitations.role,
      cohortName: cohorts.name,
      studentNumber: invitations.studentNumber,
      expiresAt: invitations.expiresAt,
    })
    .from(invitations)
    .leftJoin(cohorts, eq(cohorts.id, invitations.cohortId))
    .where(and(eq(invitations.courseId, courseId), openInvitation))
    .orderBy(asc(invitations.email));
}

export async function getMember(courseId: string, membershipId: string) {
  if (!/^[0-9a-f-]{36}$/i.test(membershipId)) return null;
  const [member] = await db
    .select({
      membershipId: courseMemberships.id,
      userId: users.id,
      name: users.name,
      email: users.email,
      studentNumber: users.studentNumber,
      role: courseMemberships.role,
      cohortId: courseMemberships.cohortId,
      cohortName: cohorts.name,
    })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt)));
  return member ?? null;
}

/**
 * Gives a member another role. A student keeps no cohort as staff and a TA keeps no cohort assignments
 * as anything else; someone made a student who is staff nowhere else loses their API tokens. An
 * instructor cannot change their own role, so a course never loses its last one.
 */
export async function changeMemberRole(
  {
    courseId,
    actorId,
    membershipId,
    role,
    cohortId,
  }: { courseId: string; actorId: string; membershipId: string; role: CourseRole; cohortId: string | null },
  request?: Request,
): Promise<void> {
  await db.transaction(async (tx) => {
    const [member] = await tx
      .select({ role: courseMemberships.role, userId: courseMemberships.userId, cohortId: courseMemberships.cohortId })
      .from(courseMemberships)
      .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt)))
      .for("update");
    if (!member) throw new AppError({ code: "member_refused", message: "That person is not a member of this course." });
    if (member.userId === actorId)
      throw new AppError({ code: "member_refused", message: "You cannot change your own role; ask another instructor." });
    if (cohortId) {
      const [cohort] = await tx
        .select({ id: cohorts.id })
        .from(cohorts)
        .where(and(eq(cohorts.id, cohortId), eq(cohorts.courseId, courseId)));
      if (!cohort) throw new AppError({ code: "member_refused", message: "That cohort is not in this course." });
    }
    const newCohortId = role === "student" ? cohortId : null;
    await tx.update(courseMemberships).set({ role, cohortId: newCohortId }).where(eq(courseMemberships.id, membershipId));
    if (role !== "ta") await tx.delete(taCohortAssignments).where(eq(taCohortAssignments.membershipId, membershipId));
    if (role === "student") await revokeTokensOfFormerStaff(tx, member.userId, actorId, request);
    await recordAudit(tx, {
      action: "course.member_role_changed",
      actorId,
      courseId,
      subject: `membership:${membershipId}`,
      detail: { from: member.role, to: role, fromCohortId: member.cohortId, toCohortId: newCohortId },
      request,
    });
  });
}

/**
 * Sets (or, with null, clears) a member's student number. It lives on their account, as the institution
 * gives one number per person, so every course of theirs shows it.
 */
export async function setStudentNumber(
  {
    courseId,
    actorId,
    membershipId,
    studentNumber,
  }: { courseId: string; actorId: string; membershipId: string; studentNumber: string | null },
  request?: Request,
): Promise<void> {
  await db.transaction(async (tx) => {
    const [member] = await tx
      .select({ userId: users.id, studentNumber: users.studentNumber })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId), isNull(courseMemberships.removedAt)))
      .for("update", { of: users });
    if (!member) throw new AppError({ code: "member_refused", message: "That person is not a member of this course.", status: 404 });
    if (member.studentNumber === studentNumber) return;
    await tx.update(users).set({ studentNumber }).where(eq(users.id, member.userId));
    await recordAudit(tx, {
      action: "course.member_updated",
      actorId,
      courseId,
      subject: `membership:${membershipId}`,
      detail: { changes: [{ field: "student number", from: member.studentNumber, to: studentNumber }], via: "member page" },
      request,
    });
  });
}

export function listCohorts(courseId: string) {
  return db
    .select({ id: cohorts.id, name: cohorts.name })
    .from(cohorts)
    .where(eq(cohorts.courseId, courseId))
    .orderBy(...inCohortOrder);
}

/**
 * Removes a member's access, and their API tokens when that was their last staff role. Their membership
 * row stays, so everything they handed in stays too.
 */
export async function removeMember(
  { courseId, actorId, membershipId }: { courseId: string; actorId: string; membershipId: string },
  request?: Request,
): Promise<void> {
  await db.transaction(async (tx) => {
    const [member] = await tx
      .select({ role: courseMemberships.role, userId: courseMemberships.userId })
      .from(courseMemberships)
      .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId)));
    if (!member) throw new AppError({ code: "member_refused", message: "That person is not a member of this course." });
    if (member.userId === actorId)
      throw new AppError({ code: "member_refused", message: "You cannot remove yourself; ask another instructor." });
    const [holding] = await tx.select({ number: kits.number }).from(kits).where(eq(kits.holderMembershipId, membershipId));
    if (holding)
      throw new AppError({ code: "member_refused", message: `This student still holds kit ${holding.number}; check it in first.` });
    await tx.update(courseMemberships).set({ removedAt: new Date() }).where(eq(courseMemberships.id, membershipId));
    await tx.delete(taCohortAssignments).where(eq(taCohortAssignments.membershipId, membershipId));
    await revokeTokensOfFormerStaff(tx, member.userId, actorId, request);
    await recordAudit(tx, { action: "course.member_removed", actorId, courseId, subject: `membership:${membershipId}`, request });
  });
}
