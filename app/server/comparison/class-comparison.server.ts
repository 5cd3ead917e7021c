/**
 * The class comparison of a lab: every counted hand-in (the latest version of each drop log) labelled
 * against the rest of the class with the lab's outlier method. It is computed from the current latest
 * versions whenever it is read, so a page is never stale and never waits for a job; the relabel job
 * writes the same labels, with their history, for marking and exports.
 */
import { handInHref } from "~/lib/comparison/links";
import { and, eq, gt, notInArray, sql, type SQLWrapper } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import type PgBoss from "pg-boss";
import { z } from "zod";
import {
  cohorts,
  comparisonLabelChanges,
  comparisonLabels,
  courseMemberships,
  dropLogs,
  dropLogVersions,
  labs,
  parts,
  users,
  type ComparisonMethodSettings,
} from "~/db/schema";
import { comparisonLimits, labelClass, previewSettings, type ComparisonLimits } from "~/lib/comparison/class-labelling";
import { countLabels, describeSettings, type ComparisonSettings, type LabelCounts } from "~/lib/comparison/comparison-settings";
import { kitNotAtHomeLabel } from "~/lib/kits/kit-states";
import type { ClassComparisonLabel } from "~/lib/reduction";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor, Transaction } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { enqueuer, queues, transactionAdapter, type JobRequest } from "~/server/jobs/boss.server";
import { uuidList } from "~/server/sql.server";

export type ComparisonLab = {
  id: string;
  courseId: string;
  title: string;
  kind: "drag" | "viscometry";
  dragModel: string;
  settings: ComparisonSettings;
  cohortIds: string[];
};

/** One counted hand-in as the comparison reads it: the version's key figures, the student, the kit parts. */
export type CountedHandIn = {
  dropLogId: string;
  versionId: string;
  version: number;
  submittedAt: string;
  late: boolean;
  figure: number;
  reynolds: number | null;
  dragCoefficient: number | null;
  viscosityPaS: number | null;
  referenceViscosityPaS: number | null;
  temperatureC: number | null;
  /** From the version's uncertainty budget; null for versions reduced before budgets were kept. */
  uncertainty: { resultExpanded: number | null; coverageFactor: number | null; figureExpanded: number | null };
  membershipId: string;
  studentName: string;
  cohortId: string | null;
  cohortName: string | null;
  sphere: { id: string; label: string } | null;
  fluidLot: { id: string; label: string } | null;
  column: { id: string; label: string } | null;
  /** The kit's state at the hand-in when it was not yet at home ("Packed"), else null. */
  kitNotAtHome: string | null;
  storedLabel: ClassComparisonLabel | null;
  storedVersionId: string | null;
};

export type LabelledHandIn = CountedHandIn & { label: ClassComparisonLabel; reason: string; relativeToClass: number };

/** The word for the figure in the reasons: "viscosity 31 % above the class median". */
export const quantityOf = (kind: ComparisonLab["kind"]) => (kind === "viscometry" ? "viscosity" : "drag");

export const settingsOf = (lab: {
  comparisonMethod: string;
  comparisonAlpha: number;
  comparisonMaxOutliers: number;
  comparisonK: number;
}): ComparisonSettings => ({
  method: lab.comparisonMethod === "iqr" || lab.comparisonMethod === "esd" ? lab.comparisonMethod : "grubbs",
  alpha: lab.comparisonAlpha,
  maxOutliers: lab.comparisonMaxOutliers,
  k: lab.comparisonK,
});

/** The lab's columns a comparison reads (its method and cohorts); marking selects them too, beside its own. */
export const comparisonLabColumns = {
  id: labs.id,
  courseId: labs.courseId,
  title: labs.title,
  kind: labs.kind,
  dragModel: labs.dragModel,
  comparisonMethod: labs.comparisonMethod,
  comparisonAlpha: labs.comparisonAlpha,
  comparisonMaxOutliers: labs.comparisonMaxOutliers,
  comparisonK: labs.comparisonK,
  cohortIds: sql<string[]>`array(select lc.cohort_id from lab_cohorts lc where lc.lab_id = ${labs.id} order by lc.cohort_id)::text[]`,
};

