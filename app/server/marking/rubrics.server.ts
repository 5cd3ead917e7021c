/**
 * A lab's rubric as instructors set it: saved whole from the rubric form (criteria keep their ids, so
 * the scores given for them stay), or copied from another lab of the course. Once a mark of the lab
 * is released the rubric is locked: students have seen it.
 */
import { AppError, type ErrorIssue } from "~/lib/app-error";
import { randomUUID } from "node:crypto";
import { and, count, eq, isNotNull, ne, notInArray, sql } from "drizzle-orm";
import { labs, marks, rubricCriteria } from "~/db/schema";
import { criterionColumns, rubricInput, type RubricCriterion } from "~/lib/marking/rubric";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { uuidList } from "~/server/sql.server";
import { markingLock } from "./marks.server";
import { assertInstructor, loadMarkingLab, markingRefusal, type MarkingLab } from "./marking-lab.server";

/** A rubric the form sends that the schema refuses: the issues, by path, for the fields. */
function rubricInputError(issues: ErrorIssue[]): AppError {
  return new AppError({
    code: "invalid_value",
    message: issues[0]?.message ?? "The rubric cannot be read.",
    field: issues[0]?.path.join("."),
    issues,
  });
}

async function assertUnreleased(executor: Executor, labId: string): Promise<void> {
  const [row] = await executor
    .select({ released: count() })
    .from(marks)
    .where(and(eq(marks.labId, labId), isNotNull(marks.releasedAt)));
  if (row.released > 0) throw markingRefusal("rubric_locked", "Marks of this lab are released: its rubric can no longer change.");
}

/**
 * Replaces the lab's rubric with `input` (the rubric form's criteria, in order): criteria with an id
 * of this lab are updated, new ones added, missing ones removed, in one transaction of three
 * statements. Instructors only; refused once a mark is released.
 */
export async function saveRubric(
  executor: Executor,
  { access, lab, input, request }: { access: CourseAccess; lab: Pick<MarkingLab, "id" | "rubric">; input: unknown; request?: Request },
): Promise<RubricCriterion[]> {
  await assertInstructor(executor, access, lab);
  const parsed = rubricInput.safeParse(input);
  if (!parsed.success)
    throw rubricInputError(
      parsed.error.issues.map((issue) => ({
        path: issue.path.map((key) => (typeof key === "symbol" ? String(key) : key)),
        message: issue.message,
      })),
    );
  const known = new Set(lab.rubric.map((criterion) => criterion.id));
  const foreign = parsed.data.criteria.findIndex((criterion) => criterion.id && !known.has(criterion.id));
  if (foreign >= 0) throw rubricInputError([{ path: ["criteria", foreign, "id"], message: "This criterion is not one of this lab's." }]);

  return executor.transaction(async (tx) => {
    // Exclusive: no save reads the rubric while it changes.
    await tx.execute(markingLock(lab.id, "exclusive"));
    await assertUnreleased(tx, lab.id);
    const rows = parsed.data.criteria.map((criterion, position) => {
      const columns = criterionColumns(criterion);
      return {
        id: criterion.id ?? randomUUID(),
        position,
        ...columns,
        levels: columns.levels ? JSON.stringify(columns.levels) : null,
        autoParams: JSON.stringify(columns.autoParams),
      };
    });
    await tx
      .delete(rubricCriteria)
      .where(and(eq(rubricCriteria.labId, lab.id), notInArray(rubricCriteria.id, uuidList(rows.map((row) => row.id)))));
    // Raw: a bulk upsert from a JSON recordset.
    await tx.execute(sql`
      insert into rubric_criteria (id, lab_id, position, title, description, kind, levels, min_points, max_points, auto_rule, auto_params, updated_at)
      select r.id, ${lab.id}, r.position, r.title, r.description, r.kind::criterion_kind, r.levels::jsonb, r.min_points, r.max_points, r.auto_rule::auto_rule, r.auto_params::jsonb, now()
      from json_to_recordset(${JSON.stringify(rows.map((row) => ({ id: row.id, position: row.position, title: row.title, description: row.description, kind: row.kind, levels: row.levels, min_points: row.minPoints, max_points: row.maxPoints, auto_rule: row.autoRule, auto_params: row.autoParams })))}::json)
        as r(id uuid, position int, title text, description text, kind text, levels text, min_points float8, max_points float8, auto_rule text, auto_params text)
      on conflict (id) do update set
        position = excluded.position, title = excluded.title, description = excluded.description, kind = excluded.kind, levels = excluded.levels,
        min_points = excluded.min_points, max_points = excluded.max_points, auto_rule = excluded.auto_rule, auto_params = excluded.auto_params, updated_at = excluded.updated_at`);
    await recordAudit(tx, {
      action: "marking.rubric_saved",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      detail: { criteria: rows.length, removed: [...known].filter((id) => !rows.some((row) => row.id === id)).length },
      request,
    });
    return rows.map((row) => ({
      id: row.id,
      position: row.position,
      title: row.title,
      description: row.description,
      kind: row.kind,
      levels: row.levels ? JSON.parse(row.levels) : null,
      minPoints: row.minPoints,
      maxPoints: row.maxPoints,
      autoRule: row.autoRule,
      autoParams: JSON.parse(row.autoParams),
    }));
  });
}

