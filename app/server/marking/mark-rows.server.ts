/**
 * The evidence behind marks: every student of some cohorts with their counted hand-in and their mark
 * (one statement), and the live class-comparison labels (one statement over the whole class). The
 * desk, the saves, moderation, release and export all read marks through here, so a total is always
 * computed the same way.
 */
import { and, eq, gt, sql, type SQL } from "drizzle-orm";
import { dropLogs, dropLogVersions } from "~/db/schema";
import { suggestAutomaticCriteria, type AutoSuggestion, type HandInEvidence } from "~/lib/marking/automatic-criteria";
import {
  markProgress,
  markTotals,
  type MarkCell,
  type MarkContent,
  type MarkProgress,
  type MarkScores,
  type MarkTotals,
  type ReleasedMarkSnapshot,
} from "~/lib/marking/marks";
import type { ClassComparisonLabel } from "~/lib/reduction";
import { labelClass } from "~/lib/comparison/class-labelling";
import { kitNotAtHomeLabel } from "~/lib/kits/kit-states";
import { handInStanding, type HandInStanding, type StudentDeadline } from "~/lib/drop-logs/hand-in-window";
import { quantityOf } from "~/server/comparison/class-comparison.server";
import type { Executor } from "~/server/db.server";
import { effectiveWindowJoin, staffDeadlineJson } from "~/server/labs/effective-window.server";
import type { MarkingLab } from "./marking-lab.server";

/** A student's counted hand-in as the desk shows it (key results, not the whole reduction). */
export type DeskHandIn = {
  dropLogId: string;
  versionId: string;
  version: number;
  submittedAt: string;
  late: boolean;
  dropCount: number | null;
  strayDropCount: number | null;
  warningCount: number;
  /** The kit's state at the hand-in when it was not yet at home ("Packed"), else null. */
  kitNotAtHome: string | null;
  /** C_D/C_D,ref (drag) or μ/μ_ref (viscometry). */
  figure: number | null;
  reynolds: number | null;
  dragCoefficient: number | null;
  viscosityPaS: number | null;
  temperatureC: number | null;
  /** The version's current reduction revision (1 until a part it used is corrected). */
  revision: number;
};

/** A student's stored mark. */
export type StoredMark = MarkContent & {
  id: string;
  version: number;
  /** As of the last write; readers use the recomputed total on the row. */
  storedTotal: number;
  basedOnVersionId: string | null;
  /** The reduction revision of that version when the mark was last changed, and its figure. */
  basedOnRevision: number | null;
  basedOnFigure: number | null;
  markedBy: { id: string; name: string } | null;
  moderatedBy: { id: string; name: string } | null;
  moderatedAt: string | null;
  updatedAt: string;
  releasedAt: string | null;
  releasedSnapshot: ReleasedMarkSnapshot | null;
  /** A hand-in after release reopened the mark for re-marking (the lab's "reopen" policy); null otherwise. */
  reopenedAt: string | null;
};

/** One student as every marking view reads them. */
export type StudentMarkRow = {
  membershipId: string;
  userId: string;
  studentName: string;
  email: string;
  studentNumber: string | null;
  cohortId: string;
  cohortName: string;
  /** The counted hand-in: the latest version. */
  handIn: DeskHandIn | null;
  /**
   * The hand-in the mark rests on: the version it was marked on (null for a mark given with nothing
   * handed in), which may be older than `handIn`; without a mark, the counted hand-in. The automatic
   * criteria, release and the export read this one.
   */
  markedHandIn: DeskHandIn | null;
  mark: StoredMark | null;
  /** The student's own deadline for the lab: their extension's, else their cohort's, else the lab's. */
  deadline: StudentDeadline;
  /** The counted hand-in on time or late, or nothing yet: "missing" only after the student's own due time. */
  status: HandInStanding;
};

