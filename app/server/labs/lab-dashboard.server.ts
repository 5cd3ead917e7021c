/**
 * A lab's hand-in dashboard for its staff: progress per cohort (on time, late, not due yet, missing:
 * each against the student's own due time, extensions counted), each student's counted version and
 * own due time, and the reminders sent and still to go. A TA sees only the cohorts assigned to them.
 * Three statements, run side by side, whatever the class size.
 */
import { sql } from "drizzle-orm";
import { handInStanding, type HandInStanding, type StudentDeadline } from "~/lib/drop-logs/hand-in-window";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { effectiveWindowJoin, staffDeadlineJson } from "./effective-window.server";
import { listScheduledReminders, listSentReminders, type ScheduledReminder, type SentReminder } from "./lab-reminders.server";
import type { LabWithCohorts } from "./labs.server";

export type DashboardStudent = {
  membershipId: string;
  name: string;
  email: string;
  cohortId: string;
  cohortName: string;
  dropLogId: string | null;
  hasDraft: boolean;
  /** The counted (latest) version; null when nothing is handed in. */
  version: number | null;
  submittedAt: string | null;
  late: boolean | null;
  warningCount: number | null;
  dragCoefficient: number | null;
  reynolds: number | null;
  viscosityPaS: number | null;
  normalisedFigure: number | null;
  /** The student's own due time: their extension's, else their cohort's, else the lab's. */
  deadline: StudentDeadline;
  status: HandInStanding;
};

export type CohortProgress = {
  cohortId: string;
  name: string;
  students: number;
  onTime: number;
  late: number;
  notDue: number;
  missing: number;
};

export type LabDashboard = {
  students: DashboardStudent[];
  cohorts: CohortProgress[];
  sentReminders: SentReminder[];
  scheduledReminders: ScheduledReminder[];
};

/** The cohorts of the lab the viewer may see: all of them for instructors, the assigned ones for TAs. */
export const visibleCohortIds = (access: CourseAccess, lab: Pick<LabWithCohorts, "cohortIds">) =>
  lab.cohortIds.filter((id) => access.cohortIds.includes(id));

/** The dashboard as it stands at `now`: who is missing depends on whether their own due time has passed. */
export async function getLabDashboard(
  executor: Executor,
  access: CourseAccess,
  lab: LabWithCohorts,
  now = new Date(),
): Promise<LabDashboard> {
  const cohortIds = visibleCohortIds(access, lab);
  const [studentRows, sentReminders, scheduledReminders] = await Promise.all([
    executor.execute<Omit<DashboardStudent, "status">>(sql`
      select m.id as "membershipId", u.name, u.email, m.cohort_id as "cohortId", h.name as "cohortName",
        d.id as "dropLogId", coalesce(d.draft is not null, false) as "hasDraft",
        v.version, to_json(v.submitted_at)#>>'{}' as "submittedAt", v.late, v.warning_count as "warningCount",
        v.drag_coefficient::float8 as "dragCoefficient", v.reynolds::float8 as reynolds,
        v.viscosity_pa_s::float8 as "viscosityPaS", v.normalised_figure::float8 as "normalisedFigure",
        ${staffDeadlineJson("w")} as deadline
      from course_memberships m
      join users u on u.id = m.user_id
      join cohorts h on h.id = m.cohort_id
      join labs l on l.id = ${lab.id}
      ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
      left join drop_logs d on d.lab_id = ${lab.id} and d.membership_id = m.id
      left join drop_log_versions v on v.id = d.latest_version_id
      where m.course_id = ${lab.courseId} and m.role = 'student' and m.removed_at is null
        and m.cohort_id in (select value::uuid from json_array_elements_text(${JSON.stringify(cohortIds)}::json))
      order by h.name, u.name`),
    listSentReminders(executor, { ...access, cohortIds }, lab.id),
    lab.status === "published" ? listScheduledReminders(executor, lab) : Promise.resolve([]),
  ]);

  const students: DashboardStudent[] = studentRows.rows.map((student) => ({
    ...student,
    status: handInStanding(student.version === null ? null : student.late, new Date(student.deadline.dueAt), now),
  }));
  const counted = { "on-time": "onTime", late: "late", "not-due": "notDue", missing: "missing" } as const;
  const progress = new Map<string, CohortProgress>();
  for (const student of students) {
    const cohort = progress.get(student.cohortId) ?? {
      cohortId: student.cohortId,
      name: student.cohortName,
      students: 0,
      onTime: 0,
      late: 0,
      notDue: 0,
      missing: 0,
    };
    cohort.students++;
    cohort[counted[student.status]]++;
    progress.set(student.cohortId, cohort);
  }
  return { students, cohorts: [...progress.values()], sentReminders, scheduledReminders };
}