/**
 * Replaces the lab's rubric with a copy of another lab's (same course) criteria, with new ids.
 * Instructors only; refused when the lab already has marks (they were given against its own rubric).
 */
export async function copyRubric(
  executor: Executor,
  { access, lab, fromLabId, request }: { access: CourseAccess; lab: Pick<MarkingLab, "id">; fromLabId: string; request?: Request },
): Promise<RubricCriterion[]> {
  await assertInstructor(executor, access, lab);
  const source = fromLabId === lab.id ? null : await loadMarkingLab(executor, access.course.id, fromLabId);
  if (!source) throw markingRefusal("lab_not_found", "Choose another lab of this course to copy from.", "fromLabId");
  if (source.rubric.length === 0) throw markingRefusal("invalid_value", `“${source.title}” has no rubric to copy.`, "fromLabId");
  return executor.transaction(async (tx) => {
    await tx.execute(markingLock(lab.id, "exclusive"));
    const [row] = await tx.select({ marks: count() }).from(marks).where(eq(marks.labId, lab.id));
    if (row.marks > 0) throw markingRefusal("rubric_locked", "This lab already has marks: edit its rubric rather than replacing it.");
    await tx.delete(rubricCriteria).where(eq(rubricCriteria.labId, lab.id));
    // Raw: a set-based copy of the other lab's rows (insert … select).
    const copied = await tx.execute<RubricCriterion>(sql`
      insert into rubric_criteria (lab_id, position, title, description, kind, levels, min_points, max_points, auto_rule, auto_params)
      select ${lab.id}, position, title, description, kind, levels, min_points, max_points, auto_rule, auto_params
      from rubric_criteria where lab_id = ${source.id}
      returning id, position, title, description, kind, levels, min_points as "minPoints", max_points as "maxPoints", auto_rule as "autoRule", auto_params as "autoParams"`);
    await recordAudit(tx, {
      action: "marking.rubric_copied",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      detail: { fromLabId: source.id, criteria: copied.rows.length },
      request,
    });
    return copied.rows.sort((a, b) => a.position - b.position);
  });
}

/** The course's other labs with a rubric, for "copy the rubric from…": one statement. */
export async function listRubricSources(
  executor: Executor,
  { access, labId }: { access: CourseAccess; labId: string },
): Promise<{ labId: string; title: string; criteria: number }[]> {
  const rows = await executor
    .select({
      labId: labs.id,
      title: labs.title,
      // Written out as labs.id: an interpolated column renders unqualified here and would bind to rc.id.
      criteria: sql<number>`(select count(*)::int from rubric_criteria rc where rc.lab_id = labs.id)`,
    })
    .from(labs)
    .where(and(eq(labs.courseId, access.course.id), ne(labs.id, labId)))
    .orderBy(labs.dueAt);
  return rows.filter((row) => row.criteria > 0);
}
