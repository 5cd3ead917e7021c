/**
 * The class comparison of a lab: every counted hand-in (the latest version of each drop log) labelled
 * against the rest of the class with the lab's outlier method. It is computed from the current latest
 * versions whenever it is read, so a page is never stale and never waits for a job; the relabel job
 * writes the same labels, with their history, for marking and exports.
 */
import { handInHref } from "~/lib/comparison/links";
import { and, eq, sql } from "drizzle-orm";
import type PgBoss from "pg-boss";
import { z } from "zod";
import { comparisonLabelChanges, labs, type ComparisonMethodSettings } from "~/db/schema";
import { comparisonLimits, labelClass, previewSettings, type ComparisonLimits } from "~/lib/comparison/class-labelling";
import { countLabels, describeSettings, type ComparisonSettings, type LabelCounts } from "~/lib/comparison/comparison-settings";
import { kitNotAtHomeLabel } from "~/lib/kits/kit-states";
import type { ClassComparisonLabel } from "~/lib/reduction";
import { recordAudit } from "~/server/audit.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { insertMany } from "~/server/bulk-insert.server";
import type { Executor, Transaction } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";

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

type CountedRow = {
  drop_log_id: string;
  version_id: string;
  version: number;
  submitted_at: Date | string;
  late: boolean;
  figure: number;
  reynolds: number | null;
  drag_coefficient: number | null;
  viscosity_pa_s: number | null;
  reference_viscosity: number | null;
  temperature_c: number | null;
  result_expanded: number | null;
  coverage_factor: number | null;
  figure_expanded: number | null;
  membership_id: string;
  student_name: string;
  cohort_id: string | null;
  cohort_name: string | null;
  sphere_id: string | null;
  sphere_label: string | null;
  fluid_lot_id: string | null;
  fluid_lot_label: string | null;
  column_id: string | null;
  column_label: string | null;
  kit_state: string | null;
  stored_label: ClassComparisonLabel | null;
  stored_version_id: string | null;
};

/**
 * Every counted hand-in of the lab, with its student, cohort, kit parts and stored label: one statement
 * whatever the class size. A version without a positive figure (viscometry with an uncalibrated lot)
 * cannot be compared and is left out.
 */
export async function loadCountedHandIns(executor: Executor, labId: string): Promise<CountedHandIn[]> {
  const result = await executor.execute<CountedRow>(sql`
    select dl.id as drop_log_id, v.id as version_id, v.version, v.submitted_at, v.late,
      v.normalised_figure::float8 as figure, v.reynolds::float8 as reynolds, v.drag_coefficient::float8 as drag_coefficient,
      v.viscosity_pa_s::float8 as viscosity_pa_s,
      (v.kit_records #>> '{fluidLot,viscosityPaS}')::float8 as reference_viscosity,
      v.temperature_c,
      (v.reduction #>> '{uncertaintyBudget,expanded}')::float8 as result_expanded,
      (v.reduction #>> '{uncertaintyBudget,coverageFactor}')::float8 as coverage_factor,
      (v.reduction #>> '{uncertaintyBudget,normalisedFigure,expanded}')::float8 as figure_expanded,
      m.id as membership_id, u.name as student_name, m.cohort_id, h.name as cohort_name,
      v.sphere_id, sp.label as sphere_label, v.fluid_lot_id, fl.label as fluid_lot_label, v.column_id, co.label as column_label,
      v.kit_records #>> '{kit,state}' as kit_state,
      cl.label as stored_label, cl.version_id as stored_version_id
    from drop_logs dl
    join drop_log_versions v on v.id = dl.latest_version_id
    join course_memberships m on m.id = dl.membership_id
    join users u on u.id = m.user_id
    left join cohorts h on h.id = m.cohort_id
    left join parts sp on sp.id = v.sphere_id
    left join parts fl on fl.id = v.fluid_lot_id
    left join parts co on co.id = v.column_id
    left join comparison_labels cl on cl.drop_log_id = dl.id
    where dl.lab_id = ${labId} and v.normalised_figure > 0
    order by u.name, dl.id`);
  return result.rows.map((row) => ({
    dropLogId: row.drop_log_id,
    versionId: row.version_id,
    version: row.version,
    submittedAt: new Date(row.submitted_at).toISOString(),
    late: row.late,
    figure: row.figure,
    reynolds: row.reynolds,
    dragCoefficient: row.drag_coefficient,
    viscosityPaS: row.viscosity_pa_s,
    referenceViscosityPaS: row.reference_viscosity,
    temperatureC: row.temperature_c,
    uncertainty: { resultExpanded: row.result_expanded, coverageFactor: row.coverage_factor, figureExpanded: row.figure_expanded },
    membershipId: row.membership_id,
    studentName: row.student_name,
    cohortId: row.cohort_id,
    cohortName: row.cohort_name,
    sphere: row.sphere_id ? { id: row.sphere_id, label: row.sphere_label ?? "" } : null,
    fluidLot: row.fluid_lot_id ? { id: row.fluid_lot_id, label: row.fluid_lot_label ?? "" } : null,
    column: row.column_id ? { id: row.column_id, label: row.column_label ?? "" } : null,
    kitNotAtHome: kitNotAtHomeLabel(row.kit_state),
    storedLabel: row.stored_label,
    storedVersionId: row.stored_version_id,
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
    const removed = await tx.execute(sql`
      delete from comparison_labels
      where lab_id = ${labId}
        and drop_log_id not in (select value::uuid from json_array_elements_text(${JSON.stringify(labelled.map((handIn) => handIn.dropLogId))}::json))`);
    return { labelled: labelled.length, changed: changes.length, removed: removed.rowCount ?? 0 };
  };
  return executor.transaction(write);
}

/** Seconds a relabel waits for more hand-ins: a deadline rush relabels a lab a few times, not once per hand-in. */
export const RELABEL_DEBOUNCE_SECONDS = 5;

export type ClassComparisonJob = { labId: string };

/**
 * Asks for the lab to be relabelled, on the caller's transaction: a hand-in's (one line in
 * `handInDropLog`) or a method change's. A plain job, so concurrent hand-ins never wait on each other;
 * the worker turns the requests into one debounced relabel per lab.
 */
export async function queueClassComparison(tx: Transaction, labId: string): Promise<void> {
  await enqueuer().send(queues.classComparisonRequested, { labId } satisfies ClassComparisonJob, { db: transactionAdapter(tx) });
}

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
