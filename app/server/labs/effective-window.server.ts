/**
 * Each student's effective hand-in window in SQL: their own extension, else their cohort's, else the
 * lab's, exactly as `effectiveHandInWindow` decides it in TypeScript. Every statement that needs a
 * student's due time or cut-off (the lab list, lateness, reminders, the desk, the dashboard) joins this
 * one fragment, so the rule lives in one place.
 */
import { type SQL, sql } from "drizzle-orm";
import type { Executor } from "~/server/db.server";

/**
 * `lateral (…) as <as>`, for a query builder's `.leftJoin(effectiveWindow(…), sql\`true\`)`, with columns `due_at`, `late_cutoff_at`, `extended_by`
 * ('student' | 'cohort' | null) and `reason` (the extension's; staff only, never select it for a
 * student), for the lab aliased `lab` and the course membership aliased `member` (any relation with
 * `id` and `cohort_id`). Aliases are the caller's own constants, never user input.
 */
export function effectiveWindow(aliases: { lab: string; member: string; as: string }): SQL {
  const { lab, member, as } = aliases;
  return sql.raw(`lateral (
      select coalesce(es.due_at, ec.due_at, ${lab}.due_at) as due_at,
        -- Without a cut-off of its own, an extension keeps the class's when that comes later.
        case when es.id is not null then coalesce(es.late_cutoff_at, case when ${lab}.late_cutoff_at > es.due_at then ${lab}.late_cutoff_at end)
          when ec.id is not null then coalesce(ec.late_cutoff_at, case when ${lab}.late_cutoff_at > ec.due_at then ${lab}.late_cutoff_at end)
          else ${lab}.late_cutoff_at end as late_cutoff_at,
        case when es.id is not null then 'student' when ec.id is not null then 'cohort' end as extended_by,
        coalesce(es.reason, ec.reason) as reason
      from (select 1) as one
      left join lab_extensions es on es.lab_id = ${lab}.id and es.membership_id = ${member}.id
      left join lab_extensions ec on ec.lab_id = ${lab}.id and ec.cohort_id = ${member}.cohort_id
    ) as ${as}`);
}

/** The same window as a join clause, for the statements written in SQL. */
export const effectiveWindowJoin = (aliases: { lab: string; member: string; as: string }): SQL =>
  sql`left join ${effectiveWindow(aliases)} on true`;

/** The joined window `as` as a `StudentDeadline` JSON object, reason included: for staff pages only. */
export const staffDeadlineJson = (as: string): SQL =>
  sql.raw(
    `json_build_object('dueAt', to_json(${as}.due_at)#>>'{}', 'lateCutoffAt', to_json(${as}.late_cutoff_at)#>>'{}', 'extendedBy', ${as}.extended_by, 'extensionReason', ${as}.reason)`,
  );

/**
 * Re-decides the late flag of every hand-in of a lab against its student's effective due time, after an
 * extension is set or removed: a hand-in made after the class deadline but inside a later-granted
 * extension is on time. One statement; returns how many versions changed.
 */
export async function recomputeLateness(executor: Executor, labId: string): Promise<number> {
  // Raw: a set-based update over the lab's hand-ins, joined to the windows' raw lateral join.
  const result = await executor.execute(sql`
    update drop_log_versions v set late = v.submitted_at > w.due_at
    from drop_logs d
    join labs l on l.id = d.lab_id
    join course_memberships m on m.id = d.membership_id
    ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
    where d.lab_id = ${labId} and v.drop_log_id = d.id and v.late <> (v.submitted_at > w.due_at)`);
  return result.rowCount ?? 0;
}
