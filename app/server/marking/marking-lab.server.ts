/**
 * The lab as marking reads it (its comparison settings, cohorts, rubric and marking state, in one
 * statement), who may mark it, and the refusals every marking function throws. Instructors mark every
 * cohort of a lab; a TA only the students of their own cohorts among the lab's; students never.
 */
import { AppError } from "~/lib/app-error";
import { and, eq, sql } from "drizzle-orm";
import { labMarking, labs } from "~/db/schema";
import type { ComparisonSettings } from "~/lib/comparison/comparison-settings";
import type { RubricCriterion } from "~/lib/marking/rubric";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { comparisonLabColumns, settingsOf } from "~/server/comparison/class-comparison.server";
import type { Executor } from "~/server/db.server";
import { isEntityId } from "~/lib/forms/ids";

/** A lab with what marking needs; `rubric` is in order. */
export type MarkingLab = {
  id: string;
  courseId: string;
  title: string;
  kind: "drag" | "viscometry";
  status: "draft" | "published" | "closed";
  /** The class's due time; a student's own (extensions counted) is `deadline` on their mark row. */
  dueAt: Date;
  requiredDrops: number;
  dragModel: string;
  settings: ComparisonSettings;
  cohortIds: string[];
  rubric: RubricCriterion[];
  marking: MarkingState;
};

/** Where the lab's marking stands: ready (TAs stop changing marks) and released (students see their marks). */
export type MarkingState = {
  readyAt: Date | null;
  readyBy: { id: string; name: string } | null;
  releasedAt: Date | null;
  releasedBy: { id: string; name: string } | null;
};

export type MarkingRefusalCode =
  | "forbidden"
  | "instructors_only"
  | "not_in_cohort"
  | "lab_not_found"
  | "invalid_value"
  | "reason_required"
  | "marking_closed"
  | "not_ready"
  | "rubric_locked"
  | "still_open"
  | "conflict";

const refusalStatus: Record<MarkingRefusalCode, number> = {
  forbidden: 403,
  instructors_only: 403,
  not_in_cohort: 403,
  lab_not_found: 404,
  invalid_value: 400,
  reason_required: 400,
  marking_closed: 409,
  not_ready: 409,
  rubric_locked: 409,
  still_open: 409,
  conflict: 409,
};

/**
 * Something marking refuses, with the HTTP status its code stands for. `field` names the form field
 * the message belongs next to; `membershipIds` the students a bulk action was refused for.
 */
export function markingRefusal(code: MarkingRefusalCode, message: string, field?: string, membershipIds: string[] = []): AppError {
  return new AppError({ code, message, status: refusalStatus[code], field, subjectIds: membershipIds });
}

type CriterionRow = Omit<RubricCriterion, "autoParams"> & { autoParams: RubricCriterion["autoParams"] | null };

/** The lab with its cohorts, rubric and marking state, in one statement; null when it is not the course's. */
export async function loadMarkingLab(executor: Executor, courseId: string, labId: string): Promise<MarkingLab | null> {
  if (!isEntityId(labId)) return null;
  const [row] = await executor
    .select({
      ...comparisonLabColumns,
      status: labs.status,
      dueAt: labs.dueAt,
      requiredDrops: labs.requiredDrops,
      rubric: sql<CriterionRow[]>`coalesce((
        select json_agg(json_build_object(
          'id', rc.id, 'position', rc.position, 'title', rc.title, 'description', rc.description, 'kind', rc.kind,
          'levels', rc.levels, 'minPoints', rc.min_points, 'maxPoints', rc.max_points, 'autoRule', rc.auto_rule, 'autoParams', rc.auto_params
        ) order by rc.position, rc.id)
        from rubric_criteria rc where rc.lab_id = ${labs.id}), '[]'::json)`,
      readyAt: labMarking.readyAt,
      readyById: labMarking.readyById,
      readyByName: sql<string | null>`(select u.name from users u where u.id = ${labMarking.readyById})`,
      releasedAt: labMarking.releasedAt,
      releasedById: labMarking.releasedById,
      releasedByName: sql<string | null>`(select u.name from users u where u.id = ${labMarking.releasedById})`,
    })
    .from(labs)
    .leftJoin(labMarking, eq(labMarking.labId, labs.id))
    .where(and(eq(labs.id, labId), eq(labs.courseId, courseId)));
  if (!row) return null;
  return {
    id: row.id,
    courseId: row.courseId,
    title: row.title,
    kind: row.kind,
    status: row.status,
    dueAt: row.dueAt,
    requiredDrops: row.requiredDrops,
    dragModel: row.dragModel,
    settings: settingsOf(row),
    cohortIds: row.cohortIds,
    rubric: row.rubric.map((criterion) => ({ ...criterion, autoParams: criterion.autoParams ?? {} })),
    marking: {
      readyAt: row.readyAt,
      readyBy: row.readyById ? { id: row.readyById, name: row.readyByName ?? "" } : null,
      releasedAt: row.releasedAt,
      releasedBy: row.releasedById ? { id: row.releasedById, name: row.releasedByName ?? "" } : null,
    },
  };
}

/** The lab's cohorts whose students the viewer may mark: all of them for instructors, the assigned ones for TAs, none for students. */
export function markableCohortIds(access: CourseAccess, lab: Pick<MarkingLab, "cohortIds">): string[] {
  if (access.membership.role === "student") return [];
  return lab.cohortIds.filter((cohortId) => access.cohortIds.includes(cohortId));
}

/** Records a refusal in the audit trail as the access checks do, then throws it. */
export async function refuse(executor: Executor, access: CourseAccess, refusal: AppError, subject: string): Promise<never> {
  if (refusal.status === 403) {
    await recordAudit(executor, {
      action: "access.denied",
      actorId: access.user.id,
      courseId: access.course.id,
      subject,
      detail: {
        reason: refusal.code,
        message: refusal.message,
        ...(refusal.subjectIds.length ? { students: refusal.subjectIds.length } : {}),
      },
    });
  }
  throw refusal;
}

/** Staff of the lab: instructors, and TAs of one of its cohorts. Anyone else is refused (and recorded). */
export async function assertMarkingStaff(
  executor: Executor,
  access: CourseAccess,
  lab: Pick<MarkingLab, "id" | "cohortIds">,
): Promise<void> {
  if (access.membership.role === "instructor") return;
  if (access.membership.role === "student")
    await refuse(executor, access, markingRefusal("forbidden", "Marking is for the course's staff."), `lab:${lab.id}`);
  if (markableCohortIds(access, lab).length === 0)
    await refuse(executor, access, markingRefusal("not_in_cohort", "None of this lab's cohorts is assigned to you."), `lab:${lab.id}`);
}

/** Instructors of the course only (moderation, release, the mark history). */
export async function assertInstructor(executor: Executor, access: CourseAccess, lab: Pick<MarkingLab, "id">): Promise<void> {
  if (access.membership.role !== "instructor")
    await refuse(executor, access, markingRefusal("instructors_only", "Only the course's instructors may do this."), `lab:${lab.id}`);
}
