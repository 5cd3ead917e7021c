/**
 * The audit trail: who did what, when and from where. Callers pass facts, never a password or a token.
 */
import { desc, eq } from "drizzle-orm";
import { auditEvents, users } from "~/db/schema";
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
  | "course.restored";

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

/** The latest events of a course, newest first, with the actor's name. */
export function listCourseAudit(courseId: string, limit = 200) {
  return db
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      subject: auditEvents.subject,
      detail: auditEvents.detail,
      ip: auditEvents.ip,
      createdAt: auditEvents.createdAt,
      actorName: users.name,
      actorEmail: users.email,
    })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(eq(auditEvents.courseId, courseId))
    .orderBy(desc(auditEvents.createdAt))
    .limit(limit);
}