/** A student's row of the marking desk: the evidence, the suggestions, the cells and the total. */
export type MarkingDeskRow = StudentMarkRow & {
  classLabel: { label: ClassComparisonLabel; reason: string } | null;
  /** Suspect or outlier in the class comparison. */
  flagged: boolean;
  /** Automatic criteria's suggestions, by criterion id. */
  suggestions: Record<string, AutoSuggestion>;
  /** Every criterion's cell, by criterion id. */
  cells: Record<string, MarkCell>;
  subtotal: number;
  total: number;
  maxTotal: number;
  complete: boolean;
  progress: MarkProgress;
  /** The version the next save names: the mark's, or 0 before there is one. */
  expectedVersion: number;
  /** Handed in again since the mark was last changed. */
  handInChangedSinceMarked: boolean;
  /** A released mark reopened by a hand-in after release: mark it again on the counted version. */
  needsRemarking: boolean;
  /**
   * The marked version was re-reduced since (a part it used was corrected): the figure the mark saw and
   * today's. Nothing in the mark changes; automatic criteria already suggest from the new figure.
   */
  resultChangedSinceMarked: {
    fromRevision: number;
    toRevision: number;
    oldFigure: number | null;
    newFigure: number | null;
    /** Automatic criteria whose points were fixed (overridden, or written in at release) and whose suggestion now differs: offered again. */
    reofferedCriterionIds: string[];
  } | null;
};

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** A drop-log version (aliased `alias`, joined to its drop log `d`) as a `DeskHandIn`, or null. */
const handInJson = (alias: SQL) => sql`case when ${alias}.id is null then null else json_build_object(
        'dropLogId', d.id, 'versionId', ${alias}.id, 'version', ${alias}.version, 'submittedAt', to_json(${alias}.submitted_at)#>>'{}', 'late', ${alias}.late,
        'dropCount', case when jsonb_typeof(${alias}.reduction #> '{drops,n}') = 'number' then (${alias}.reduction #>> '{drops,n}')::int
                          when jsonb_typeof(${alias}.input -> 'drops') = 'array' then jsonb_array_length(${alias}.input -> 'drops') end,
        'strayDropCount', case when jsonb_typeof(${alias}.reduction #> '{drops,strayDrops}') = 'array' then jsonb_array_length(${alias}.reduction #> '{drops,strayDrops}') end,
        'warningCount', ${alias}.warning_count, 'kitState', ${alias}.kit_records #>> '{kit,state}', 'figure', ${alias}.normalised_figure::float8, 'reynolds', ${alias}.reynolds::float8,
        'dragCoefficient', ${alias}.drag_coefficient::float8, 'viscosityPaS', ${alias}.viscosity_pa_s::float8,
        'temperatureC', ${alias}.temperature_c,
        'revision', ${alias}.current_revision
      ) end`;

export type ClassLabels = Map<string, { label: ClassComparisonLabel; reason: string }>;

/**
 * The students of `cohortIds` (active members), or only `membershipIds` among them, with their counted
 * hand-in, mark and own deadline, and where their hand-in stands at `now`: one statement whatever the
 * class size.
 */
