/**
 * The evidence behind marks: every student of some cohorts with their counted hand-in and their mark
 * (one statement), and the live class-comparison labels (one statement over the whole class). The
 * desk, the saves, moderation, release and export all read marks through here, so a total is always
 * computed the same way.
 */
import { and, eq, gt, inArray, isNull, sql } from "drizzle-orm";
import { alias } from "drizzle-orm/pg-core";
import { cohorts, courseMemberships, dropLogs, dropLogVersions, labs, marks, reductionRevisions, users } from "~/db/schema";
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
import { effectiveWindow, staffDeadlineJson } from "~/server/labs/effective-window.server";
import { uuidList } from "~/server/sql.server";
import type { MarkingLab } from "./marking-lab.server";
import { isEntityId } from "~/lib/forms/ids";

/** A student's counted hand-in as the desk shows it (key results, not the whole reduction). */
export type DeskHandIn = {
  dropLogId: string;
  versionId: string;
  version: number;
  submittedAt: string;
  late: boolean;
  dropCount: number | null;
  strayDropCount: number | null;
  /** The drop times as handed in (s), and the indices of the stray drops among them: the desk's strip. */
  dropTimes: number[] | null;
  strayDrops: number[] | null;
  warningCount: number;
  /** The kit's state at the hand-in when it was not yet at home ("Packed"), else null. */
  kitNotAtHome: string | null;
  /** C_D/C_D,ref (drag) or μ/μ_ref (viscometry). */
  figure: number | null;
  /** The figure's expanded uncertainty U (95 %) from the reduction's budget, when it has one. */
  figureExpanded: number | null;
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

// The statement's aliases: the window's lateral join names the lab `l` and the membership `m`.
const m = alias(courseMemberships, "m");
const l = alias(labs, "l");
const d = alias(dropLogs, "d");
const v = alias(dropLogVersions, "v");
const mv = alias(dropLogVersions, "mv");
const mk = alias(marks, "mk");
const mb = alias(users, "mb");
const mm = alias(users, "mm");
const rr = reductionRevisions;

/** A drop-log version (`v` or `mv`, joined to its drop log `d`) as a `DeskHandIn` before its kit label, or null. */
const handInJson = (
  version: typeof v | typeof mv,
) => sql<HandInRow | null>`case when ${version.id} is null then null else json_build_object(
        'dropLogId', ${d.id}, 'versionId', ${version.id}, 'version', ${version.version}, 'submittedAt', to_json(${version.submittedAt})#>>'{}', 'late', ${version.late},
        'dropCount', case when jsonb_typeof(${version.reduction} #> '{drops,n}') = 'number' then (${version.reduction} #>> '{drops,n}')::int
                          when jsonb_typeof(${version.input} -> 'drops') = 'array' then jsonb_array_length(${version.input} -> 'drops') end,
        'strayDropCount', case when jsonb_typeof(${version.reduction} #> '{drops,strayDrops}') = 'array' then jsonb_array_length(${version.reduction} #> '{drops,strayDrops}') end,
        'dropTimes', case when jsonb_typeof(${version.input} -> 'drops') = 'array' then ${version.input} -> 'drops' end,
        'strayDrops', case when jsonb_typeof(${version.reduction} #> '{drops,strayDrops}') = 'array' then ${version.reduction} #> '{drops,strayDrops}' end,
        'figureExpanded', case when jsonb_typeof(${version.reduction} #> '{uncertaintyBudget,normalisedFigure,expanded}') = 'number'
                               then (${version.reduction} #>> '{uncertaintyBudget,normalisedFigure,expanded}')::float8 end,
        'warningCount', ${version.warningCount}, 'kitState', ${version.kitRecords} #>> '{kit,state}', 'figure', ${version.normalisedFigure}::float8, 'reynolds', ${version.reynolds}::float8,
        'dragCoefficient', ${version.dragCoefficient}::float8, 'viscosityPaS', ${version.viscosityPaS}::float8,
        'temperatureC', ${version.temperatureC},
        'revision', ${version.currentRevision}
      ) end`;

type HandInRow = Omit<DeskHandIn, "kitNotAtHome"> & { kitState: string | null };
type StoredMarkRow = Omit<StoredMark, "markedBy" | "moderatedBy"> & {
  markedById: string | null;
  markedByName: string | null;
  moderatedById: string | null;
  moderatedByName: string | null;
};

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
  // Cohorts are few, and a constant array is matched by hashing; named students are one parameter, looked up by index.
  const cohortArray = `{${cohortIds.filter(isEntityId).join(",")}}`;
  const rows = await executor
    .select({
      membershipId: m.id,
      userId: users.id,
      studentName: users.name,
      email: users.email,
      studentNumber: users.studentNumber,
      cohortId: cohorts.id,
      cohortName: cohorts.name,
      deadline: sql<StudentDeadline>`${staffDeadlineJson("w")}`,
      handIn: handInJson(v),
      markedVersion: sql<HandInRow | null>`case when ${mk.dropLogVersionId} is distinct from ${v.id} then ${handInJson(mv)} end`,
      mark: sql<StoredMarkRow | null>`case when ${mk.id} is null then null else json_build_object(
        'id', ${mk.id}, 'version', ${mk.version}, 'scores', ${mk.scores}, 'feedback', ${mk.feedback}, 'latePenaltyPoints', ${mk.latePenaltyPoints},
        'storedTotal', ${mk.total}, 'basedOnVersionId', ${mk.dropLogVersionId}, 'basedOnRevision', ${mk.reductionRevision},
        'basedOnFigure', (select ${rr.normalisedFigure}::float8 from ${rr}
          where ${rr.versionId} = ${mk.dropLogVersionId} and ${rr.revision} = ${mk.reductionRevision}),
        'markedById', ${mk.markedById}, 'markedByName', ${mb.name}, 'moderatedById', ${mk.moderatedById}, 'moderatedByName', ${mm.name},
        'moderatedAt', to_json(${mk.moderatedAt})#>>'{}', 'updatedAt', to_json(${mk.updatedAt})#>>'{}', 'releasedAt', to_json(${mk.releasedAt})#>>'{}',
        'releasedSnapshot', ${mk.releasedSnapshot}, 'reopenedAt', to_json(${mk.reopenedAt})#>>'{}'
      ) end`,
    })
    .from(m)
    .innerJoin(users, eq(users.id, m.userId))
    .innerJoin(cohorts, eq(cohorts.id, m.cohortId))
    .innerJoin(l, eq(l.id, lab.id))
    .leftJoin(effectiveWindow({ lab: "l", member: "m", as: "w" }), sql`true`)
    .leftJoin(d, and(eq(d.labId, lab.id), eq(d.membershipId, m.id)))
    .leftJoin(v, eq(v.id, d.latestVersionId))
    .leftJoin(mk, and(eq(mk.labId, lab.id), eq(mk.membershipId, m.id)))
    .leftJoin(mv, eq(mv.id, mk.dropLogVersionId))
    .leftJoin(mb, eq(mb.id, mk.markedById))
    .leftJoin(mm, eq(mm.id, mk.moderatedById))
    .where(
      and(
        eq(m.courseId, lab.courseId),
        eq(m.role, "student"),
        isNull(m.removedAt),
        sql`${m.cohortId} = any(${cohortArray}::uuid[])`,
        membershipIds && inArray(m.id, uuidList([...membershipIds])),
      ),
    )
    .orderBy(users.name, m.id);
  return rows.map(({ mark, handIn: storedHandIn, markedVersion: storedMarkedVersion, ...rest }) => {
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

function handInOf({ kitState, ...handIn }: HandInRow): DeskHandIn {
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