/** The lab with its comparison settings and cohorts, in one statement; null when it is not the course's. */
export async function loadComparisonLab(executor: Executor, courseId: string, labId: string): Promise<ComparisonLab | null> {
  const [row] = await executor
    .select(comparisonLabColumns)
    .from(labs)
    .where(and(eq(labs.id, labId), eq(labs.courseId, courseId)));
  if (!row) return null;
  return {
    id: row.id,
    courseId: row.courseId,
    title: row.title,
    kind: row.kind,
    dragModel: row.dragModel,
    settings: settingsOf(row),
    cohortIds: row.cohortIds,
  };
}

/**
 * Every counted hand-in of the lab, with its student, cohort, kit parts and stored label: one statement
 * whatever the class size. A version without a positive figure (viscometry with an uncalibrated lot)
 * cannot be compared and is left out.
 */
export async function loadCountedHandIns(executor: Executor, labId: string): Promise<CountedHandIn[]> {
  const sphere = alias(parts, "sp");
  const fluidLot = alias(parts, "fl");
  const column = alias(parts, "co");
  const v = dropLogVersions;
  // The figures are `real`: read as float8 so that they keep the digits the comparison computed with.
  const float8 = (value: SQLWrapper) => sql<number | null>`(${value})::float8`;
  const rows = await executor
    .select({
      dropLogId: dropLogs.id,
      versionId: v.id,
      version: v.version,
      submittedAt: v.submittedAt,
      late: v.late,
      figure: sql<number>`${v.normalisedFigure}::float8`,
      reynolds: float8(v.reynolds),
      dragCoefficient: float8(v.dragCoefficient),
      viscosityPaS: float8(v.viscosityPaS),
      referenceViscosityPaS: float8(sql`${v.kitRecords} #>> '{fluidLot,viscosityPaS}'`),
      temperatureC: v.temperatureC,
      resultExpanded: float8(sql`${v.reduction} #>> '{uncertaintyBudget,expanded}'`),
      coverageFactor: float8(sql`${v.reduction} #>> '{uncertaintyBudget,coverageFactor}'`),
      figureExpanded: float8(sql`${v.reduction} #>> '{uncertaintyBudget,normalisedFigure,expanded}'`),
      membershipId: courseMemberships.id,
      studentName: users.name,
      cohortId: courseMemberships.cohortId,
      cohortName: cohorts.name,
      sphereId: v.sphereId,
      sphereLabel: sphere.label,
      fluidLotId: v.fluidLotId,
      fluidLotLabel: fluidLot.label,
      columnId: v.columnId,
      columnLabel: column.label,
      kitState: sql<string | null>`${v.kitRecords} #>> '{kit,state}'`,
      storedLabel: comparisonLabels.label,
      storedVersionId: comparisonLabels.versionId,
    })
    .from(dropLogs)
    .innerJoin(v, eq(v.id, dropLogs.latestVersionId))
    .innerJoin(courseMemberships, eq(courseMemberships.id, dropLogs.membershipId))
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .leftJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(sphere, eq(sphere.id, v.sphereId))
    .leftJoin(fluidLot, eq(fluidLot.id, v.fluidLotId))
    .leftJoin(column, eq(column.id, v.columnId))
    .leftJoin(comparisonLabels, eq(comparisonLabels.dropLogId, dropLogs.id))
    .where(and(eq(dropLogs.labId, labId), gt(v.normalisedFigure, 0)))
    .orderBy(users.name, dropLogs.id);
  return rows.map((row) => ({
    dropLogId: row.dropLogId,
    versionId: row.versionId,
    version: row.version,
    submittedAt: row.submittedAt.toISOString(),
    late: row.late,
    figure: row.figure,
    reynolds: row.reynolds,
    dragCoefficient: row.dragCoefficient,
    viscosityPaS: row.viscosityPaS,
    referenceViscosityPaS: row.referenceViscosityPaS,
    temperatureC: row.temperatureC,
    uncertainty: { resultExpanded: row.resultExpanded, coverageFactor: row.coverageFactor, figureExpanded: row.figureExpanded },
    membershipId: row.membershipId,
    studentName: row.studentName,
    cohortId: row.cohortId,
    cohortName: row.cohortName,
    sphere: row.sphereId ? { id: row.sphereId, label: row.sphereLabel ?? "" } : null,
    fluidLot: row.fluidLotId ? { id: row.fluidLotId, label: row.fluidLotLabel ?? "" } : null,
    column: row.columnId ? { id: row.columnId, label: row.columnLabel ?? "" } : null,
    kitNotAtHome: kitNotAtHomeLabel(row.kitState),
    storedLabel: row.storedLabel,
    storedVersionId: row.storedVersionId,
  }));
}