export async function loadStudentMarkRows(
  executor: Executor,
  lab: Pick<MarkingLab, "id" | "courseId">,
  { cohortIds, membershipIds, now = new Date() }: { cohortIds: readonly string[]; membershipIds?: readonly string[]; now?: Date },
): Promise<StudentMarkRow[]> {
  // Named students drive the query (one index lookup each, whatever the planner guesses of a JSON list);
  // cohorts are few, and a constant array is matched by hashing.
  const students = membershipIds
    ? sql`(select distinct value::uuid as id from json_array_elements_text(${JSON.stringify(membershipIds)}::json)) named
      join course_memberships m on m.id = named.id`
    : sql`course_memberships m`;
  const cohortArray = `{${cohortIds.filter((id) => uuidPattern.test(id)).join(",")}}`;
  type StoredMarkRow = Omit<StoredMark, "markedBy" | "moderatedBy"> & {
    markedById: string | null;
    markedByName: string | null;
    moderatedById: string | null;
    moderatedByName: string | null;
  };
  type HandInRow = Omit<DeskHandIn, "kitNotAtHome"> & { kitState: string | null };
  const result = await executor.execute<
    Omit<StudentMarkRow, "mark" | "handIn" | "markedHandIn" | "status"> & {
      handIn: HandInRow | null;
      markedVersion: HandInRow | null;
      mark: StoredMarkRow | null;
    }
  >(sql`
    select m.id as "membershipId", u.id as "userId", u.name as "studentName", u.email, u.student_number as "studentNumber",
      m.cohort_id as "cohortId", h.name as "cohortName",
      ${staffDeadlineJson("w")} as deadline,
      ${handInJson(sql`v`)} as "handIn",
      case when mk.drop_log_version_id is distinct from v.id then ${handInJson(sql`mv`)} end as "markedVersion",
      case when mk.id is null then null else json_build_object(
        'id', mk.id, 'version', mk.version, 'scores', mk.scores, 'feedback', mk.feedback, 'latePenaltyPoints', mk.late_penalty_points,
        'storedTotal', mk.total, 'basedOnVersionId', mk.drop_log_version_id, 'basedOnRevision', mk.reduction_revision,
        'basedOnFigure', (select rr.normalised_figure::float8 from reduction_revisions rr
          where rr.version_id = mk.drop_log_version_id and rr.revision = mk.reduction_revision),
        'markedById', mk.marked_by_id, 'markedByName', mb.name, 'moderatedById', mk.moderated_by_id, 'moderatedByName', mm.name,
        'moderatedAt', to_json(mk.moderated_at)#>>'{}', 'updatedAt', to_json(mk.updated_at)#>>'{}', 'releasedAt', to_json(mk.released_at)#>>'{}',
        'releasedSnapshot', mk.released_snapshot, 'reopenedAt', to_json(mk.reopened_at)#>>'{}'
      ) end as mark
    from ${students}
    join users u on u.id = m.user_id
    join cohorts h on h.id = m.cohort_id
    join labs l on l.id = ${lab.id}
    ${effectiveWindowJoin({ lab: "l", member: "m", as: "w" })}
    left join drop_logs d on d.lab_id = ${lab.id} and d.membership_id = m.id
    left join drop_log_versions v on v.id = d.latest_version_id
    left join marks mk on mk.lab_id = ${lab.id} and mk.membership_id = m.id
    left join drop_log_versions mv on mv.id = mk.drop_log_version_id
    left join users mb on mb.id = mk.marked_by_id
    left join users mm on mm.id = mk.moderated_by_id
    where m.course_id = ${lab.courseId} and m.role = 'student' and m.removed_at is null
      and m.cohort_id = any(${cohortArray}::uuid[])
    order by u.name, m.id`);
  return result.rows.map(({ mark, handIn: storedHandIn, markedVersion: storedMarkedVersion, ...rest }) => {
    const row = {
      ...rest,
      handIn: storedHandIn ? handInOf(storedHandIn) : null,
      status: handInStanding(storedHandIn?.late ?? null, new Date(rest.deadline.dueAt), now),
    };
    const markedVersion = storedMarkedVersion ? handInOf(storedMarkedVersion) : null;
    if (!mark) return { ...row, markedHandIn: row.handIn, mark: null };
    const { markedById, markedByName, moderatedById, moderatedByName, ...stored } = mark;
    return {
      ...row,
      markedHandIn: stored.basedOnVersionId === (row.handIn?.versionId ?? null) ? row.handIn : markedVersion,
      mark: {
        ...stored,
        scores: (stored.scores ?? {}) as MarkScores,
        markedBy: markedById ? { id: markedById, name: markedByName ?? "" } : null,
        moderatedBy: moderatedById ? { id: moderatedById, name: moderatedByName ?? "" } : null,
      },
    };
  });
}

function handInOf({ kitState, ...handIn }: Omit<DeskHandIn, "kitNotAtHome"> & { kitState: string | null }): DeskHandIn {
  return { ...handIn, kitNotAtHome: kitNotAtHomeLabel(kitState) };
}

/** Whether any criterion needs the class comparison; when none does, the writes skip loading it. */
export const rubricNeedsLabels = (lab: Pick<MarkingLab, "rubric">) => lab.rubric.some((criterion) => criterion.autoRule === "not_outlier");

/**
 * The live label of every counted hand-in of the lab, by drop log: labelled over the whole class with
 * the lab's method by the class comparison's own `labelClass`, from the same counted versions
 * (`loadCountedHandIns` keeps those with a positive figure), read here without the names and kit parts
 * the comparison page shows. One statement.
 */
