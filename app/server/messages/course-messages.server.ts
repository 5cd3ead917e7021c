/**
 * Messages to a cohort: an instructor or TA writes to the students of some cohorts (a TA, only theirs),
 * optionally narrowed by a lab and where each student's hand-in of it stands. The preview counts the
 * audience and makes the send key; sending recomputes the audience in its transaction and refuses (409)
 * when the count is not the one the author saw. Each recipient gets one outbox row and one
 * `course_message_recipients` row, which the student's record lists. A constant number of statements
 * whatever the audience's size.
 */
import { and, desc, eq, inArray, ne, sql, type SQL } from "drizzle-orm";
import { cohorts, courseMessageRecipients, courseMessages, labs, users } from "~/db/schema";
import { AppError } from "~/lib/app-error";
import { type Audience, audienceLabel, type HandInState } from "~/lib/messages/message-input";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { generateToken } from "~/server/auth/tokens.server";
import { insertMany } from "~/server/bulk-insert.server";
import { appUrl } from "~/server/config.server";
import type { Database, Executor } from "~/server/db.server";
import { renderEmail } from "~/server/email/email-templates.server";
import { sendEmails } from "~/server/email/send-email.server";
import { isoText, uuidList } from "~/server/sql.server";
import { counted } from "~/lib/plural";

/** How many names the preview shows. */
const PREVIEW_NAMES = 5;

/** The cohorts and labs the author may choose from: a TA's own cohorts, the course's published (or closed) labs. */
export async function messageChoices(executor: Executor, access: CourseAccess) {
  const [cohortRows, labRows] = await Promise.all([
    executor
      .select({ id: cohorts.id, name: cohorts.name })
      .from(cohorts)
      .where(and(eq(cohorts.courseId, access.course.id), inArray(cohorts.id, uuidList(access.cohortIds))))
      .orderBy(cohorts.position, cohorts.name),
    executor
      .select({ id: labs.id, title: labs.title })
      .from(labs)
      .where(and(eq(labs.courseId, access.course.id), ne(labs.status, "draft")))
      .orderBy(labs.dueAt, labs.title),
  ]);
  return { cohorts: cohortRows, labs: labRows };
}

/** Whether the student (`m`) stands in `state` for the lab (`l`): one plain test each, on their drop log and mark. */
const stateTests: Record<HandInState, SQL> = {
  "not-handed-in": sql`not exists (select 1 from drop_logs d where d.lab_id = l.id and d.membership_id = m.id and d.latest_version_id is not null)`,
  "handed-in": sql`exists (select 1 from drop_logs d where d.lab_id = l.id and d.membership_id = m.id and d.latest_version_id is not null)`,
  "handed-in-late": sql`exists (select 1 from drop_logs d join drop_log_versions v on v.id = d.latest_version_id
    where d.lab_id = l.id and d.membership_id = m.id and v.late)`,
  "not-marked": sql`exists (select 1 from drop_logs d where d.lab_id = l.id and d.membership_id = m.id and d.latest_version_id is not null)
    and not exists (select 1 from marks mk where mk.lab_id = l.id and mk.membership_id = m.id)`,
};

type Recipient = { membershipId: string; name: string; email: string };

/** The cohorts' names and the lab, checked against the author's scope; refuses what they may not reach. */
async function resolveAudience(executor: Executor, access: CourseAccess, audience: Audience) {
  if (audience.cohortIds.some((id) => !access.cohortIds.includes(id)))
    throw new AppError({
      code: "cohort_not_assigned",
      status: 403,
      field: "cohortIds",
      message: "You can write only to the students of the cohorts you are assigned to.",
    });
  const [row] = await executor
    .select({
      cohortNames: sql<string[]>`(select coalesce(array_agg(co.name order by co.name), '{}') from cohorts co
        where co.course_id = ${access.course.id} and co.id in ${uuidList(audience.cohortIds)})`,
      labTitle: audience.labId
        ? sql<
            string | null
          >`(select l.title from labs l where l.id = ${audience.labId} and l.course_id = ${access.course.id} and l.status <> 'draft')`
        : sql<null>`null`,
    })
    .from(sql`(select 1) as one`);
  if (row.cohortNames.length !== new Set(audience.cohortIds).size)
    throw new AppError({ code: "unknown_cohort", field: "cohortIds", message: "Choose cohorts of this course." });
  if (audience.labId && row.labTitle === null)
    throw new AppError({ code: "unknown_lab", field: "labId", message: "Choose a lab of this course." });
  const lab = row.labTitle === null ? null : { title: row.labTitle };
  return { label: audienceLabel(row.cohortNames, lab, audience.handInState) };
}

/**
 * The students the audience names, in one statement: active students of the chosen cohorts; with a lab,
 * those it is set for, and with a state, those whose hand-in stands so.
 */
async function audienceMembers(executor: Executor, courseId: string, audience: Audience): Promise<Recipient[]> {
  const lab = audience.labId
    ? sql`join labs l on l.id = ${audience.labId} and l.course_id = m.course_id
        join lab_cohorts lc on lc.lab_id = l.id and lc.cohort_id = m.cohort_id`
    : sql``;
  const state = audience.handInState ? sql`and ${stateTests[audience.handInState]}` : sql``;
  // Raw: the state tests are correlated subqueries over the lab and member aliases.
  const result = await executor.execute<Recipient>(sql`
    select m.id as "membershipId", u.name, u.email
    from course_memberships m
    join users u on u.id = m.user_id
    ${lab}
    where m.course_id = ${courseId} and m.role = 'student' and m.removed_at is null
      and m.cohort_id in ${uuidList(audience.cohortIds)} ${state}
    order by u.name, u.email, m.id`);
  return result.rows;
}