/** Labels the whole class with the given settings (the lab's own unless a preview asks for others). */
export function labelHandIns(
  lab: Pick<ComparisonLab, "kind">,
  handIns: readonly CountedHandIn[],
  settings: ComparisonSettings,
): LabelledHandIn[] {
  const results = labelClass(
    handIns.map((handIn) => ({ id: handIn.dropLogId, figure: handIn.figure })),
    settings,
    quantityOf(lab.kind),
  );
  return handIns.map((handIn, index) => ({
    ...handIn,
    label: results[index].label,
    reason: results[index].reason,
    relativeToClass: results[index].relativeToClass,
  }));
}

export type ComparisonFilters = { cohortId?: string; label?: ClassComparisonLabel };

/** The filters in the URL (`?cohort=…&label=suspect`) of the comparison page, its CSV and its API; a value it does not know answers 400. */
const comparisonSearch = z
  .object({ cohort: z.uuid().optional(), label: z.enum(["consistent", "suspect", "outlier"]).optional() })
  .transform((parsed): ComparisonFilters => ({ cohortId: parsed.cohort, label: parsed.label }));

export function readComparisonFilters(request: Request): ComparisonFilters {
  return readSearchParams(request, comparisonSearch);
}

/** The comparison as the page, the API and the CSV give it: plain JSON, the same fields everywhere. */
export function comparisonJson(comparison: LabComparison) {
  const { lab } = comparison;
  return {
    lab: { id: lab.id, title: lab.title, kind: lab.kind, dragModel: lab.dragModel },
    method: { ...lab.settings, description: comparison.description },
    classSize: comparison.classSize,
    counts: comparison.counts,
    limits: comparison.limits,
    cohorts: comparison.cohorts,
    handIns: comparison.handIns.map((handIn) => ({
      dropLogId: handIn.dropLogId,
      versionId: handIn.versionId,
      version: handIn.version,
      submittedAt: handIn.submittedAt,
      late: handIn.late,
      student: { membershipId: handIn.membershipId, name: handIn.studentName },
      cohort: handIn.cohortId ? { id: handIn.cohortId, name: handIn.cohortName } : null,
      parts: { sphere: handIn.sphere, fluidLot: handIn.fluidLot, column: handIn.column },
      kitNotAtHome: handIn.kitNotAtHome,
      figure: handIn.figure,
      relativeToClass: handIn.relativeToClass,
      reynolds: handIn.reynolds,
      dragCoefficient: handIn.dragCoefficient,
      viscosityPaS: handIn.viscosityPaS,
      referenceViscosityPaS: handIn.referenceViscosityPaS,
      temperatureC: handIn.temperatureC,
      uncertainty: handIn.uncertainty,
      label: handIn.label,
      reason: handIn.reason,
      href: handInHref(lab.courseId, lab.id, handIn.dropLogId),
    })),
  };
}
export type ComparisonJson = ReturnType<typeof comparisonJson>;

/** Rows of the comparison page's hand-in table per page; its plots and counts cover every hand-in shown. */
export const COMPARISON_TABLE_PAGE_SIZE = 25;

const plotted = (value: number | null) => (value === null ? null : Number(value.toPrecision(6)));

/**
 * The hand-ins as the page's plots draw them: every one that passes the filters, with only what a
 * marker and its tooltip show, at six significant digits (more than a plot can resolve). The link
 * to each hand-in is made on the page from its drop log's id.
 */
export function plotPointsOf(handIns: ComparisonJson["handIns"]) {
  return handIns.map((handIn) => ({
    id: handIn.dropLogId,
    studentName: handIn.student.name,
    label: handIn.label,
    figure: plotted(handIn.figure)!,
    reynolds: plotted(handIn.reynolds),
    dragCoefficient: plotted(handIn.dragCoefficient),
    viscosityPaS: plotted(handIn.viscosityPaS),
    referenceViscosityPaS: plotted(handIn.referenceViscosityPaS),
    temperatureC: plotted(handIn.temperatureC),
  }));
}
export type PlotPoint = ReturnType<typeof plotPointsOf>[number];

