/**
 * A lab's marks for the instructor's own records and the institution: one row per student of the
 * viewer's cohorts (TAs see theirs, instructors all) as the `GET /api/v1/labs/:labId/marks` JSON gives
 * them; the long table of the marks CSV, one row per student and criterion; and the summary sheet.
 * Every figure of a mark is of the version it was marked on, which each row names beside the latest
 * one, so a later hand-in never mixes in. Two statements whatever the class size.
 */
import type { HandInStanding } from "~/lib/drop-logs/hand-in-window";
import { standingWord } from "~/lib/marking/status-words";
import type { CellSource } from "~/lib/marking/marks";
import { maxTotalOf, roundPoints } from "~/lib/marking/rubric";
import { quantileType7 } from "~/lib/reduction/tukey";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { deskRow, loadClassLabels, loadStudentMarkRows, type MarkingDeskRow } from "./mark-rows.server";
import { assertMarkingStaff, markableCohortIds, type MarkingLab } from "./marking-lab.server";

/** The marks of a lab as plain JSON: the same fields in the CSV and the API. */
export type MarksJson = {
  lab: { id: string; courseId: string; title: string; releasedAt: string | null };
  maxTotal: number;
  criteria: { id: string; title: string; kind: "levels" | "range" | "auto"; maxPoints: number }[];
  marks: {
    membershipId: string;
    student: { name: string; email: string; studentNumber: string | null };
    cohort: { id: string; name: string };
    /**
     * Of the version the mark rests on (the counted one without a mark); with none, "not-due" while the
     * student's own due time is ahead and nothing is handed in, else "missing".
     */
    handIn: HandInStanding;
    late: boolean;
    /** The version the mark rests on; null without a mark or for a mark given with nothing handed in. */
    markedVersion: { id: string; number: number } | null;
    /** The latest handed-in version, null when nothing is handed in. */
    latestVersion: number | null;
    needsRemarking: boolean;
    /** Null for a student without a mark. */
    total: number | null;
    /** Every criterion has points. */
    complete: boolean;
    latePenaltyPoints: number;
    /** Points per criterion id; null where none are given or suggested. */
    points: Record<string, number | null>;
    feedback: string;
    markedBy: string | null;
    updatedAt: string | null;
    releasedAt: string | null;
    version: number;
  }[];
};

type ExportArgs = { access: CourseAccess; lab: MarkingLab; now?: Date };

/** Every student's desk row of the lab that the viewer may see, in the desk's order. Staff only. */
async function loadExportRows(executor: Executor, { access, lab, now = new Date() }: ExportArgs): Promise<MarkingDeskRow[]> {
  await assertMarkingStaff(executor, access, lab);
  const [students, labels] = await Promise.all([
    loadStudentMarkRows(executor, lab, { cohortIds: markableCohortIds(access, lab), now }),
    loadClassLabels(executor, lab),
  ]);
  return students.map((student) => deskRow(lab, student, labels));
}

/** Where the hand-in a mark rests on stands. A mark given on nothing, with a hand-in since, stays "missing": that is what it was marked on. */
const standingOf = (row: MarkingDeskRow): HandInStanding =>
  row.markedHandIn === null ? (row.status === "not-due" ? "not-due" : "missing") : row.markedHandIn.late ? "late" : "on-time";

/** Every student's mark of the lab that the viewer may see, by name. Staff only. */
export async function loadMarksJson(executor: Executor, args: ExportArgs): Promise<MarksJson> {
  const { lab } = args;
  const rows = await loadExportRows(executor, args);
  return {
    lab: { id: lab.id, courseId: lab.courseId, title: lab.title, releasedAt: lab.marking.releasedAt?.toISOString() ?? null },
    maxTotal: maxTotalOf(lab.rubric),
    criteria: lab.rubric.map((criterion) => ({
      id: criterion.id,
      title: criterion.title,
      kind: criterion.kind,
      maxPoints: criterion.maxPoints,
    })),
    marks: rows.map((row) => {
      const basis = row.markedHandIn;
      return {
        membershipId: row.membershipId,
        student: { name: row.studentName, email: row.email, studentNumber: row.studentNumber },
        cohort: { id: row.cohortId, name: row.cohortName },
        handIn: standingOf(row),
        late: basis?.late ?? false,
        markedVersion: row.mark && basis ? { id: basis.versionId, number: basis.version } : null,
        latestVersion: row.handIn?.version ?? null,
        needsRemarking: row.needsRemarking,
        total: row.mark ? row.total : null,
        complete: row.mark !== null && row.complete,
        latePenaltyPoints: row.mark?.latePenaltyPoints ?? 0,
        points: Object.fromEntries(lab.rubric.map((criterion) => [criterion.id, row.mark ? row.cells[criterion.id].points : null])),
        feedback: row.mark?.feedback ?? "",
        markedBy: row.mark?.markedBy?.name ?? null,
        updatedAt: row.mark?.updatedAt ?? null,
        releasedAt: row.mark?.releasedAt ?? null,
        version: row.expectedVersion,
      };
    }),
  };
}

/** How a criterion's points came about, in the words of the marks CSV. */
const scoredWords: Record<CellSource, string> = {
  marked: "by hand",
  override: "by hand over the automatic rule",
  suggestion: "automatic",
  released: "automatic, kept at release",
  unmarked: "not scored",
};

/** One line of the long marks table: a criterion of a student's mark, or the late penalty taken off it. */
export type MarkLine = {
  cohort: string;
  studentNumber: string | null;
  student: string;
  email: string;
  handIn: string;
  markedVersion: number | null;
  line: "criterion" | "late penalty";
  position: number | null;
  criterion: string | null;
  level: number | null;
  levelDescription: string | null;
  points: number | null;
  outOf: number | null;
  scored: string;
  marker: string | null;
  releasedAt: string | null;
};

