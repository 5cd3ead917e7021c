/**
 * A record per student, for the course's instructors and the TAs of the student's cohort: who they are,
 * the kits they held with each kit's moves, every hand-in and version, marks with their changes,
 * extensions, e-mails and messages sent to them, and (for instructors) the audit entries about them.
 * One statement per section, run side by side, whatever the class size or the length of their history;
 * each long list is cut at its latest `limit` entries and says so.
 */
import { and, desc, eq, inArray, isNotNull, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  courseMessageRecipients,
  courseMessages,
  dropLogs,
  dropLogVersions,
  emailOutbox,
  invitations,
  kitEvents,
  kits,
  labExtensions,
  labs,
  markChanges,
  marks,
  rubricCriteria,
  users,
  type KitEventDetail,
} from "~/db/schema";
import type { KitState } from "~/lib/kits/kit-states";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { jsonRows, orNull } from "~/server/json-rows.server";

/** How many entries of each history the record shows: the latest ones. */
export const recordListLimit = 100;

export type RecordMember = NonNullable<Awaited<ReturnType<typeof findRecordMember>>>;

/** A membership of the course with its person and cohort, removed or not (a removed student keeps their record). */
export async function findRecordMember(executor: Executor, courseId: string, membershipId: string) {
  const [member] = await executor
    .select({
      membershipId: courseMemberships.id,
      userId: users.id,
      name: users.name,
      email: users.email,
      studentNumber: users.studentNumber,
      role: courseMemberships.role,
      cohortId: courseMemberships.cohortId,
      cohortName: cohorts.name,
      joinedAt: courseMemberships.createdAt,
      removedAt: courseMemberships.removedAt,
    })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .where(and(eq(courseMemberships.id, membershipId), eq(courseMemberships.courseId, courseId)));
  return member ?? null;
}

/** The latest `limit` rows of a list read with `limit + 1`, and whether there were more. */
function latest<T>(rows: T[], limit: number): { rows: T[]; more: boolean } {
  return { rows: rows.slice(0, limit), more: rows.length > limit };
}

type KitEventRow = {
  id: string;
  kitId: string;
  kitNumber: string;
  kitState: KitState;
  holderCohortId: string | null;
  createdAt: Date | string;
  action: string;
  fromState: KitState | null;
  toState: KitState | null;
  detail: KitEventDetail;
  note: string | null;
  actorName: string | null;
};

/**
 * The moves of the kits the student held, newest first. A kit's history is cut into holdings, each
 * beginning where the kit is packed for someone; the student's holdings are those whose moves name them
 * as holder (every move records the holder after it), and the one going on while they hold the kit
 * (a kit packed for their invitation names nobody until they accept). Another student's use of the
 * same kit is never shown.
 */
async function kitHistory(executor: Executor, courseId: string, membershipId: string, limit: number) {
  const result = await executor.execute<KitEventRow>(sql`
    with segments as (
      select e.id, e.kit_id, e.created_at, e.action, e.from_state, e.to_state, e.detail, e.note, e.actor_id,
        count(*) filter (where e.action = 'moved' and e.to_state = 'packed') over (partition by e.kit_id order by e.created_at, e.id) as segment
      from ${kitEvents} e
      join ${kits} k on k.id = e.kit_id
      where k.course_id = ${courseId}
        and (k.holder_membership_id = ${membershipId}
          or exists (select 1 from ${kitEvents} h where h.kit_id = k.id and h.detail ->> 'holderMembershipId' = ${membershipId}))
    ),
    held as (
      select kit_id, segment from segments where detail ->> 'holderMembershipId' = ${membershipId}
      union
      select s.kit_id, max(s.segment) as segment from segments s join ${kits} k on k.id = s.kit_id
      where k.holder_membership_id = ${membershipId} group by s.kit_id
    )
    select s.id, s.kit_id as "kitId", k.number as "kitNumber", k.state as "kitState", holder.cohort_id as "holderCohortId",
      s.created_at as "createdAt", s.action, s.from_state as "fromState", s.to_state as "toState", s.detail, s.note,
      actor.name as "actorName"
    from segments s
    join held using (kit_id, segment)
    join ${kits} k on k.id = s.kit_id
    left join ${courseMemberships} holder on holder.id = k.holder_membership_id
    left join ${users} actor on actor.id = s.actor_id
    order by s.created_at desc, s.id desc
    limit ${limit + 1}`);
  return latest(
    result.rows.map((row) => ({ ...row, createdAt: new Date(row.createdAt) })),
    limit,
  );
}