function emailProps(access: CourseAccess, message: { subject: string; body: string }) {
  return {
    courseTitle: access.course.title,
    authorName: access.user.name,
    subject: message.subject,
    body: message.body,
    courseUrl: `${appUrl()}/courses/${access.course.id}`,
  };
}

export type MessagePreview = {
  audienceLabel: string;
  count: number;
  /** The first few recipients' names, in the order the list is sorted. */
  names: string[];
  sendKey: string;
  email: { subject: string; html: string };
};

/** The count, the first names and the e-mail as it will be sent; and the key that makes sending it happen once. */
export async function previewCourseMessage(
  executor: Executor,
  access: CourseAccess,
  input: { audience: Audience; subject: string; body: string },
): Promise<MessagePreview> {
  const [{ label }, members] = await Promise.all([
    resolveAudience(executor, access, input.audience),
    audienceMembers(executor, access.course.id, input.audience),
  ]);
  const email = await renderEmail("course-message", emailProps(access, input));
  return {
    audienceLabel: label,
    count: members.length,
    names: members.slice(0, PREVIEW_NAMES).map((member) => member.name),
    sendKey: generateToken(),
    email: { subject: email.subject, html: email.html },
  };
}

export type SentMessage = { messageId: string; recipientCount: number; duplicate: boolean };

/**
 * Sends the message in one transaction, to the audience as it is now. A send key already used in the
 * course answers the message it sent (a resent form sends nothing more); a count other than the
 * preview's is refused with the new count.
 */
export async function sendCourseMessage(
  database: Database,
  access: CourseAccess,
  input: { audience: Audience; subject: string; body: string; sendKey: string; expectedCount: number },
  request?: Request,
): Promise<SentMessage> {
  return database.transaction(async (tx) => {
    const sentBefore = async () => {
      const [row] = await tx
        .select({ id: courseMessages.id, recipientCount: courseMessages.recipientCount })
        .from(courseMessages)
        .where(and(eq(courseMessages.courseId, access.course.id), eq(courseMessages.sendKey, input.sendKey)));
      return row ? { messageId: row.id, recipientCount: row.recipientCount, duplicate: true } : null;
    };
    const earlier = await sentBefore();
    if (earlier) return earlier;
    // One after the other: a transaction's client runs one statement at a time.
    const { label } = await resolveAudience(tx, access, input.audience);
    const members = await audienceMembers(tx, access.course.id, input.audience);
    if (members.length !== input.expectedCount)
      throw new AppError({
        code: "audience_changed",
        status: 409,
        message: `The audience changed since the preview: it is now ${counted(members.length, "student", "students")}, not ${input.expectedCount}. Nothing was sent; preview again.`,
      });
    const [message] = await tx
      .insert(courseMessages)
      .values({
        courseId: access.course.id,
        authorId: access.user.id,
        subject: input.subject,
        body: input.body,
        audience: { ...input.audience },
        audienceLabel: label,
        recipientCount: members.length,
        sendKey: input.sendKey,
      })
      .onConflictDoNothing()
      .returning({ id: courseMessages.id });
    // Another request with the same key committed between the check and the insert.
    if (!message) return (await sentBefore())!;
    const props = emailProps(access, input);
    const queued = await sendEmails(
      tx,
      members.map((member) => ({
        to: member.email,
        toName: member.name,
        template: "course-message" as const,
        props,
        courseId: access.course.id,
        dedupeKey: `course-message:${message.id}:${member.membershipId}`,
      })),
    );
    await insertMany(
      tx,
      courseMessageRecipients,
      members.map((member, index) => ({ messageId: message.id, membershipId: member.membershipId, outboxId: queued[index].outboxId })),
    );
    await recordAudit(tx, {
      action: "course.message_sent",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `course_message:${message.id}`,
      detail: { audience: label, recipientCount: members.length, subject: input.subject },
      request,
    });
    return { messageId: message.id, recipientCount: members.length, duplicate: false };
  });
}

/**
 * The course's sent messages, newest first, with their author. A TA sees the messages that went only
 * to their cohorts (one sent to other cohorts too names students they may not see).
 */
export function listCourseMessages(executor: Executor, access: CourseAccess) {
  const scope =
    access.membership.role === "instructor"
      ? sql`true`
      : sql`not exists (select 1 from jsonb_array_elements_text(${courseMessages.audience} -> 'cohortIds') as chosen(id)
          where chosen.id::uuid not in ${uuidList(access.cohortIds)})`;
  return executor
    .select({
      id: courseMessages.id,
      subject: courseMessages.subject,
      audienceLabel: courseMessages.audienceLabel,
      recipientCount: courseMessages.recipientCount,
      sentAt: isoText(courseMessages.createdAt),
      authorName: users.name,
    })
    .from(courseMessages)
    .leftJoin(users, eq(users.id, courseMessages.authorId))
    .where(and(eq(courseMessages.courseId, access.course.id), scope))
    .orderBy(desc(courseMessages.createdAt), desc(courseMessages.id))
    .limit(200);
}