/**
 * The marks as a long table: one line per student and criterion, in the rubric's order, and for a mark
 * with a late penalty one more line with the points it actually took off (never more than the criteria
 * gave, as the total is floored at 0), so a student's points add up to their total. A student without a
 * mark has their criteria unscored. Staff only; two statements whatever the class size.
 */
export async function loadMarkLines(executor: Executor, args: ExportArgs): Promise<MarkLine[]> {
  const { lab } = args;
  const rows = await loadExportRows(executor, args);
  return rows.flatMap((row) => {
    const student = {
      cohort: row.cohortName,
      studentNumber: row.studentNumber,
      student: row.studentName,
      email: row.email,
      handIn: standingWord(standingOf(row)),
      markedVersion: row.mark ? (row.markedHandIn?.version ?? null) : null,
      marker: row.mark?.markedBy?.name ?? null,
      releasedAt: row.mark?.releasedAt ?? null,
    };
    const criteria = lab.rubric.map((criterion, index): MarkLine => {
      const cell = row.mark ? row.cells[criterion.id] : null;
      const level = cell?.level != null ? (criterion.levels?.[cell.level - 1] ?? null) : null;
      return {
        ...student,
        line: "criterion",
        position: index + 1,
        criterion: criterion.title,
        level: level ? cell!.level : null,
        levelDescription: level?.description ?? null,
        points: cell?.points ?? null,
        outOf: criterion.maxPoints,
        scored: scoredWords[cell?.source ?? "unmarked"],
      };
    });
    const takenOff = row.mark && row.mark.latePenaltyPoints > 0 ? roundPoints(row.total - row.subtotal) : null;
    if (takenOff === null) return criteria;
    const penalty: MarkLine = {
      ...student,
      line: "late penalty",
      position: null,
      criterion: null,
      level: null,
      levelDescription: null,
      points: takenOff,
      outOf: null,
      scored: scoredWords.marked,
    };
    return [...criteria, penalty];
  });
}

/** One figure of the summary sheet: what it is about (`section`, `subject`), which figure, its value. */
export type SummaryLine = { section: "hand-ins" | "criterion" | "totals"; subject: string; measure: string; value: number | null };

const ALL_COHORTS = "all cohorts";
const mean = (values: number[]) => (values.length ? roundPoints(values.reduce((sum, value) => sum + value, 0) / values.length) : null);
const median = (values: number[]) =>
  values.length
    ? roundPoints(
        quantileType7(
          [...values].sort((a, b) => a - b),
          0.5,
        ),
      )
    : null;

/**
 * The summary sheet of a lab's marks, small enough to read at a glance: hand-ins per cohort (and in
 * all), per criterion how many were scored, their mean and median points and how many got each level,
 * and per cohort the marked students' mean and median totals. Only students with a mark count towards
 * points and totals. Staff only; two statements whatever the class size.
 */
export async function loadMarkSummary(executor: Executor, args: ExportArgs): Promise<SummaryLine[]> {
  const { lab } = args;
  const rows = await loadExportRows(executor, args);
  const cohorts = [...new Set(rows.map((row) => row.cohortName))].sort((a, b) => a.localeCompare(b));
  const groups: [string, MarkingDeskRow[]][] = [
    ...cohorts.map((cohort): [string, MarkingDeskRow[]] => [cohort, rows.filter((row) => row.cohortName === cohort)]),
    [ALL_COHORTS, rows],
  ];
  const standings: HandInStanding[] = ["on-time", "late", "missing", "not-due"];
  const handIns = groups.flatMap(([subject, group]): SummaryLine[] => [
    { section: "hand-ins", subject, measure: "students", value: group.length },
    ...standings.map((standing): SummaryLine => ({
      section: "hand-ins",
      subject,
      measure: standingWord(standing),
      value: group.filter((row) => standingOf(row) === standing).length,
    })),
  ]);
  const marked = rows.filter((row) => row.mark !== null);
  const criteria = lab.rubric.flatMap((criterion, index): SummaryLine[] => {
    const subject = `${index + 1}. ${criterion.title}`;
    const cells = marked.map((row) => row.cells[criterion.id]).filter((cell) => cell.points !== null);
    const points = cells.map((cell) => cell.points!);
    return [
      { section: "criterion", subject, measure: "out of", value: criterion.maxPoints },
      { section: "criterion", subject, measure: "scored", value: cells.length },
      { section: "criterion", subject, measure: "not scored", value: rows.length - cells.length },
      { section: "criterion", subject, measure: "mean points", value: mean(points) },
      { section: "criterion", subject, measure: "median points", value: median(points) },
      ...(criterion.levels ?? []).map((level, levelIndex): SummaryLine => ({
        section: "criterion",
        subject,
        measure: `level ${levelIndex + 1}: ${level.description}`,
        value: cells.filter((cell) => cell.level === levelIndex + 1).length,
      })),
    ];
  });
  const totals = groups.flatMap(([subject, group]): SummaryLine[] => {
    const values = group.filter((row) => row.mark !== null).map((row) => row.total);
    return [
      { section: "totals", subject, measure: "marked", value: values.length },
      { section: "totals", subject, measure: "out of", value: maxTotalOf(lab.rubric) },
      { section: "totals", subject, measure: "mean total", value: mean(values) },
      { section: "totals", subject, measure: "median total", value: median(values) },
    ];
  });
  return [...handIns, ...criteria, ...totals];
}
