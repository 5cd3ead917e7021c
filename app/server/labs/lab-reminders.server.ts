/**
 * Deadline reminders. Publishing a lab (or moving its due time) queues one pg-boss job per reminder
 * offset, starting at due time − offset, on the publishing transaction. When a job runs it reminds
 * every student of the lab's cohorts who has handed nothing in, once: the key of `lab_reminders`
 * (lab, membership, offset) makes a repeat, a retry or a second worker a no-op.
 */
import { eq, sql } from "drizzle-orm";
import { courses, labs } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { appUrl } from "~/server/config.server";
import type { Database, Executor, Transaction } from "~/server/db.server";
import { sendEmails } from "~/server/email/send-email.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";

export type LabReminderJob = { labId: string; offsetHours: number; dueAt: string };

const HOUR_MS = 3_600_000;

/**
 * Queues the reminders of a published lab inside `tx`. An offset whose moment has already passed is
 * skipped: a reminder arriving after its time would say the wrong thing about the time left.
 */
export async function scheduleLabReminders(tx: Transaction, lab: { id: string; dueAt: Date; reminderOffsetsHours: number[] }, now = new Date()): Promise<number> {
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

export type ReminderOutcome = { sent: number; skipped: null | "lab-gone" | "not-published" | "due-time-changed" | "offset-removed" | "past-due" };

function dueAtText(dueAt: Date, timeZone: string): string {
  const text = new Intl.DateTimeFormat("en-GB", { timeZone, weekday: "short", day: "numeric", month: "short", year: "numeric", hour: "2-digit", minute: "2-digit" }).format(dueAt);
  return `${text} (${timeZone})`;
}

/**
 * Runs one reminder job: checks that the lab is still published with the due time and offset the job
 * was queued for, then, in one transaction, records and queues a reminder for each student without a
 * hand-in. A constant number of statements whatever the class size.
 */
export async function sendLabReminders(database: Database, job: LabReminderJob, now = new Date()): Promise<ReminderOutcome> {
  return database.transaction(async (tx) => {
    const [row] = await tx
      .select({ lab: labs, courseTitle: courses.title, timeZone: courses.timeZone })
      .from(labs)
      .innerJoin(courses, eq(courses.id, labs.courseId))
      .where(eq(labs.id, job.labId))
      .for("share", { of: labs });
    if (!row) return { sent: 0, skipped: "lab-gone" };
    const { lab } = row;
    if (lab.status !== "published") return { sent: 0, skipped: "not-published" };
    if (lab.dueAt.getTime() !== Date.parse(job.dueAt)) return { sent: 0, skipped: "due-time-changed" };
    if (!lab.reminderOffsetsHours.includes(job.offsetHours)) return { sent: 0, skipped: "offset-removed" };
    if (now.getTime() >= lab.dueAt.getTime()) return { sent: 0, skipped: "past-due" };

    // Claim the (lab, student, offset) keys first: whoever inserts a key is the one who sends it.
    const claimed = await tx.execute<{ membershipId: string; email: string; name: string }>(sql`
      with claimed as (
        insert into lab_reminders (lab_id, membership_id, offset_hours, sent_at)
        select ${lab.id}, m.id, ${job.offsetHours}, ${now}
        from course_memberships m
        join lab_cohorts lc on lc.cohort_id = m.cohort_id and lc.lab_id = ${lab.id}
        where m.role = 'student' and m.removed_at is null
          and not exists (select 1 from drop_logs d where d.lab_id = ${lab.id} and d.membership_id = m.id and d.latest_version_id is not null)
        on conflict do nothing
        returning membership_id
      )
      select c.membership_id as "membershipId", u.email, u.name
      from claimed c join course_memberships m on m.id = c.membership_id join users u on u.id = m.user_id`);
    if (claimed.rows.length === 0) return { sent: 0, skipped: null };

    const props = {
      courseTitle: row.courseTitle,
      labTitle: lab.title,
      dueAtText: dueAtText(lab.dueAt, row.timeZone),
      hoursLeft: Math.max(0, Math.round((lab.dueAt.getTime() - now.getTime()) / HOUR_MS)),
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
        dedupeKey: `reminder:${lab.id}:${student.membershipId}:${job.offsetHours}`,
      })),
    );
    const links = claimed.rows.map((student, index) => ({ membership_id: student.membershipId, outbox_id: outbox[index].outboxId }));
    await tx.execute(sql`
      update lab_reminders r set outbox_id = x.outbox_id
      from json_to_recordset(${JSON.stringify(links)}::json) as x(membership_id uuid, outbox_id uuid)
      where r.lab_id = ${lab.id} and r.offset_hours = ${job.offsetHours} and r.membership_id = x.membership_id`);
    return { sent: claimed.rows.length, skipped: null };
  });
}

export type SentReminder = { membershipId: string; studentName: string; email: string; cohortName: string | null; offsetHours: number; sentAt: string; emailStatus: string | null };

/** The reminders sent for a lab to the students of the cohorts the viewer may see, newest first: one statement. */
export async function listSentReminders(executor: Executor, access: CourseAccess, labId: string): Promise<SentReminder[]> {
  const result = await executor.execute<SentReminder>(sql`
    select r.membership_id as "membershipId", u.name as "studentName", u.email, h.name as "cohortName", r.offset_hours as "offsetHours",
      to_json(r.sent_at)#>>'{}' as "sentAt", o.status::text as "emailStatus"
    from lab_reminders r
    join course_memberships m on m.id = r.membership_id
    join users u on u.id = m.user_id
    left join cohorts h on h.id = m.cohort_id
    left join email_outbox o on o.id = r.outbox_id
    where r.lab_id = ${labId}
      and m.cohort_id in (select value::uuid from json_array_elements_text(${JSON.stringify(access.cohortIds)}::json))
    order by r.sent_at desc, u.name`);
  return result.rows;
}

/**
 * Pending reminder jobs of the lab (what will go out, and when), for the dashboard: one statement. Jobs
 * queued for an earlier due time will do nothing when they run, so they are not listed.
 */
export async function listScheduledReminders(executor: Executor, lab: { id: string; dueAt: Date }): Promise<{ offsetHours: number; startAfter: string }[]> {
  const result = await executor.execute<{ offsetHours: number; startAfter: string }>(sql`
    select (j.data->>'offsetHours')::int as "offsetHours", to_json(j.start_after)#>>'{}' as "startAfter"
    from pgboss.job j
    where j.name = ${queues.labReminder} and j.state in ('created', 'retry')
      and j.data->>'labId' = ${lab.id} and (j.data->>'dueAt')::timestamptz = ${lab.dueAt}
    order by j.start_after`);
  return result.rows;
}