export type LabComparison = {
  lab: ComparisonLab;
  description: string;
  /** The whole class's size: labels are always computed over all of it, whoever is looking. */
  classSize: number;
  /** Counts over the hand-ins the viewer may see (all cohorts for instructors, theirs for TAs). */
  counts: LabelCounts;
  limits: ComparisonLimits;
  /** The cohorts among the visible hand-ins, for the filter. */
  cohorts: { id: string; name: string }[];
  /** The visible hand-ins that pass the filters. */
  handIns: LabelledHandIn[];
};

/**
 * The comparison as a viewer reads it: labelled over the whole class, then narrowed to the cohorts the
 * viewer may see and to the filters. Two statements (the lab, its counted hand-ins).
 */
export async function getLabComparison(
  executor: Executor,
  access: CourseAccess,
  lab: ComparisonLab,
  filters: ComparisonFilters = {},
): Promise<LabComparison> {
  const handIns = await loadCountedHandIns(executor, lab.id);
  const labelled = labelHandIns(lab, handIns, lab.settings);
  const seeAll = access.membership.role === "instructor";
  const visible = seeAll ? labelled : labelled.filter((handIn) => handIn.cohortId !== null && access.cohortIds.includes(handIn.cohortId));
  return {
    lab,
    description: describeSettings(lab.settings),
    classSize: labelled.length,
    counts: countLabels(visible),
    limits: comparisonLimits(
      handIns.map((handIn) => handIn.figure),
      lab.settings,
    ),
    cohorts: [
      ...new Map(visible.filter((handIn) => handIn.cohortId).map((handIn) => [handIn.cohortId!, handIn.cohortName ?? ""])).entries(),
    ]
      .map(([id, name]) => ({ id, name }))
      .sort((a, b) => a.name.localeCompare(b.name)),
    handIns: visible.filter(
      (handIn) => (!filters.cohortId || handIn.cohortId === filters.cohortId) && (!filters.label || handIn.label === filters.label),
    ),
  };
}

/** How many hand-ins the chosen settings and a few alternatives would flag, over the whole class. */
export async function previewLabSettings(executor: Executor, lab: ComparisonLab, settings: ComparisonSettings) {
  const handIns = await loadCountedHandIns(executor, lab.id);
  return {
    classSize: handIns.length,
    previews: previewSettings(
      handIns.map((handIn) => ({ id: handIn.dropLogId, figure: handIn.figure })),
      settings,
      quantityOf(lab.kind),
    ),
  };
}

export type RelabelOutcome = { labelled: number; changed: number; removed: number };

/**
 * Writes the current labels of every counted hand-in of the lab, in one transaction with bulk
 * statements: one upsert from a JSON recordset, one insert of the label changes, one delete of labels
 * whose hand-in no longer counts. A transaction-scoped advisory lock per lab serialises two relabels
 * (the job and a method change) without locking any row a hand-in needs.
 */
