/**
 * Re-reduction after a part correction. A re-measurement that changes a value entering the reduction
 * queues, on its own transaction, one job that gives every version which used the part a new reduction
 * revision: recomputed from the version's immutable input with the part's new record, and carrying its
 * cause. The job works in chunks (one transaction each, a constant number of statements per chunk),
 * counts its progress for the part's page, and is idempotent: a revision is keyed on the part event, so
 * a re-run (a retry, a second worker) skips the versions already revised.
 */
import { and, desc, eq, gt, notExists, or, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import {
  dropLogs,
  dropLogVersions,
  labs,
  partEvents,
  parts,
  reductionRevisions,
  rereductionRuns,
  type CalibrationPoint,
  type LabResolutions,
  type ReductionRevisionCause,
} from "~/db/schema";
import type { DropLogInput } from "~/lib/drop-logs/drop-log-input";
import { reduceDropLog, type KitRecord, type LabSettings } from "~/lib/drop-logs/reduce-drop-log";
import { ReductionInputError } from "~/lib/reduction";
import { recordAudit } from "~/server/audit.server";
import { queueClassComparison } from "~/server/comparison/class-comparison.server";
import type { Executor, Transaction } from "~/server/db.server";
import { enqueuer, queues, transactionAdapter } from "~/server/jobs/boss.server";

/** The part columns a reduction reads: a change of any other (label, notes, material name) revises nothing. */
export const reductionFields = [
  "diameterMm",
  "diameterResolutionMm",
  "massG",
  "massResolutionG",
  "densityKgM3",
  "calibration",
  "innerDiameterMm",
  "timedDistanceMm",
  "runInMm",
  "marginBelowMm",
  "densityUncertaintyKgM3",
  "densityTemperatureCoefficientKgM3K",
  "innerDiameterUncertaintyMm",
] as const;

export type RereductionJob = { runId: string };
export type FieldChanges = Record<string, { from: unknown; to: unknown }>;

/** The changes of a re-measurement that enter reductions; empty when none does. */
export function reductionChanges(changed: FieldChanges): FieldChanges {
  return Object.fromEntries(Object.entries(changed).filter(([field]) => (reductionFields as readonly string[]).includes(field)));
}

/**
 * On the re-measurement's transaction: the progress row (with how many versions used the part) and
 * the job, in two statements. Returns the run's id.
 */
export async function queueRereduction(
  tx: Transaction,
  { courseId, partId, partEventId }: { courseId: string; partId: string; partEventId: string },
): Promise<string> {
  // Raw: an insert from a set-based count, one statement.
  const result = await tx.execute<{ id: string }>(sql`
    insert into rereduction_runs (course_id, part_id, part_event_id, total)
    select ${courseId}, ${partId}, ${partEventId}, count(*)::int from drop_log_versions v
    where v.sphere_id = ${partId} or v.fluid_lot_id = ${partId} or v.column_id = ${partId}
    returning id`);
  const runId = result.rows[0].id;
  await enqueuer().send(queues.reductionRevision, { runId } satisfies RereductionJob, { db: transactionAdapter(tx) });
  return runId;
}

type PartRow = {
  id: string;
  label: string;
  material: string | null;
  diameter_mm: number | null;
  diameter_resolution_mm: number | null;
  mass_g: number | null;
  mass_resolution_g: number | null;
  fluid_name: string | null;
  density_kg_m3: number | null;
  density_uncertainty_kg_m3: number | null;
  density_temperature_coefficient_kg_m3_k: number | null;
  calibration: CalibrationPoint[] | null;
  inner_diameter_mm: number | null;
  inner_diameter_uncertainty_mm: number | null;
  timed_distance_mm: number | null;
  run_in_mm: number | null;
  margin_below_mm: number | null;
};

type VersionRow = {
  id: string;
  lab_id: string;
  current_revision: number;
  input: DropLogInput;
  kit: KitRecord | null;
  gravity: number | null;
  lab: { kind: LabSettings["kind"]; wall_correction: string; drag_model: string; required_drops: number; resolutions: LabResolutions };
  sphere: PartRow;
  fluid_lot: PartRow;
  column: PartRow;
};

type RunRow = NonNullable<Awaited<ReturnType<typeof loadRun>>>;

const sp = alias(parts, "sp");
const fl = alias(parts, "fl");
const co = alias(parts, "co");

const partJson = (part: typeof sp | typeof fl | typeof co) =>
  sql<PartRow>`json_build_object('id', ${part.id}, 'label', ${part.label}, 'material', ${part.material},
  'diameter_mm', ${part.diameterMm}, 'diameter_resolution_mm', ${part.diameterResolutionMm}, 'mass_g', ${part.massG},
  'mass_resolution_g', ${part.massResolutionG}, 'fluid_name', ${part.fluidName}, 'density_kg_m3', ${part.densityKgM3},
  'density_uncertainty_kg_m3', ${part.densityUncertaintyKgM3},
  'density_temperature_coefficient_kg_m3_k', ${part.densityTemperatureCoefficientKgM3K},
  'calibration', ${part.calibration}, 'inner_diameter_mm', ${part.innerDiameterMm}, 'inner_diameter_uncertainty_mm', ${part.innerDiameterUncertaintyMm}, 'timed_distance_mm', ${part.timedDistanceMm},
  'run_in_mm', ${part.runInMm}, 'margin_below_mm', ${part.marginBelowMm})`;

/**
 * The revision of one version with the parts' current records. The changed part's record is its new
 * one; the other parts' records are the ones the current revision used, since every change of them
 * that enters a reduction gave a revision too.
 */
function revise(row: VersionRow) {
  const { sphere, fluid_lot: fluidLot, column } = row;
  const result = reduceDropLog({
    lab: {
      kind: row.lab.kind,
      wallCorrection: row.lab.wall_correction,
      dragModel: row.lab.drag_model,
      requiredDrops: row.lab.required_drops,
      resolutions: row.lab.resolutions,
    },
    kit: {
      sphere: {
        id: sphere.id,
        label: sphere.label,
        material: sphere.material,
        diameterMm: sphere.diameter_mm,
        diameterResolutionMm: sphere.diameter_resolution_mm,
        massG: sphere.mass_g,
        massResolutionG: sphere.mass_resolution_g,
      },
      fluidLot: {
        id: fluidLot.id,
        label: fluidLot.label,
        fluidName: fluidLot.fluid_name,
        densityKgM3: fluidLot.density_kg_m3,
        densityUncertaintyKgM3: fluidLot.density_uncertainty_kg_m3,
        densityTemperatureCoefficientKgM3K: fluidLot.density_temperature_coefficient_kg_m3_k,
        calibration: fluidLot.calibration,
      },
      column: {
        id: column.id,
        label: column.label,
        innerDiameterMm: column.inner_diameter_mm,
        innerDiameterUncertaintyMm: column.inner_diameter_uncertainty_mm,
        timedDistanceMm: column.timed_distance_mm,
        runInMm: column.run_in_mm,
        marginBelowMm: column.margin_below_mm,
      },
      // The kit's state at the hand-in is part of the record: a revision keeps its warning.
      ...(row.kit ? { kit: row.kit } : {}),
    },
    input: row.input,
    gravity: row.gravity,
  });
  const { reduction, kitRecords, normalisedFigure, warnings } = result;
  return {
    version_id: row.id,
    revision: row.current_revision + 1,
    kit_records: kitRecords,
    reduction: { ...reduction, warnings },
    reduction_mode: reduction.mode,
    normalised_figure: normalisedFigure,
    reynolds: reduction.reynolds,
    drag_coefficient: reduction.dragCoefficient,
    viscosity_pa_s: reduction.mode === "viscometry" ? reduction.viscosity : reduction.fluidViscosity,
    warning_count: warnings.filter((warning) => warning.level !== "info").length,
  };
}

/** The run with its part's label and the correction's author, time and changed fields. */
async function loadRun(executor: Executor, runId: string) {
  const [run] = await executor
    .select({
      courseId: rereductionRuns.courseId,
      partId: rereductionRuns.partId,
      partEventId: rereductionRuns.partEventId,
      partLabel: parts.label,
      total: rereductionRuns.total,
      finishedAt: rereductionRuns.finishedAt,
      actorId: partEvents.actorId,
      eventAt: partEvents.createdAt,
      changed: sql<FieldChanges | null>`${partEvents.detail} -> 'changed'`,
    })
    .from(rereductionRuns)
    .innerJoin(parts, eq(parts.id, rereductionRuns.partId))
    .innerJoin(partEvents, eq(partEvents.id, rereductionRuns.partEventId))
    .where(eq(rereductionRuns.id, runId));
  return run;
}

export type RereductionOutcome = { revised: number; unreducible: string[]; labIds: string[]; finished: boolean };

/**
 * Runs (or resumes) one re-reduction. Each chunk is one transaction of three statements: read the next
 * versions not yet revised for this part event, with their lab and parts; write their revisions, copy
 * them onto the versions and count the progress. The last transaction marks the run finished, asks for
 * the class comparison of every lab concerned and writes the audit entry; a finished run does nothing.
 */
export async function runRereduction(
  executor: Executor,
  runId: string,
  { chunkSize = 500 }: { chunkSize?: number } = {},
): Promise<RereductionOutcome> {
  const run = await loadRun(executor, runId);
  if (!run || run.finishedAt) return { revised: 0, unreducible: [], labIds: [], finished: true };
  const cause: ReductionRevisionCause = {
    partId: run.partId,
    partLabel: run.partLabel,
    partEventId: run.partEventId,
    changes: reductionChanges(run.changed ?? {}),
    changedById: run.actorId,
    changedAt: run.eventAt.toISOString(),
  };
  let cursor = "00000000-0000-0000-0000-000000000000";
  let revised = 0;
  const unreducible: string[] = [];
  const labIds = new Set<string>();
  for (;;) {
    const chunk = await executor.transaction(async (tx) => {
      const v = dropLogVersions;
      const rows: VersionRow[] = await tx
        .select({
          id: v.id,
          lab_id: dropLogs.labId,
          current_revision: v.currentRevision,
          input: v.input,
          kit: sql<KitRecord | null>`${v.kitRecords} -> 'kit'`,
          gravity: v.gravity,
          lab: sql<
            VersionRow["lab"]
          >`json_build_object('kind', ${labs.kind}, 'wall_correction', ${labs.wallCorrection}, 'drag_model', ${labs.dragModel},
            'required_drops', ${labs.requiredDrops}, 'resolutions', ${labs.resolutions})`,
          sphere: partJson(sp),
          fluid_lot: partJson(fl),
          column: partJson(co),
        })
        .from(v)
        .innerJoin(dropLogs, eq(dropLogs.id, v.dropLogId))
        .innerJoin(labs, eq(labs.id, dropLogs.labId))
        .innerJoin(sp, eq(sp.id, v.sphereId))
        .innerJoin(fl, eq(fl.id, v.fluidLotId))
        .innerJoin(co, eq(co.id, v.columnId))
        .where(
          and(
            or(eq(v.sphereId, run.partId), eq(v.fluidLotId, run.partId), eq(v.columnId, run.partId)),
            gt(v.id, cursor),
            notExists(
              tx
                .select({ one: sql`1` })
                .from(reductionRevisions)
                .where(and(eq(reductionRevisions.versionId, v.id), eq(reductionRevisions.partEventId, run.partEventId))),
            ),
          ),
        )
        .orderBy(v.id)
        .limit(chunkSize)
        .for("update", { of: v });
      if (rows.length === 0) return null;
      const revisions = [];
      for (const row of rows) {
        labIds.add(row.lab_id);
        try {
          revisions.push(revise(row));
        } catch (error) {
          // The new record cannot reduce this hand-in (e.g. a calibration emptied): it keeps its revision, and the audit names it.
          if (!(error instanceof ReductionInputError)) throw error;
          unreducible.push(row.id);
        }
      }
      // Raw: the chunk's set-based write (insert, copy and progress in data-modifying CTEs over a JSON recordset).
      const written = await tx.execute<{ count: number }>(sql`
        with data as (
          select * from json_to_recordset(${JSON.stringify(revisions)}::json) as d(version_id uuid, revision int, kit_records jsonb,
            reduction jsonb, reduction_mode text, normalised_figure real, reynolds real, drag_coefficient real, viscosity_pa_s real, warning_count int)),
        inserted as (
          insert into reduction_revisions (version_id, revision, kit_records, reduction, normalised_figure, reynolds, drag_coefficient,
            viscosity_pa_s, warning_count, cause, part_event_id)
          select version_id, revision, kit_records, reduction, normalised_figure, reynolds, drag_coefficient, viscosity_pa_s, warning_count,
            ${JSON.stringify(cause)}::jsonb, ${run.partEventId}
          from data
          on conflict do nothing
          returning version_id),
        copied as (
          update drop_log_versions v set current_revision = d.revision, kit_records = d.kit_records, reduction = d.reduction, reduction_mode = d.reduction_mode,
            normalised_figure = d.normalised_figure, reynolds = d.reynolds, drag_coefficient = d.drag_coefficient,
            viscosity_pa_s = d.viscosity_pa_s, warning_count = d.warning_count
          from data d where v.id = d.version_id and d.version_id in (select version_id from inserted)),
        progress as (update rereduction_runs set done = least(total, done + ${rows.length}) where id = ${runId})
        select count(*)::int as count from inserted`);
      return { last: rows[rows.length - 1].id, revised: written.rows[0].count };
    });
    if (!chunk) break;
    cursor = chunk.last;
    revised += chunk.revised;
  }
  await finishRun(executor, runId, run, { revised, unreducible });
  return { revised, unreducible, labIds: [...labIds], finished: true };
}

/**
 * Marks the run finished and, only the first time, asks for the relabel of every lab whose hand-ins
 * used the part (their automatic criteria are computed on read, so they are suggested again with the
 * new figures) and records the re-reduction in the audit log.
 */
async function finishRun(
  executor: Executor,
  runId: string,
  run: RunRow,
  { revised, unreducible }: { revised: number; unreducible: string[] },
) {
  await executor.transaction(async (tx) => {
    // Raw: a guarded update returning an array subquery over every version that used the part.
    const finished = await tx.execute<{ lab_ids: string[] }>(sql`
      update rereduction_runs r set finished_at = now(), done = total where r.id = ${runId} and r.finished_at is null
      returning array(
        select distinct dl.lab_id from drop_log_versions v join drop_logs dl on dl.id = v.drop_log_id
        where v.sphere_id = r.part_id or v.fluid_lot_id = r.part_id or v.column_id = r.part_id)::text[] as lab_ids`);
    if (finished.rows.length === 0) return;
    const labIds = finished.rows[0].lab_ids;
    for (const labId of labIds) await queueClassComparison(tx, labId);
    await recordAudit(tx, {
      action: "part.rereduced",
      actorId: run.actorId,
      courseId: run.courseId,
      subject: `part:${run.partId}`,
      detail: { partLabel: run.partLabel, partEventId: run.partEventId, total: run.total, revised, unreducible, labIds },
    });
  });
}

export type RereductionProgress = { id: string; total: number; done: number; finishedAt: string | null; createdAt: string };

/** The part's latest re-reductions, newest first, for its page. */
export async function listRereductions(executor: Executor, partId: string, limit = 5): Promise<RereductionProgress[]> {
  const rows = await executor
    .select({
      id: rereductionRuns.id,
      total: rereductionRuns.total,
      done: rereductionRuns.done,
      finishedAt: rereductionRuns.finishedAt,
      createdAt: rereductionRuns.createdAt,
    })
    .from(rereductionRuns)
    .where(eq(rereductionRuns.partId, partId))
    .orderBy(desc(rereductionRuns.createdAt))
    .limit(limit);
  return rows.map((row) => ({ ...row, finishedAt: row.finishedAt?.toISOString() ?? null, createdAt: row.createdAt.toISOString() }));
}