export async function loadClassLabels(executor: Executor, lab: Pick<MarkingLab, "id" | "kind" | "settings">): Promise<ClassLabels> {
  const rows = await executor
    .select({ id: dropLogs.id, figure: sql<number>`${dropLogVersions.normalisedFigure}::float8` })
    .from(dropLogs)
    .innerJoin(dropLogVersions, eq(dropLogVersions.id, dropLogs.latestVersionId))
    .where(and(eq(dropLogs.labId, lab.id), gt(dropLogVersions.normalisedFigure, 0)));
  const labelled = labelClass(rows, lab.settings, quantityOf(lab.kind));
  return new Map(rows.map((row, index) => [row.id, { label: labelled[index].label, reason: labelled[index].reason }]));
}

/**
 * What the automatic rules read about one student: the version the mark rests on, not a later one.
 * The class comparison labels only the counted versions, so a mark on an earlier version gets no label.
 */
export function evidenceOf(
  lab: Pick<MarkingLab, "requiredDrops">,
  row: Pick<StudentMarkRow, "handIn" | "markedHandIn">,
  labels: ClassLabels,
): HandInEvidence {
  const handIn = row.markedHandIn;
  const counted = handIn !== null && handIn.versionId === row.handIn?.versionId;
  const label = handIn && counted ? labels.get(handIn.dropLogId) : undefined;
  return {
    superseded: handIn !== null && !counted,
    handedIn: handIn !== null,
    late: handIn?.late ?? false,
    dropCount: handIn?.dropCount ?? null,
    requiredDrops: lab.requiredDrops,
    figure: handIn?.figure ?? null,
    classLabel: label?.label ?? null,
    classReason: label?.reason ?? null,
  };
}

/** A student's desk row, with the suggestions and total computed from `content` (the stored mark unless given). */
export function deskRow(
  lab: Pick<MarkingLab, "rubric" | "requiredDrops">,
  row: StudentMarkRow,
  labels: ClassLabels,
  content: MarkContent | null = row.mark,
): MarkingDeskRow {
  const suggestions = suggestAutomaticCriteria(lab.rubric, evidenceOf(lab, row, labels));
  return deskRowWith(row, labels, suggestions, markTotals(lab.rubric, content, suggestions));
}

/** A desk row from suggestions and totals already computed (the write path computes them once per student). */
export function deskRowWith(
  row: StudentMarkRow,
  labels: ClassLabels,
  suggestions: Record<string, AutoSuggestion>,
  totals: MarkTotals,
): MarkingDeskRow {
  const label = row.handIn ? labels.get(row.handIn.dropLogId) : undefined;
  const classLabel = label ? { label: label.label, reason: label.reason } : null;
  return {
    ...row,
    classLabel,
    flagged: classLabel !== null && classLabel.label !== "consistent",
    suggestions,
    cells: totals.cells,
    subtotal: totals.subtotal,
    total: totals.total,
    maxTotal: totals.maxTotal,
    complete: totals.complete,
    progress: markProgress(row.mark !== null, totals),
    expectedVersion: row.mark?.version ?? 0,
    handInChangedSinceMarked: row.mark !== null && row.handIn !== null && row.mark.basedOnVersionId !== row.handIn.versionId,
    needsRemarking: row.mark?.reopenedAt != null,
    resultChangedSinceMarked:
      row.mark?.basedOnRevision != null &&
      row.handIn &&
      row.mark.basedOnVersionId === row.handIn.versionId &&
      row.mark.basedOnRevision < row.handIn.revision
        ? {
            fromRevision: row.mark.basedOnRevision,
            toRevision: row.handIn.revision,
            oldFigure: row.mark.basedOnFigure,
            newFigure: row.handIn.figure,
            reofferedCriterionIds: Object.entries(totals.cells)
              .filter(
                ([, cell]) =>
                  (cell.source === "override" || cell.source === "released") &&
                  cell.suggestion?.points != null &&
                  cell.suggestion.points !== cell.points,
              )
              .map(([id]) => id),
          }
        : null,
  };
}
