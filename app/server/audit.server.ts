/**
 * The audit trail: who did what, when and from where. Callers pass facts, never a password or a token.
 */
import { and, desc, eq, sql, type AnyColumn } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { auditEvents, cohorts, courseMemberships, courses, invitations, kits, labs, parts, users } from "~/db/schema";
import { auditSentence } from "~/lib/audit/audit-sentence";
import { insertMany } from "~/server/bulk-insert.server";
import { db, type Executor } from "~/server/db.server";
import { clientIp } from "~/server/http.server";

export type AuditAction =
  | "auth.sign_in"
  | "auth.sign_in_failed"
  | "auth.sign_out"
  | "auth.sign_out_everywhere"
  | "auth.sign_in_link_requested"
  | "auth.password_reset_requested"
  | "auth.password_reset"
  | "auth.password_changed"
  | "auth.sign_up"
  | "auth.api_token_created"
  | "auth.api_token_revoked"
  | "access.denied"
  | "course.invitation_sent"
  | "course.invitation_accepted"
  | "course.member_role_changed"
  | "course.member_removed"
  | "course.created"
  | "course.settings_changed"
  | "course.ta_cohorts_changed"
  | "lab.comparison_method_changed"
  | "lab.created"
  | "lab.updated"
  | "lab.published"
  | "lab.closed"
  | "lab.extension_set"
  | "lab.extension_removed"
  | "marking.rubric_saved"
  | "marking.rubric_copied"
  | "marking.ready"
  | "marking.reopened"
  | "marking.released"
  | "part.rereduction_queued"
  | "part.rereduced"
  | "kit.tracking_imported"
  | "kit.cohort_packed"
  | "shipment.created"
  | "shipment.retried"
  | "address.viewed"
  | "address.changed"
  | "address.deleted"
  | "address.exported"
  | "address.imported"
  | "member.record_viewed"
  | "account.calendar_feed_reset"
  | "course.message_sent"
  | "markbook.settings_changed"
  | "markbook.exported"
  | "course.invitation_resent"
  | "course.invitation_revoked"
  | "course.member_updated"
  | "course.roster_updated"
  | "course.carried_over"
  | "course.archived"
  | "course.restored"
  | "course.cohort_created"
  | "marking.mark_adjusted"
  | "part.created"
  | "part.changed"
  | "kit.moved";

export type AuditInput = {
  action: AuditAction;
  actorId?: string | null;
  courseId?: string | null;
  subject?: string | null;
  detail?: Record<string, unknown>;
  request?: Request;
};

function toRow(event: AuditInput) {
  return {
    action: event.action,
    actorId: event.actorId ?? null,
    courseId: event.courseId ?? null,
    subject: event.subject ?? null,
    detail: event.detail ?? {},
    ip: event.request ? clientIp(event.request) : null,
  };
}

export async function recordAudit(executor: Executor, event: AuditInput | AuditInput[]): Promise<void> {
  const rows = (Array.isArray(event) ? event : [event]).map(toRow);
  await insertMany(executor, auditEvents, rows);
}

// What an event is about, named in the same statement: `subject` is "kind:id".
const subjectKind = sql`split_part(${auditEvents.subject}, ':', 1)`;
const subjectId = sql`split_part(${auditEvents.subject}, ':', 2)`;
// Ids compared as text, so an odd subject can never make the cast fail and the whole page with it.
const aboutSubject = (kind: string, id: AnyColumn) => and(sql`${subjectKind} = ${kind}`, sql`${id}::text = ${subjectId}`);
const subjectLab = alias(labs, "subject_lab");
const detailLab = alias(labs, "detail_lab");
const member = alias(courseMemberships, "member");
const memberUser = alias(users, "member_user");
const otherCourse = alias(courses, "other_course");

/**
 * The latest events of a course, newest first, each as a sentence that names its objects. One
 * statement whatever the number of events: the lab, part, kit, member, invitee, cohort and course an
 * event names are joined in by kind.
 */
export async function listCourseAudit(courseId: string, limit = 200): Promise<{ createdAt: Date; sentence: string; ip: string | null }[]> {
  const sameCourse = (column: AnyColumn) => eq(column, auditEvents.courseId);
  const rows = await db
    .select({
      action: auditEvents.action,
      detail: auditEvents.detail,
      ip: auditEvents.ip,
      createdAt: auditEvents.createdAt,
      actorName: users.name,
      names: {
        lab: subjectLab.title,
        otherLab: detailLab.title,
        part: parts.label,
        kit: kits.number,
        member: memberUser.name,
        invitee: sql<string | null>`coalesce(${invitations.name}, ${invitations.email})`,
        course: otherCourse.title,
        cohort: cohorts.name,
      },
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .leftJoin(subjectLab, and(aboutSubject("lab", subjectLab.id), sameCourse(subjectLab.courseId)))
    .leftJoin(detailLab, sql`${detailLab.id}::text = coalesce(${auditEvents.detail} ->> 'labId', ${auditEvents.detail} ->> 'fromLabId')`)
    .leftJoin(parts, and(aboutSubject("part", parts.id), sameCourse(parts.courseId)))
    .leftJoin(kits, and(aboutSubject("kit", kits.id), sameCourse(kits.courseId)))
    .leftJoin(member, and(aboutSubject("membership", member.id), sameCourse(member.courseId)))
    .leftJoin(memberUser, eq(memberUser.id, member.userId))
    .leftJoin(invitations, and(aboutSubject("invitation", invitations.id), sameCourse(invitations.courseId)))
    .leftJoin(otherCourse, aboutSubject("course", otherCourse.id))
    .leftJoin(
      cohorts,
      and(
        sameCourse(cohorts.courseId),
        sql`${cohorts.id}::text = case when ${subjectKind} = 'cohort' then ${subjectId} else coalesce(${auditEvents.detail} ->> 'cohortId', ${auditEvents.detail} ->> 'toCohortId') end`,
      ),
    )
    .where(eq(auditEvents.courseId, courseId))
    .orderBy(desc(auditEvents.createdAt))
    .limit(limit);
  return rows.map(({ createdAt, ip, ...entry }) => ({ createdAt, ip, sentence: auditSentence(entry) }));
}
