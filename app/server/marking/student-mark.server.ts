/**
 * A student's own mark for a lab, as they see it once it is released: the total, each criterion's
 * level or points and feedback, the hand-in the mark was based on, and any change made after release
 * with its reason. Before release there is nothing to see. One statement.
 */
import { and, eq, isNotNull, sql } from "drizzle-orm";
import { dropLogVersions, labs, markChanges, marks, rubricCriteria } from "~/db/schema";
import { markTotals } from "~/lib/marking/marks";
import type { RubricCriterion } from "~/lib/marking/rubric";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { markingRefusal, refuse } from "./marking-lab.server";

export type StudentMarkCriterion = {
  id: string;
  title: string;
  description: string;
  kind: RubricCriterion["kind"];
  maxPoints: number;
  /** Null when the criterion was given no points. */
  points: number | null;
  /** The level reached (levels criteria): its number and description. */
  level: { number: number; description: string } | null;
  /** Computed from the hand-in (automatic criteria). */
  automatic: boolean;
  /** Why an automatic criterion's points differ from what the rule gave, when a marker said. */
  overrideReason: string | null;
};

/** The key results of the hand-in the mark was based on (SI units: s, Pa·s). */
export type MarkedHandIn = {
  versionId: string;
  version: number;
  submittedAt: string;
  late: boolean;
  mode: "drag" | "viscometry" | null;
  dropCount: number | null;
  strayDropCount: number | null;
  meanTimeS: number | null;
  normalisedFigure: number | null;
  reynolds: number | null;
  dragCoefficient: number | null;
  viscosityPaS: number | null;
  temperatureC: number | null;
  sphere: string | null;
  fluidLot: string | null;
  warnings: { code: string; level: string; message: string }[];
};

export type StudentMark = {
  lab: { id: string; title: string };
  releasedAt: string;
  total: number;
  maxTotal: number;
  latePenaltyPoints: number;
  feedback: string;
  criteria: StudentMarkCriterion[];
  basedOn: MarkedHandIn | null;
  /** Set when the mark changed after it was released: the total then, and each change with its reason (newest first). */
  changedAfterRelease: {
    releasedTotal: number;
    changes: { changedAt: string; reason: string | null; oldTotal: number | null; newTotal: number }[];
  } | null;
};

/** The rubric as the statement returns it: a criterion without automatic parameters reads null. */
type RubricRow = Omit<RubricCriterion, "autoParams"> & { autoParams: RubricCriterion["autoParams"] | null };
type ChangeRow = NonNullable<StudentMark["changedAfterRelease"]>["changes"][number];

