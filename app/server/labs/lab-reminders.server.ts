/**
 * Deadline reminders. Publishing a lab (or moving its due time), and granting an extension, queue one
 * pg-boss job per reminder offset for that due time, starting at due time − offset, on the same
 * transaction. When a job runs it reminds the students of the lab's cohorts who have handed nothing in
 * and whose own effective due time (extension, else cohort's, else the lab's) is the job's: an extended
 * student is reminded of their own deadline, never early of the class's. The key of `lab_reminders`
 * (lab, membership, due time, offset) makes a repeat, a retry or a second worker a no-op.
 */
import { formatDateTime } from "~/lib/format-date";
import { and, desc, eq, inArray, sql } from "drizzle-orm";
import { cohorts, courseMemberships, courses, emailOutbox, labReminders, labs, users } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { appUrl } from "~/server/config.server";
import type { Database, Executor, Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";
import { isoText, uuidList } from "~/server/sql.server";
import { effectiveWindowJoin } from "./effective-window.server";

export type LabReminderJob = { labId: string; offsetHours: number; dueAt: string };

const HOUR_MS = 3_600_000;

/**
 * Queues the reminders of a published lab's due time, or of an extension's (pass its due time as
 * `dueAt`), inside `tx`. An offset whose moment has already passed is skipped: a reminder arriving
 * after its time would say the wrong thing about the time left.
 */
export async function scheduleLabReminders(
  tx: Transaction,
  lab: { id: string; dueAt: Date; reminderOffsetsHours: number[] },
  now = new Date(),
): Promise<number> {
  let scheduled = 0;
  for (const offsetHours of lab.reminderOffsetsHours) {
    const startAfter = new Date(lab.dueAt.getTime() - offsetHours * HOUR_MS);
    if (startAfter.getTime() <= now.getTime()) continue;
    const job: LabReminderJob = { labId: lab.id, offsetHours, dueAt: lab.dueAt.toISOString() };
    const id = await enqueuer().send(queues.labReminder, job, { startAfter, db: transactionAdapter(tx) });
    // pg-boss answers null, and writes nothing, when the queue does not exist.
    if (!id) throw new Error(`The job queue "${queues.labReminder}" does not exist: run the migrations (npm start does).`);
    scheduled++;
  }
  return scheduled;
}

export type ReminderOutcome = {
  sent: number;
  skipped: null | "lab-gone" | "course-archived" | "not-published" | "due-time-changed" | "offset-removed" | "past-due";
};

/**
 * Runs one reminder job: checks that the lab's course is not archived, that the lab is still published,
 * that the job's due time is still the lab's or one of its extensions', and that its offset is still the
 * lab's; then, in one transaction,
 * records and queues a reminder for each student without a hand-in whose effective due time is the
 * job's. A constant number of statements whatever the class size.
 */
export async function sendLabReminders(database: Database, job: LabReminderJob, now = new Date()): Promise<ReminderOutcome> {
  const dueAt = new Date(job.dueAt);
  return database.transaction(async (tx) => {
    const [row] = await tx
      .select({
        lab: labs,
        courseTitle: courses.title,
        timeZone: courses.timeZone,
        archived: sql<boolean>`${courses.archivedAt} is not null`,
        extensionDue: sql<boolean>`exists (select 1 from lab_extensions e where e.lab_id = ${labs.id} and e.due_at = ${dueAt})`,
      })
      .from(labs)
      .innerJoin(courses, eq(courses.id, labs.courseId))
      .where(eq(labs.id, job.labId))
      .for("share", { of: labs });
    if (!row) return { sent: 0, skipped: "lab-gone" };
    const { lab } = row;
    // An archived course is finished: its students are not reminded of anything.
    if (row.archived) return { sent: 0, skipped: "course-archived" };
    if (lab.status !== "published") return { sent: 0, skipped: "not-published" };
    if (lab.dueAt.getTime() !== dueAt.getTime() && !row.extensionDue) return { sent: 0, skipped: "due-time-changed" };
    if (!lab.reminderOffsetsHours.includes(job.offsetHours)) return { sent: 0, skipped: "offset-removed" };
    if (now.getTime() >= dueAt.getTime()) return { sent: 0, skipped: "past-due" };

    // Claim the (lab, student, due time, offset) keys first: whoever inserts a key is the one who sends it.
    // Only students whose own due time is the job's: the class's job passes over an extended student.
    // Raw: a set-based insert from the students' effective windows, one statement whatever the class size.
    const claimed = await tx.execute<{ membershipId: string; email: string; name: string }>(sql`
      with claimed as (
        insert into lab_reminders (lab_id, membership_id, due_at, offset_hours, sent_at)
        select l.id, m.id, w.due_at, ${job.offsetHours}, ${now}
        from labs l
        join lab_cohorts lc on lc.lab_id = l.id
        join course_memberships m on m.cohort_id = lc.cohort_id
        ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
        where l.id = ${lab.id} and m.role = 'student' and m.removed_at is null and w.due_at = ${dueAt}
          and not exists (select 1 from drop_logs d where d.lab_id = l.id and d.membership_id = m.id and d.latest_version_id is not null)
        on conflict do nothing
        returning membership_id
      )
      select c.membership_id as "membershipId", u.email, u.name
      from claimed c join course_memberships m on m.id = c.membership_id join users u on u.id = m.user_id`);
    if (claimed.rows.length === 0) return { sent: 0, skipped: null };

    const props = {
      courseTitle: row.courseTitle,
      labTitle: lab.title,
      // Every claimed student's own due time is the job's.
      dueAtText: formatDateTime(dueAt, row.timeZone, "long"),
      hoursLeft: Math.max(0, Math.round((dueAt.getTime() - now.getTime()) / HOUR_MS)),
      labUrl: `${appUrl()}/courses/${lab.courseId}/labs/${lab.id}`,
    };
    const outbox = await sendEmails(
      tx,
      claimed.rows.map((student) => ({
        to: student.email,
        toName: student.name,
        template: "deadline-reminder" as const,
        props,
        courseId: lab.courseId,
        dedupeKey: `reminder:${lab.id}:${student.membershipId}:${dueAt.toISOString()}:${job.offsetHours}`,
      })),
    );
    const links = claimed.rows.map((student, index) => ({ membership_id: student.membershipId, outbox_id: outbox[index].outboxId }));
    // Raw: a bulk update from a JSON recordset.
    await tx.execute(sql`
      update lab_reminders r set outbox_id = x.outbox_id
      from json_to_recordset(${JSON.stringify(links)}::json) as x(membership_id uuid, outbox_id uuid)
      where r.lab_id = ${lab.id} and r.due_at = ${dueAt} and r.offset_hours = ${job.offsetHours} and r.membership_id = x.membership_id`);
    return { sent: claimed.rows.length, skipped: null };
  });
}

export type SentReminder = {
  membershipId: string;
  studentName: string;
  email: string;
  cohortName: string | null;
  offsetHours: number;
  /** The due time the student was reminded of: the lab's, or their extension's. */
  dueAt: string;
  sentAt: string;
  emailStatus: string | null;
};

/** The reminders sent for a lab to the students of the cohorts the viewer may see, newest first: one statement. */
export async function listSentReminders(executor: Executor, access: CourseAccess, labId: string): Promise<SentReminder[]> {
  return executor
    .select({
      membershipId: labReminders.membershipId,
      studentName: users.name,
      email: users.email,
      cohortName: cohorts.name,
      offsetHours: labReminders.offsetHours,
      dueAt: isoText(labReminders.dueAt),
      sentAt: isoText(labReminders.sentAt),
      emailStatus: emailOutbox.status,
    })
    .from(labReminders)
    .innerJoin(courseMemberships, eq(courseMemberships.id, labReminders.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(emailOutbox, eq(emailOutbox.id, labReminders.outboxId))
    .where(and(eq(labReminders.labId, labId), inArray(courseMemberships.cohortId, uuidList(access.cohortIds))))
    .orderBy(desc(labReminders.sentAt), users.name);
}

export type ScheduledReminder = {
  offsetHours: number;
  startAfter: string;
  /** The due time it reminds of. */
  dueAt: string;
  /** For students extended to `dueAt` rather than for the class's due time. */
  extension: boolean;
};

/**
 * Pending reminder jobs of the lab (what will go out, and when), for the dashboard: one statement.
 * Listed for the lab's due time and for each extension's; jobs queued for a due time that is neither
 * any more will do nothing when they run, so they are not listed. Extensions granted to the same time
 * share their jobs' effect, so each (due time, offset) is listed once.
 */
export async function listScheduledReminders(executor: Executor, lab: { id: string; dueAt: Date }): Promise<ScheduledReminder[]> {
  // Raw: it reads pg-boss's own job table.
  const result = await executor.execute<ScheduledReminder>(sql`
    select j.offset_hours as "offsetHours", to_json(min(j.start_after))#>>'{}' as "startAfter",
      to_json(j.due_at)#>>'{}' as "dueAt", j.due_at <> ${lab.dueAt} as extension
    from (
      select (data->>'offsetHours')::int as offset_hours, (data->>'dueAt')::timestamptz as due_at, start_after
      from pgboss.job
      where name = ${queues.labReminder} and state in ('created', 'retry') and data->>'labId' = ${lab.id}
    ) j
    where j.due_at = ${lab.dueAt} or exists (select 1 from lab_extensions e where e.lab_id = ${lab.id} and e.due_at = j.due_at)
    group by j.offset_hours, j.due_at
    order by min(j.start_after)`);
  return result.rows;
}
