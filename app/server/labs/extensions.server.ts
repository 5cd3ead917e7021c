/**
 * Extensions as staff see and set them: a later due time (and cut-off) for some students of a lab or
 * for a whole cohort, with a reason only staff read. Instructors set and remove them; TAs read those
 * of their own cohorts. Each write is one transaction with a constant number of statements whatever
 * the class size: the extensions, the hand-ins' late flags re-decided against the new windows, the
 * reminders for a new due time, and the audit entry.
 */
import { AppError } from "~/lib/app-error";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { cohorts, courseMemberships, labExtensions, users } from "~/db/schema";
import type { ExtensionWindowInput } from "~/lib/labs/extension-input";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { queues } from "~/server/jobs/boss.server";
import { isoText, uuidList } from "~/server/sql.server";
import { recomputeLateness } from "./effective-window.server";
import { visibleCohortIds } from "./lab-dashboard.server";
import { scheduleLabReminders } from "./lab-reminders.server";
import type { LabWithCohorts } from "./labs.server";

export type ExtensionRow = {
  id: string;
  /** Set for a student's own extension; `cohortId` for a cohort's. */
  membershipId: string | null;
  cohortId: string | null;
  studentName: string | null;
  /** The cohort extended, or the student's cohort. */
  cohortName: string | null;
  dueAt: string;
  lateCutoffAt: string | null;
  reason: string;
  setBy: string | null;
  setAt: string;
};

export type ExtensionTarget = { membershipIds: string[] } | { cohortId: string };

type ExtensionLab = Pick<LabWithCohorts, "id" | "courseId" | "status" | "dueAt" | "reminderOffsetsHours" | "cohortIds">;

const isInstructor = (access: CourseAccess) => access.membership.role === "instructor";

/**
 * The lab's extensions the viewer may see, cohorts' first: all for an instructor, those of the TA's
 * own cohorts (a cohort's, or a student's of that cohort) for a TA. One statement.
 */
export async function listExtensions(
  executor: Executor,
  access: CourseAccess,
  lab: Pick<LabWithCohorts, "id" | "cohortIds">,
): Promise<ExtensionRow[]> {
  const member = alias(courseMemberships, "m");
  const student = alias(users, "u");
  const setter = alias(users, "b");
  const cohort = alias(cohorts, "h");
  const studentCohort = alias(cohorts, "sh");
  const cohortName = sql<string | null>`coalesce(${cohort.name}, ${studentCohort.name})`;
  const visible = isInstructor(access)
    ? undefined
    : inArray(sql`coalesce(${labExtensions.cohortId}, ${member.cohortId})`, uuidList(visibleCohortIds(access, lab)));
  return executor
    .select({
      id: labExtensions.id,
      membershipId: labExtensions.membershipId,
      cohortId: labExtensions.cohortId,
      studentName: student.name,
      cohortName,
      dueAt: isoText(labExtensions.dueAt),
      lateCutoffAt: isoText(labExtensions.lateCutoffAt),
      reason: labExtensions.reason,
      setBy: setter.name,
      setAt: isoText(labExtensions.updatedAt),
    })
    .from(labExtensions)
    .leftJoin(member, eq(member.id, labExtensions.membershipId))
    .leftJoin(student, eq(student.id, member.userId))
    .leftJoin(cohort, eq(cohort.id, labExtensions.cohortId))
    .leftJoin(studentCohort, eq(studentCohort.id, member.cohortId))
    .leftJoin(setter, eq(setter.id, labExtensions.createdById))
    .where(and(eq(labExtensions.labId, lab.id), visible))
    .orderBy(isNull(labExtensions.cohortId), cohortName, student.name);
}

export type ExtensionsPage = {
  extensions: ExtensionRow[];
  /** The lab's cohorts the viewer sees, for the cohort form. */
  cohorts: { id: string; name: string }[];
  /** The lab's students, for the one-student form: instructors only (TAs only read). */
  students: { membershipId: string; name: string; cohortName: string }[];
};

/** Everything the extensions page shows: three statements side by side, whatever the class size. */
export async function getExtensionsPage(
  executor: Executor,
  access: CourseAccess,
  lab: Pick<LabWithCohorts, "id" | "courseId" | "cohortIds">,
): Promise<ExtensionsPage> {
  const cohortIds = visibleCohortIds(access, lab);
  const [extensions, cohortRows, students] = await Promise.all([
    listExtensions(executor, access, lab),
    executor
      .select({ id: cohorts.id, name: cohorts.name })
      .from(cohorts)
      .where(inArray(cohorts.id, uuidList(cohortIds)))
      .orderBy(cohorts.position, cohorts.name),
    isInstructor(access)
      ? executor
          .select({ membershipId: courseMemberships.id, name: users.name, cohortName: cohorts.name })
          .from(courseMemberships)
          .innerJoin(users, eq(users.id, courseMemberships.userId))
          .innerJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
          .where(
            and(
              eq(courseMemberships.courseId, lab.courseId),
              eq(courseMemberships.role, "student"),
              isNull(courseMemberships.removedAt),
              inArray(courseMemberships.cohortId, uuidList(cohortIds)),
            ),
          )
          .orderBy(cohorts.position, cohorts.name, users.name)
      : Promise.resolve([]),
  ]);
  return { extensions, cohorts: cohortRows, students };
}

function requireInstructor(access: CourseAccess): void {
  if (!isInstructor(access))
    throw new AppError({ code: "extension_refused", message: "Only the course's instructors set or remove extensions.", status: 403 });
}