export async function relabelLab(executor: Executor, labId: string): Promise<RelabelOutcome> {
  const write = async (tx: Transaction): Promise<RelabelOutcome> => {
    // Raw: an advisory lock has no query-builder form.
    await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`class-comparison:${labId}`}, 0))`);
    const [lab] = await tx
      .select({
        kind: labs.kind,
        comparisonMethod: labs.comparisonMethod,
        comparisonAlpha: labs.comparisonAlpha,
        comparisonMaxOutliers: labs.comparisonMaxOutliers,
        comparisonK: labs.comparisonK,
      })
      .from(labs)
      .where(eq(labs.id, labId));
    if (!lab) return { labelled: 0, changed: 0, removed: 0 };
    const settings = settingsOf(lab);
    const method: ComparisonMethodSettings = settings;
    const labelled = labelHandIns(lab, await loadCountedHandIns(tx, labId), settings);

    const payload = labelled.map((handIn) => ({
      drop_log_id: handIn.dropLogId,
      version_id: handIn.versionId,
      figure: handIn.figure,
      label: handIn.label,
      reason: handIn.reason,
    }));
    if (payload.length > 0) {
      // Raw: a bulk upsert from a JSON recordset, one statement whatever the class size.
      await tx.execute(sql`
        insert into comparison_labels (drop_log_id, lab_id, version_id, figure, label, reason, method, computed_at)
        select r.drop_log_id, ${labId}, r.version_id, r.figure, r.label::comparison_label, r.reason, ${JSON.stringify(method)}::jsonb, now()
        from json_to_recordset(${JSON.stringify(payload)}::json) as r(drop_log_id uuid, version_id uuid, figure float8, label text, reason text)
        on conflict (drop_log_id) do update set
          version_id = excluded.version_id, figure = excluded.figure, label = excluded.label,
          reason = excluded.reason, method = excluded.method, computed_at = excluded.computed_at
        -- A label computed again to the same result is left alone: no dead row, no index update.
        where (comparison_labels.version_id, comparison_labels.label, comparison_labels.reason, comparison_labels.method)
          is distinct from (excluded.version_id, excluded.label, excluded.reason, excluded.method)`);
    }
    // History grows by the hand-ins whose label, or labelled version, changed (and by first labels).
    const changes = labelled.filter((handIn) => handIn.storedLabel !== handIn.label || handIn.storedVersionId !== handIn.versionId);
    await insertMany(
      tx,
      comparisonLabelChanges,
      changes.map((handIn) => ({
        labId,
        dropLogId: handIn.dropLogId,
        versionId: handIn.versionId,
        fromLabel: handIn.storedLabel,
        toLabel: handIn.label,
        reason: handIn.reason,
        method,
      })),
    );
    // Labels of hand-ins that no longer count (a new version without a figure). NOT IN over a subquery
    // is hashed once, so this stays linear in the class size.
    const removed = await tx
      .delete(comparisonLabels)
      .where(
        and(
          eq(comparisonLabels.labId, labId),
          notInArray(comparisonLabels.dropLogId, uuidList(labelled.map((handIn) => handIn.dropLogId))),
        ),
      );
    return { labelled: labelled.length, changed: changes.length, removed: removed.rowCount ?? 0 };
  };
  return executor.transaction(write);
}

/** Seconds a relabel waits for more hand-ins: a deadline rush relabels a lab a few times, not once per hand-in. */
export const RELABEL_DEBOUNCE_SECONDS = 5;

export type ClassComparisonJob = { labId: string };

/**
 * Asks for the lab to be relabelled, on the caller's transaction: a re-reduction's or a method change's
 * (a hand-in writes `classComparisonRequest` into its own statement). A plain job, so concurrent hand-ins never wait on each other;
 * the worker turns the requests into one debounced relabel per lab.
 */
export async function queueClassComparison(tx: Transaction, labId: string): Promise<void> {
  const { name, data } = classComparisonRequest(labId);
  await enqueuer().send(name, data, { db: transactionAdapter(tx) });
}

/** The job that asks for a lab's relabel, for a caller that inserts it inside a statement of its own (`jobsInsert`). */
export const classComparisonRequest = (labId: string) =>
  ({ name: queues.classComparisonRequested, data: { labId } satisfies ClassComparisonJob }) satisfies JobRequest;

/**
 * The worker's side of a request: one relabel job per lab and time slot (singletonKey = lab id,
 * singletonSeconds). `sendDebounced` puts a request that finds its slot taken into the next slot, so
 * a relabel always runs after the last hand-in it was asked for.
 */
export async function scheduleRelabel(boss: PgBoss, labId: string): Promise<void> {
  await boss.sendDebounced(queues.classComparison, { labId } satisfies ClassComparisonJob, {}, RELABEL_DEBOUNCE_SECONDS, labId);
}

/**
 * Changes the lab's outlier method and relabels every hand-in in the same transaction, so marking and
 * exports never see the new method with the old labels.
 */
export async function updateComparisonSettings(
  executor: Executor,
  { access, lab, settings, request }: { access: CourseAccess; lab: ComparisonLab; settings: ComparisonSettings; request?: Request },
): Promise<RelabelOutcome> {
  return executor.transaction(async (tx) => {
    await tx
      .update(labs)
      .set({
        comparisonMethod: settings.method,
        comparisonAlpha: settings.alpha,
        comparisonMaxOutliers: settings.maxOutliers,
        comparisonK: settings.k,
        updatedAt: new Date(),
      })
      .where(and(eq(labs.id, lab.id), eq(labs.courseId, access.course.id)));
    const outcome = await relabelLab(tx, lab.id);
    await recordAudit(tx, {
      action: "lab.comparison_method_changed",
      actorId: access.user.id,
      courseId: access.course.id,
      subject: `lab:${lab.id}`,
      detail: { from: lab.settings, to: settings, changed: outcome.changed },
      request,
    });
    return outcome;
  });
}
