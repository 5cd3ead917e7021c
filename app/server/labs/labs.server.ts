/**
 * Labs as instructors set them: create a draft from an experiment kind, edit it, publish it to cohorts
 * (which schedules its deadline reminders on the same transaction), and close it. The hand-in side is
 * in `~/server/drop-logs/`; the reminders' job is in `./lab-reminders.server.ts`.
 */
import { AppError } from "~/lib/app-error";
import { and, asc, count, eq, inArray, ne, sql, type SQL } from "drizzle-orm";
import { cohorts, labCohorts, labExtensions, labs, parts } from "~/db/schema";
import { allowedPartFields, allowedPartIdsOf, type AllowedPartKind, type LabInput } from "~/lib/labs/lab-input";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { uuidList } from "~/server/sql.server";
import { recomputeLateness } from "./effective-window.server";
import { scheduleLabReminders } from "./lab-reminders.server";
import { inCohortOrder } from "~/server/courses/cohort-order.server";

export type LabRecord = typeof labs.$inferSelect;
export type LabWithCohorts = LabRecord & { cohortIds: string[] };
export type LabIntent = "save" | "publish" | "close";

/** The course's cohorts and the in-service parts a lab may be limited to, for the lab form: two statements side by side. */
export async function getLabFormOptions(executor: Executor, courseId: string) {
  const [cohortRows, partRows] = await Promise.all([
    executor
      .select({ id: cohorts.id, name: cohorts.name })
      .from(cohorts)
      .where(eq(cohorts.courseId, courseId))
      .orderBy(...inCohortOrder),
    executor
      .select({
        id: parts.id,
        kind: parts.kind,
        label: parts.label,
        material: parts.material,
        fluidName: parts.fluidName,
        diameterMm: parts.diameterMm,
      })
      .from(parts)
      .where(and(eq(parts.courseId, courseId), inArray(parts.kind, ["sphere", "fluid_lot", "column"]), ne(parts.status, "retired")))
      .orderBy(asc(parts.kind), asc(parts.label)),
  ]);
  return { cohorts: cohortRows, parts: partRows };
}

async function selectLab(executor: Executor, where: SQL | undefined): Promise<LabWithCohorts | null> {
  const [row] = await executor
    .select({
      lab: labs,
      cohortIds: sql<string[]>`array(select lc.cohort_id from lab_cohorts lc where lc.lab_id = ${labs.id} order by lc.cohort_id)::text[]`,
    })
    .from(labs)
    .where(where);
  return row ? { ...row.lab, cohortIds: row.cohortIds } : null;
}

/** One lab of the course with the cohorts it is set for, in one statement; null when it is not the course's. */
export const getLab = (executor: Executor, courseId: string, labId: string) =>
  selectLab(executor, and(eq(labs.id, labId), eq(labs.courseId, courseId)));

/** A lab by its id alone, for an API address that names no course: the caller checks the course role next. */
export const findLab = (executor: Executor, labId: string) => selectLab(executor, eq(labs.id, labId));

function columnsOf(input: LabInput) {
  const {
    cohortIds: _cohortIds,
    allowedSphereIds: _spheres,
    allowedFluidLotIds: _fluidLots,
    allowedColumnIds: _columns,
    ...settings
  } = input;
  return { ...settings, allowedPartIds: allowedPartIdsOf(input), lateCutoffAt: input.lateCutoffAt ?? null };
}

/** Cohorts and parts must be the course's own, and each part of the kind its list says: a forged id is refused rather than silently dropped. */
async function checkOwnership(executor: Executor, courseId: string, input: LabInput): Promise<void> {
  const ids = (values: string[]) => uuidList([...new Set(values)]);
  const kinds = Object.keys(allowedPartFields) as AllowedPartKind[];
  const partCount = (kind: AllowedPartKind) =>
    executor.$count(parts, and(eq(parts.courseId, courseId), eq(parts.kind, kind), inArray(parts.id, ids(input[allowedPartFields[kind]]))));
  const [counts] = await executor
    .select({ cohorts: count(), sphere: partCount("sphere"), fluid_lot: partCount("fluid_lot"), column: partCount("column") })
    .from(cohorts)
    .where(and(eq(cohorts.courseId, courseId), inArray(cohorts.id, ids(input.cohortIds))));
  if (counts.cohorts !== new Set(input.cohortIds).size)
    throw new AppError({ code: "lab_refused", message: "Choose cohorts of this course.", field: "cohortIds" });
  for (const kind of kinds) {
    const field = allowedPartFields[kind];
    if (counts[kind] !== new Set(input[field]).size)
      throw new AppError({ code: "lab_refused", message: `Choose ${partKindNames[kind]} of this course's inventory.`, field });
  }
}

const partKindNames: Record<AllowedPartKind, string> = { sphere: "spheres", fluid_lot: "fluid lots", column: "columns" };