/**
 * Gives the target (one or many students, or a whole cohort) the window, replacing any extension it
 * had. The students must be active students of the lab's cohorts, the cohort one of the lab's: one
 * stranger refuses the whole batch. When the lab is published and nothing is queued yet for the new
 * due time, its reminders are scheduled for it; the reminder job decides whose due time it is.
 */
export async function setExtensions(
  executor: Executor,
  {
    access,
    lab,
    target,
    window,
    request,
    now = new Date(),
  }: { access: CourseAccess; lab: ExtensionLab; target: ExtensionTarget; window: ExtensionWindowInput; request?: Request; now?: Date },
): Promise<{ extended: number; relabelled: number; remindersScheduled: number }> {
  requireInstructor(access);
  const forCohort = "cohortId" in target;
  if (forCohort && !lab.cohortIds.includes(target.cohortId))
    throw new AppError({ code: "extension_refused", message: "Choose one of the cohorts this lab is set for.", field: "cohortId" });
  const membershipIds = forCohort ? [] : [...new Set(target.membershipIds)];
  if (!forCohort && membershipIds.length === 0)
    throw new AppError({ code: "extension_refused", message: "Choose at least one student.", field: "membershipIds" });
  const lateCutoffAt = window.lateCutoffAt ?? null;

  return executor.transaction(async (tx) => {
    const [column, chosen, conflict] = forCohort
      ? [sql`cohort_id`, sql`select ${target.cohortId}::uuid as id`, sql`(lab_id, cohort_id) where cohort_id is not null`]
      : [
          sql`membership_id`,
          sql`select m.id from course_memberships m
            where m.id in ${uuidList(membershipIds)} and m.course_id = ${lab.courseId} and m.role = 'student' and m.removed_at is null
              and m.cohort_id in ${uuidList(lab.cohortIds)}`,
          sql`(lab_id, membership_id) where membership_id is not null`,
        ];
    // One statement: the upsert, and whether reminder jobs already wait for this due time (read before it, as a CTE sees the snapshot).
    // Raw: a set-based upsert that also reads pg-boss's own job table.
    const result = await tx.execute<{ written: number; queued: boolean }>(sql`
      with chosen as (${chosen}),
      written as (
        insert into lab_extensions as e (lab_id, ${column}, due_at, late_cutoff_at, reason, created_by_id)
        select ${lab.id}::uuid, chosen.id, ${window.dueAt}::timestamptz, ${lateCutoffAt}::timestamptz, ${window.reason}::text, ${access.user.id}::uuid from chosen
        on conflict ${conflict} do update set
          due_at = excluded.due_at, late_cutoff_at = excluded.late_cutoff_at, reason = excluded.reason,
          -- Whoever set the current times answers for them.
          created_by_id = excluded.created_by_id, updated_at = now()
        returning e.id
      )
      select (select count(*)::int from written) as written,
        exists (select 1 from pgboss.job j where j.name = ${queues.labReminder} and j.data->>'labId' = ${lab.id}
          and (j.data->>'dueAt')::timestamptz = ${window.dueAt}::timestamptz) as queued`);
    const { written, queued } = result.rows[0];
    if (!forCohort && written !== membershipIds.length)
      throw new AppError({
        code: "extension_refused",
        message: "Choose active students of the cohorts this lab is set for.",
        field: "membershipIds",
      });

    const relabelled = await recomputeLateness(tx, lab.id);
    const newDueTime = !queued && window.dueAt.getTime() !== lab.dueAt.getTime();
    const remindersScheduled =
      lab.status === "published" && newDueTime
        ? await scheduleLabReminders(tx, { id: lab.id, dueAt: window.dueAt, reminderOffsetsHours: lab.reminderOffsetsHours }, now)
        : 0;
    await recordAudit(tx, {
      action: "lab.extension_set",
      actorId: access.user.id,
      courseId: lab.courseId,
      subject: `lab:${lab.id}`,
      detail: {
        ...(forCohort ? { cohortId: target.cohortId } : { membershipIds }),
        dueAt: window.dueAt.toISOString(),
        lateCutoffAt: lateCutoffAt?.toISOString() ?? null,
        reason: window.reason,
        relabelled,
      },
      request,
    });
    return { extended: written, relabelled, remindersScheduled };
  });
}

/** Removes one extension: its students fall back to their cohort's extension, else the lab's times, and their hand-ins are re-decided. */
export async function removeExtension(
  executor: Executor,
  {
    access,
    lab,
    extensionId,
    request,
  }: { access: CourseAccess; lab: Pick<LabWithCohorts, "id" | "courseId">; extensionId: string; request?: Request },
): Promise<{ relabelled: number }> {
  requireInstructor(access);
  return executor.transaction(async (tx) => {
    const [extension] = await tx
      .delete(labExtensions)
      .where(and(eq(labExtensions.id, extensionId), eq(labExtensions.labId, lab.id)))
      .returning({
        membershipId: labExtensions.membershipId,
        cohortId: labExtensions.cohortId,
        dueAt: isoText(labExtensions.dueAt),
        lateCutoffAt: isoText(labExtensions.lateCutoffAt),
        reason: labExtensions.reason,
      });
    if (!extension) throw new AppError({ code: "extension_refused", message: "That extension is no longer there." });
    const relabelled = await recomputeLateness(tx, lab.id);
    await recordAudit(tx, {
      action: "lab.extension_removed",
      actorId: access.user.id,
      courseId: lab.courseId,
      subject: `lab:${lab.id}`,
      detail: { ...extension, relabelled },
      request,
    });
    return { relabelled };
  });
}