/** Every version the student handed in, newest first, with its lab and key figures. */
function handIns(executor: Executor, membershipId: string, limit: number) {
  return executor
    .select({
      id: dropLogVersions.id,
      version: dropLogVersions.version,
      submittedAt: dropLogVersions.submittedAt,
      late: dropLogVersions.late,
      reductionMode: dropLogVersions.reductionMode,
      dragCoefficient: dropLogVersions.dragCoefficient,
      reynolds: dropLogVersions.reynolds,
      viscosityPaS: dropLogVersions.viscosityPaS,
      normalisedFigure: dropLogVersions.normalisedFigure,
      counts: sql<boolean>`${dropLogs.latestVersionId} = ${dropLogVersions.id}`,
      dropLogId: dropLogs.id,
      labId: labs.id,
      labTitle: labs.title,
    })
    .from(dropLogVersions)
    .innerJoin(dropLogs, eq(dropLogs.id, dropLogVersions.dropLogId))
    .innerJoin(labs, eq(labs.id, dropLogs.labId))
    .where(eq(dropLogs.membershipId, membershipId))
    .orderBy(desc(dropLogVersions.submittedAt), desc(dropLogVersions.version))
    .limit(limit + 1);
}

/** The student's mark for each lab (newest lab first) with its latest changes, and the lab's rubric maximum. */
async function markHistory(executor: Executor, membershipId: string, limit: number) {
  const changer = alias(users, "changer");
  // The changes of one mark, the latest `limit + 1` first: a subquery named as the table, so its columns read as the table's.
  const changes = jsonRows(
    {
      id: markChanges.id,
      changedAt: markChanges.changedAt,
      old: markChanges.old,
      new: markChanges.new,
      reason: markChanges.reason,
      source: markChanges.source,
      afterRelease: markChanges.afterRelease,
      changedBy: orNull({ name: changer.name }, changer.id),
    },
    sql`from (select * from ${markChanges} where ${markChanges.markId} = ${marks.id} order by ${markChanges.changedAt} desc limit ${limit + 1}) ${markChanges}
      left join ${users} ${changer} on ${changer.id} = ${markChanges.changedById}`,
    sql`${markChanges.changedAt} desc, ${markChanges.id} desc`,
  );
  const rows = await executor
    .select({
      id: marks.id,
      labId: labs.id,
      labTitle: labs.title,
      total: marks.total,
      releasedAt: marks.releasedAt,
      reopenedAt: marks.reopenedAt,
      maxPoints: sql<
        number | null
      >`(select sum(${rubricCriteria.maxPoints})::float8 from ${rubricCriteria} where ${rubricCriteria.labId} = ${labs.id})`,
      changes: changes.column,
    })
    .from(marks)
    .innerJoin(labs, eq(labs.id, marks.labId))
    .where(eq(marks.membershipId, membershipId))
    .orderBy(desc(labs.dueAt), desc(labs.createdAt))
    .limit(limit + 1);
  return latest(
    rows.map(({ changes: raw, ...mark }) => ({
      ...mark,
      changes: latest(
        changes.read(raw).map(({ old, new: after, ...change }) => ({ ...change, oldTotal: old?.total ?? null, newTotal: after.total })),
        limit,
      ),
    })),
    limit,
  );
}

/** The student's own extensions and their cohort's, newest lab first. */
function extensionHistory(executor: Executor, courseId: string, member: RecordMember, limit: number) {
  const setBy = alias(users, "set_by");
  return executor
    .select({
      id: labExtensions.id,
      labId: labs.id,
      labTitle: labs.title,
      forCohort: isNotNull(labExtensions.cohortId),
      dueAt: labExtensions.dueAt,
      lateCutoffAt: labExtensions.lateCutoffAt,
      reason: labExtensions.reason,
      setByName: setBy.name,
      updatedAt: labExtensions.updatedAt,
    })
    .from(labExtensions)
    .innerJoin(labs, eq(labs.id, labExtensions.labId))
    .leftJoin(setBy, eq(setBy.id, labExtensions.createdById))
    .where(
      and(
        eq(labs.courseId, courseId),
        member.cohortId
          ? or(eq(labExtensions.membershipId, member.membershipId), eq(labExtensions.cohortId, member.cohortId))
          : eq(labExtensions.membershipId, member.membershipId),
      ),
    )
    .orderBy(desc(labs.dueAt), desc(labExtensions.updatedAt))
    .limit(limit + 1);
}