/** The signed-in student's released mark for the lab, or null before release (or when they have none). Staff are refused: they cannot act as a student. */
export async function loadStudentMark(
  executor: Executor,
  { access, labId }: { access: CourseAccess; labId: string },
): Promise<StudentMark | null> {
  if (access.membership.role !== "student")
    await refuse(executor, access, markingRefusal("forbidden", "Only the student sees their own mark here."), `lab:${labId}`);
  const rc = rubricCriteria;
  const v = dropLogVersions;
  const c = markChanges;
  const [row] = await executor
    .select({
      labTitle: labs.title,
      releasedAt: sql<string>`to_json(${marks.releasedAt})#>>'{}'`,
      scores: marks.scores,
      feedback: marks.feedback,
      latePenaltyPoints: marks.latePenaltyPoints,
      releasedSnapshot: marks.releasedSnapshot,
      rubric: sql<RubricRow[]>`coalesce((select json_agg(json_build_object(
          'id', ${rc.id}, 'position', ${rc.position}, 'title', ${rc.title}, 'description', ${rc.description}, 'kind', ${rc.kind}, 'levels', ${rc.levels},
          'minPoints', ${rc.minPoints}, 'maxPoints', ${rc.maxPoints}, 'autoRule', ${rc.autoRule}, 'autoParams', ${rc.autoParams}
        ) order by ${rc.position}, ${rc.id}) from ${rc} where ${rc.labId} = ${labs.id}), '[]'::json)`,
      basedOn: sql<MarkedHandIn | null>`case when ${v.id} is null then null else json_build_object(
        'versionId', ${v.id}, 'version', ${v.version}, 'submittedAt', to_json(${v.submittedAt})#>>'{}', 'late', ${v.late},
        'mode', ${v.reductionMode},
        'dropCount', case when jsonb_typeof(${v.reduction} #> '{drops,n}') = 'number' then (${v.reduction} #>> '{drops,n}')::int end,
        'strayDropCount', case when jsonb_typeof(${v.reduction} #> '{drops,strayDrops}') = 'array' then jsonb_array_length(${v.reduction} #> '{drops,strayDrops}') end,
        'meanTimeS', case when jsonb_typeof(${v.reduction} #> '{drops,mean}') = 'number' then (${v.reduction} #>> '{drops,mean}')::float8 end,
        'normalisedFigure', ${v.normalisedFigure}::float8, 'reynolds', ${v.reynolds}::float8, 'dragCoefficient', ${v.dragCoefficient}::float8,
        'viscosityPaS', ${v.viscosityPaS}::float8,
        'temperatureC', ${v.temperatureC},
        'sphere', ${v.kitRecords} #>> '{sphere,label}', 'fluidLot', ${v.kitRecords} #>> '{fluidLot,label}',
        'warnings', coalesce((select json_agg(json_build_object('code', w ->> 'code', 'level', w ->> 'level', 'message', w ->> 'message'))
          from jsonb_array_elements(case when jsonb_typeof(${v.reduction} -> 'warnings') = 'array' then ${v.reduction} -> 'warnings' else '[]'::jsonb end) w), '[]'::json)
      ) end`,
      changes: sql<
        ChangeRow[]
      >`coalesce((select json_agg(json_build_object('changedAt', to_json(${c.changedAt})#>>'{}', 'reason', ${c.reason},
          'oldTotal', (${c.old} ->> 'total')::float8, 'newTotal', (${c.new} ->> 'total')::float8) order by ${c.changedAt} desc, ${c.id} desc)
        from ${c} where ${c.markId} = ${marks.id} and ${c.afterRelease}), '[]'::json)`,
    })
    .from(marks)
    .innerJoin(labs, eq(labs.id, marks.labId))
    .leftJoin(v, eq(v.id, marks.dropLogVersionId))
    .where(
      and(
        eq(marks.labId, labId),
        eq(marks.membershipId, access.membership.id),
        eq(labs.courseId, access.course.id),
        isNotNull(marks.releasedAt),
      ),
    );
  if (!row) return null;
  const rubric: RubricCriterion[] = row.rubric.map((criterion) => ({ ...criterion, autoParams: criterion.autoParams ?? {} }));
  // Released marks carry every automatic criterion's points (frozen at release), so no suggestion is needed here.
  const totals = markTotals(rubric, { scores: row.scores, latePenaltyPoints: row.latePenaltyPoints }, {});
  return {
    lab: { id: labId, title: row.labTitle },
    releasedAt: row.releasedAt,
    total: totals.total,
    maxTotal: totals.maxTotal,
    latePenaltyPoints: row.latePenaltyPoints,
    feedback: row.feedback,
    criteria: rubric.map((criterion) => {
      const cell = totals.cells[criterion.id];
      const level =
        cell.level !== null && criterion.levels?.[cell.level - 1]
          ? { number: cell.level, description: criterion.levels[cell.level - 1].description }
          : null;
      return {
        id: criterion.id,
        title: criterion.title,
        description: criterion.description,
        kind: criterion.kind,
        maxPoints: criterion.maxPoints,
        points: cell.points,
        level,
        automatic: criterion.kind === "auto",
        overrideReason: cell.source === "override" ? cell.overrideReason : null,
      };
    }),
    basedOn: row.basedOn,
    changedAfterRelease: row.changes.length ? { releasedTotal: row.releasedSnapshot?.total ?? totals.total, changes: row.changes } : null,
  };
}