async function setCohorts(executor: Executor, labId: string, cohortIds: string[]): Promise<void> {
  await executor.delete(labCohorts).where(eq(labCohorts.labId, labId));
  if (cohortIds.length) await executor.insert(labCohorts).values([...new Set(cohortIds)].map((cohortId) => ({ labId, cohortId })));
}

/** A new lab, always a draft: students see nothing until it is published. */
export async function createLab(
  executor: Executor,
  { access, input, request }: { access: CourseAccess; input: LabInput; request?: Request },
): Promise<LabRecord> {
  return executor.transaction(async (tx) => {
    await checkOwnership(tx, access.course.id, input);
    const [lab] = await tx
      .insert(labs)
      .values({ ...columnsOf(input), courseId: access.course.id, status: "draft" })
      .returning();
    await setCohorts(tx, lab.id, input.cohortIds);
    await recordAudit(tx, {
      action: "lab.created",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      detail: { title: lab.title, kind: lab.kind },
      request,
    });
    return lab;
  });
}

const sameOffsets = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((value, index) => value === b[index]);

/**
 * Saves the form, and publishes or closes the lab when `intent` says so. Publishing needs a cohort
 * (the schema already demands due > opens). Reminders are scheduled when the lab becomes published,
 * and again when a published lab's due time or offsets change: the jobs for the old due time find
 * it changed and do nothing, and `lab_reminders` keeps any student from being reminded twice of the
 * same due time. A moved due time re-decides the late flag of the hand-ins already made, as an
 * extension does, so "late" always means after the student's due time as it now stands.
 */
export async function updateLab(
  executor: Executor,
  {
    access,
    labId,
    input,
    intent,
    request,
    now = new Date(),
  }: { access: CourseAccess; labId: string; input: LabInput; intent: Exclude<LabIntent, "close">; request?: Request; now?: Date },
): Promise<LabRecord> {
  return executor.transaction(async (tx) => {
    const [before] = await tx
      .select()
      .from(labs)
      .where(and(eq(labs.id, labId), eq(labs.courseId, access.course.id)))
      .for("update");
    if (!before) throw new AppError({ code: "lab_refused", message: "There is no such lab in this course." });
    await checkOwnership(tx, access.course.id, input);
    const publishing = intent === "publish";
    if (publishing && input.cohortIds.length === 0)
      throw new AppError({ code: "lab_refused", message: "Choose at least one cohort to publish the lab to.", field: "cohortIds" });
    const status = publishing ? "published" : before.status;
    const [lab] = await tx
      .update(labs)
      .set({ ...columnsOf(input), status, publishedAt: publishing ? now : before.publishedAt, updatedAt: now })
      .where(eq(labs.id, labId))
      .returning();
    await setCohorts(tx, labId, input.cohortIds);
    const dueTimeMoved = before.dueAt.getTime() !== lab.dueAt.getTime();
    const offsetsChanged = !sameOffsets(before.reminderOffsetsHours, lab.reminderOffsetsHours);
    if (lab.status === "published" && (publishing || dueTimeMoved || offsetsChanged)) await scheduleLabReminders(tx, lab, now);
    // Extensions keep their own due times. One granted while the lab was a draft has no reminders
    // yet, and new offsets need new jobs: queue theirs too (one per distinct extended due time).
    if (lab.status === "published" && (publishing || offsetsChanged)) {
      const extended = await tx.selectDistinct({ dueAt: labExtensions.dueAt }).from(labExtensions).where(eq(labExtensions.labId, labId));
      for (const { dueAt } of extended) await scheduleLabReminders(tx, { ...lab, dueAt }, now);
    }
    const relabelled = dueTimeMoved ? await recomputeLateness(tx, labId) : 0;
    await recordAudit(tx, {
      action: publishing ? "lab.published" : "lab.updated",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${labId}`,
      detail: {
        title: lab.title,
        status: lab.status,
        dueAt: lab.dueAt.toISOString(),
        cohorts: input.cohortIds.length,
        ...(relabelled ? { latenessChanged: relabelled } : {}),
      },
      request,
    });
    return lab;
  });
}

/** Closes a published lab: it takes no more hand-ins, and its pending reminders do nothing. */
export async function closeLab(
  executor: Executor,
  { access, labId, request, now = new Date() }: { access: CourseAccess; labId: string; request?: Request; now?: Date },
): Promise<LabRecord> {
  return executor.transaction(async (tx) => {
    const [lab] = await tx
      .update(labs)
      .set({ status: "closed", updatedAt: now })
      .where(and(eq(labs.id, labId), eq(labs.courseId, access.course.id), eq(labs.status, "published")))
      .returning();
    if (!lab) throw new AppError({ code: "lab_refused", message: "Only a published lab can be closed." });
    await recordAudit(tx, {
      action: "lab.closed",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${labId}`,
      detail: { title: lab.title },
      request,
    });
    return lab;
  });
}