/** The e-mails the course sent to the student's address, newest first, with their delivery status. */
function emailHistory(executor: Executor, courseId: string, email: string, limit: number) {
  return executor
    .select({
      id: emailOutbox.id,
      template: emailOutbox.template,
      subject: emailOutbox.subject,
      status: emailOutbox.status,
      createdAt: emailOutbox.createdAt,
      sentAt: emailOutbox.sentAt,
      failedAt: emailOutbox.failedAt,
    })
    .from(emailOutbox)
    .where(and(eq(emailOutbox.courseId, courseId), eq(emailOutbox.toAddress, email.toLowerCase())))
    .orderBy(desc(emailOutbox.createdAt))
    .limit(limit + 1);
}

/** The course messages the student was among the recipients of, newest first, with their copy's delivery status. */
function messageHistory(executor: Executor, membershipId: string, limit: number) {
  const author = alias(users, "author");
  return executor
    .select({
      id: courseMessages.id,
      subject: courseMessages.subject,
      body: courseMessages.body,
      audienceLabel: courseMessages.audienceLabel,
      createdAt: courseMessages.createdAt,
      authorName: author.name,
      status: emailOutbox.status,
    })
    .from(courseMessageRecipients)
    .innerJoin(courseMessages, eq(courseMessages.id, courseMessageRecipients.messageId))
    .leftJoin(author, eq(author.id, courseMessages.authorId))
    .leftJoin(emailOutbox, eq(emailOutbox.id, courseMessageRecipients.outboxId))
    .where(eq(courseMessageRecipients.membershipId, membershipId))
    .orderBy(desc(courseMessages.createdAt))
    .limit(limit + 1);
}

/**
 * The course's audit entries about the student, newest first: those whose subject is their account or
 * membership, or their invitation (sent, accepted, its address); those whose detail names their membership
 * (an extension for chosen students); and refusals at their pages.
 */
function auditHistory(executor: Executor, courseId: string, member: RecordMember, limit: number) {
  const actor = alias(users, "actor");
  const invitationSubjects = executor
    .select({ subject: sql<string>`'invitation:' || ${invitations.id}` })
    .from(invitations)
    .where(
      and(
        eq(invitations.courseId, courseId),
        or(eq(invitations.acceptedById, member.userId), eq(invitations.email, member.email.toLowerCase())),
      ),
    );
  return executor
    .select({
      id: auditEvents.id,
      action: auditEvents.action,
      subject: auditEvents.subject,
      detail: auditEvents.detail,
      createdAt: auditEvents.createdAt,
      actorName: actor.name,
    })
    .from(auditEvents)
    .leftJoin(actor, eq(actor.id, auditEvents.actorId))
    .where(
      and(
        eq(auditEvents.courseId, courseId),
        or(
          inArray(auditEvents.subject, [`user:${member.userId}`, `membership:${member.membershipId}`]),
          inArray(auditEvents.subject, invitationSubjects),
          sql`${auditEvents.detail} -> 'membershipIds' ? ${member.membershipId}`,
          sql`${auditEvents.detail} ->> 'membershipId' = ${member.membershipId}`,
          sql`${auditEvents.subject} like ${`path:/courses/${courseId}/members/${member.membershipId}%`}`,
        ),
      ),
    )
    .orderBy(desc(auditEvents.createdAt))
    .limit(limit + 1);
}

/**
 * The record of one student, read for a viewer already allowed to see it (`canSeeStudentWork`), and
 * the view recorded. TAs get no audit section: its details (addresses seen, other staff) are the instructors'.
 */
export async function loadStudentRecord(
  executor: Executor,
  { access, member, request, limit = recordListLimit }: { access: CourseAccess; member: RecordMember; request?: Request; limit?: number },
) {
  const courseId = access.course.id;
  const instructor = access.membership.role === "instructor";
  const [kitEventList, versions, markList, extensions, emails, messages, audit] = await Promise.all([
    kitHistory(executor, courseId, member.membershipId, limit),
    handIns(executor, member.membershipId, limit),
    markHistory(executor, member.membershipId, limit),
    extensionHistory(executor, courseId, member, limit),
    emailHistory(executor, courseId, member.email, limit),
    messageHistory(executor, member.membershipId, limit),
    instructor ? auditHistory(executor, courseId, member, limit) : null,
  ]);
  await recordAudit(executor, {
    action: "member.record_viewed",
    actorId: access.user.id,
    courseId,
    subject: `membership:${member.membershipId}`,
    request,
  });
  return {
    limit,
    kitEvents: kitEventList,
    versions: latest(versions, limit),
    marks: markList,
    extensions: latest(extensions, limit),
    emails: latest(emails, limit),
    messages: latest(messages, limit),
    audit: audit ? latest(audit, limit) : null,
  };
}

export type StudentRecord = Awaited<ReturnType<typeof loadStudentRecord>>;
