/**
 * A lab's hand-in dashboard for its staff: progress per cohort (on time, late, not due yet, missing:
 * each against the student's own due time, extensions counted), each student's counted version and
 * own due time, and the reminders sent and still to go. A TA sees only the cohorts assigned to them.
 * Three statements, run side by side, whatever the class size.
 */
import { and, eq, inArray, isNull, sql, type SQLWrapper } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { cohorts, courseMemberships, dropLogs, dropLogVersions, labs, users } from "~/db/schema";
import { handInStanding, type HandInStanding, type StudentDeadline } from "~/lib/drop-logs/hand-in-window";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { isoText, uuidList } from "~/server/sql.server";
import { effectiveWindow, staffDeadlineJson } from "./effective-window.server";
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

const float8 = (value: SQLWrapper) => sql<number | null>`${value}::float8`;

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
  // The window's joins name these aliases.
  const member = alias(courseMemberships, "m");
  const labRow = alias(labs, "l");
  const [studentRows, sentReminders, scheduledReminders] = await Promise.all([
    executor
      .select({
        membershipId: member.id,
        name: users.name,
        email: users.email,
        // The joined cohort's: the member's, never null here.
        cohortId: cohorts.id,
        cohortName: cohorts.name,
        dropLogId: dropLogs.id,
        hasDraft: sql<boolean>`coalesce(${dropLogs.draft} is not null, false)`,
        version: dropLogVersions.version,
        submittedAt: isoText(dropLogVersions.submittedAt),
        late: dropLogVersions.late,
        warningCount: dropLogVersions.warningCount,
        // float8, as the engine computed them, not the float4 text of a real.
        dragCoefficient: float8(dropLogVersions.dragCoefficient),
        reynolds: float8(dropLogVersions.reynolds),
        viscosityPaS: float8(dropLogVersions.viscosityPaS),
        normalisedFigure: float8(dropLogVersions.normalisedFigure),
        deadline: sql<StudentDeadline>`${staffDeadlineJson("w")}`,
      })
      .from(member)
      .innerJoin(users, eq(users.id, member.userId))
      .innerJoin(cohorts, eq(cohorts.id, member.cohortId))
      .innerJoin(labRow, eq(labRow.id, lab.id))
      .leftJoin(effectiveWindow({ lab: "l", member: "m", as: "w" }), sql`true`)
      .leftJoin(dropLogs, and(eq(dropLogs.labId, lab.id), eq(dropLogs.membershipId, member.id)))
      .leftJoin(dropLogVersions, eq(dropLogVersions.id, dropLogs.latestVersionId))
      .where(
        and(
          eq(member.courseId, lab.courseId),
          eq(member.role, "student"),
          isNull(member.removedAt),
          inArray(member.cohortId, uuidList(cohortIds)),
        ),
      )
      .orderBy(cohorts.position, cohorts.name, users.name),
    listSentReminders(executor, { ...access, cohortIds }, lab.id),
    lab.status === "published" ? listScheduledReminders(executor, lab) : Promise.resolve([]),
  ]);

  const students: DashboardStudent[] = studentRows.map((student) => ({
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
