/**
 * The marking desk, criterion first: one criterion marked across the viewer's cohorts among the lab's
 * (instructors see every cohort), the hand-ins laid out in that criterion's order and bands (see
 * `criterion-order`), with every criterion's progress for the switcher and the counts of each hand-in
 * state for the legend. Filters and paging run on the server; whatever the class size it costs two
 * statements (students with hand-ins and marks, the class's counted hand-ins for the labels), run side
 * by side.
 */
import { orderForCriterion, type Band } from "~/lib/marking/criterion-order";
import type { DeskCard } from "~/lib/marking/desk-card";
import {
  deskStatusFilters,
  isToMark,
  isToScoreFor,
  MAX_DESK_PAGE_SIZE,
  type DeskStatusFilter,
  type MarkingDeskFilters,
} from "~/lib/marking/desk-filters";
import { maxTotalOf, type RubricCriterion } from "~/lib/marking/rubric";
import { handInStatesOf } from "~/lib/marking/status-words";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { deskRow, loadClassLabels, loadStudentMarkRows, type MarkingDeskRow } from "./mark-rows.server";
import { assertMarkingStaff, markableCohortIds, markingRefusal, type MarkingLab } from "./marking-lab.server";

// The filter definitions are pure (the page uses them in the browser); re-exported here for the loader.
export {
  DEFAULT_DESK_PAGE_SIZE,
  deskStatusFilters,
  MAX_DESK_PAGE_SIZE,
  markingDeskSearch,
  type DeskStatusFilter,
  type MarkingDeskFilters,
} from "~/lib/marking/desk-filters";

/** A band of the criterion's order, with every student in it on every page: what "the whole group" selects. */
export type DeskGroup = Band & { membershipIds: string[] };

/**
 * Which students a bulk action takes, as the desk's page knows them without holding every id: every
 * student passing the filters (`all`), whole bands, students picked one by one, minus those taken out.
 */
export type DeskSelection = { all: boolean; bands: string[]; ids: string[]; except: string[] };

/** A criterion as the switcher shows it: how many of the hand-ins shown have its points. */
export type CriterionProgress = Pick<RubricCriterion, "id" | "title" | "kind" | "maxPoints"> & { scored: number; handedIn: number };

export type MarkingDesk = {
  lab: MarkingLab;
  /** The lab's cohorts the viewer may mark, for the cohort filter. */
  cohorts: { id: string; name: string }[];
  /** The criterion marked across the class (null while the rubric is empty), and every criterion's progress. */
  criterion: RubricCriterion | null;
  criteria: CriterionProgress[];
  /** The cards of the requested page, in the criterion's order, each with the key of its band. */
  rows: MarkingDeskRow[];
  bands: string[];
  /** Every band of the order (all pages), in order. */
  groups: DeskGroup[];
  /** Rows passing the filters (all pages). */
  totalRows: number;
  /**
   * Every student passing the filters, on every page, in order, and those of them still to score on this
   * criterion: for the server (a selection, a student's place in the order), never sent to the page,
   * whose weight must not grow with the class.
   */
  matchingIds: string[];
  toMarkIds: string[];
  /** The student asked for (or the next to score after the one named by `afterId`), when they pass the filters: their card takes the focus. */
  openId: string | null;
  /** `afterId` was given and no other hand-in passing the filters is still to score on this criterion. */
  noneToScore: boolean;
  page: number;
  pageSize: number;
  pageCount: number;
  /** Counts over the viewer's students in the chosen cohort, before the state filter: for the legend. */
  counts: { all: number } & Record<DeskStatusFilter, number>;
  maxTotal: number;
  /** TAs may change marks until the lab's marking is marked ready; instructors always. */
  canEdit: boolean;
};

const passes = (row: MarkingDeskRow, status: DeskStatusFilter) =>
  status === "waiting" ? isToMark(row) : handInStatesOf(row).includes(status);

/**
 * The desk for `access`: TAs get the students of their cohorts, instructors everyone's. Students are
 * refused (and recorded); a cohort or criterion the viewer may not choose is refused as bad input.
 */
export async function loadMarkingDesk(
  executor: Executor,
  { access, lab, filters, now = new Date() }: { access: CourseAccess; lab: MarkingLab; filters: MarkingDeskFilters; now?: Date },
): Promise<MarkingDesk> {
  await assertMarkingStaff(executor, access, lab);
  const allowed = markableCohortIds(access, lab);
  // The filter offers only these cohorts: any other id is a URL made by hand, answered 400 like any bad filter.
  if (filters.cohortId && !allowed.includes(filters.cohortId))
    throw markingRefusal("invalid_value", "That cohort is not one you mark for this lab.", "cohort");
  if (filters.criterionId && !lab.rubric.some((criterion) => criterion.id === filters.criterionId))
    throw markingRefusal("invalid_value", "That criterion is not in this lab's rubric.", "criterion");
  const cohortIds = filters.cohortId ? [filters.cohortId] : allowed;
  const [students, labels] = await Promise.all([
    loadStudentMarkRows(executor, lab, { cohortIds: allowed, now }),
    loadClassLabels(executor, lab),
  ]);

  const cohorts = [...new Map(students.map((student) => [student.cohortId, student.cohortName])).entries()]
    .map(([id, name]) => ({ id, name }))
    .sort((a, b) => a.name.localeCompare(b.name));
  const inCohort = students.filter((student) => cohortIds.includes(student.cohortId)).map((student) => deskRow(lab, student, labels));
  const counts = Object.fromEntries([["all", inCohort.length], ...deskStatusFilters.map((status) => [status, 0])]) as MarkingDesk["counts"];
  for (const row of inCohort) for (const status of deskStatusFilters) if (passes(row, status)) counts[status]++;

  const handedIn = inCohort.filter((row) => row.handIn !== null);
  const criteria = lab.rubric.map((criterion) => ({
    id: criterion.id,
    title: criterion.title,
    kind: criterion.kind,
    maxPoints: criterion.maxPoints,
    scored: handedIn.filter((row) => !isToScoreFor(row, criterion.id)).length,
    handedIn: handedIn.length,
  }));
  const criterion =
    lab.rubric.find((candidate) => candidate.id === filters.criterionId) ??
    lab.rubric[criteria.findIndex((entry) => entry.scored < entry.handedIn)] ??
    lab.rubric[0] ??
    null;

  const filtered = filters.status ? inCohort.filter((row) => passes(row, filters.status!)) : inCohort;
  const ordered = criterion
    ? orderForCriterion(criterion, filtered, lab.requiredDrops)
    : { rows: filtered.map((row) => ({ row, band: "nothing" })), bands: [] };
  const groups = ordered.bands.map((band) => ({
    ...band,
    membershipIds: ordered.rows.filter((entry) => entry.band === band.key).map((entry) => entry.row.membershipId),
  }));
  const pageSize = Math.min(Math.max(1, Math.floor(filters.pageSize)), MAX_DESK_PAGE_SIZE);
  const pageCount = Math.max(1, Math.ceil(ordered.rows.length / pageSize));
  // Without a rubric there is no criterion to score, but a hand-in still waits for its mark.
  const toScore = (row: MarkingDeskRow) => (criterion ? isToScoreFor(row, criterion.id) : isToMark(row));
  const indexOf = (membershipId: string | undefined) =>
    membershipId ? ordered.rows.findIndex((entry) => entry.row.membershipId === membershipId) : -1;
  const from = indexOf(filters.afterId);
  // "Next to score": the first after `afterId` in the desk's order, wrapping round, never that card itself.
  const next = filters.afterId
    ? [...ordered.rows.keys()]
        .map((step) => (from + 1 + step) % ordered.rows.length)
        .find((index) => index !== from && toScore(ordered.rows[index].row))
    : undefined;
  const noneToScore = filters.afterId !== undefined && next === undefined;
  const asked = filters.afterId ? (next ?? from) : indexOf(filters.studentId);
  const page = asked >= 0 ? Math.floor(asked / pageSize) + 1 : Math.min(Math.max(1, Math.floor(filters.page)), pageCount);
  const shown = ordered.rows.slice((page - 1) * pageSize, page * pageSize);
  return {
    lab,
    cohorts,
    criterion,
    criteria,
    rows: shown.map((entry) => entry.row),
    bands: shown.map((entry) => entry.band),
    groups,
    totalRows: ordered.rows.length,
    matchingIds: ordered.rows.map((entry) => entry.row.membershipId),
    toMarkIds: ordered.rows.filter((entry) => toScore(entry.row)).map((entry) => entry.row.membershipId),
    openId: asked >= 0 ? ordered.rows[asked].row.membershipId : null,
    noneToScore,
    page,
    pageSize,
    pageCount,
    counts,
    maxTotal: maxTotalOf(lab.rubric),
    canEdit: access.membership.role === "instructor" || lab.marking.readyAt === null,
  };
}

/** The students of `desk` that `selection` takes, in the desk's order: only those passing its filters. */
export function selectedMembershipIds(desk: Pick<MarkingDesk, "groups" | "matchingIds">, selection: DeskSelection): string[] {
  const bands = new Set(selection.bands);
  const inBands = new Set(desk.groups.filter((group) => bands.has(group.key)).flatMap((group) => group.membershipIds));
  const picked = new Set(selection.ids);
  const except = new Set(selection.except);
  return desk.matchingIds.filter((id) => (selection.all || inBands.has(id) || picked.has(id)) && !except.has(id));
}

/** Shown figures keep six significant digits: more than any card prints, far fewer bytes than a double's seventeen. */
const shown = (value: number | null) => (value === null ? null : Number(value.toPrecision(6)));

/** `row` as a desk card for marking `criterionId` (see `DeskCard`). */
export function deskCardOf(row: MarkingDeskRow, criterionId: string | null): DeskCard {
  const { handIn, mark } = row;
  return {
    membershipId: row.membershipId,
    studentName: row.studentName,
    cohortName: row.cohortName,
    deadline: row.deadline.extendedBy ? row.deadline : null,
    status: row.status,
    handIn: handIn && {
      version: handIn.version,
      dropCount: handIn.dropCount,
      strayDropCount: handIn.strayDropCount,
      dropTimes: handIn.dropTimes,
      strayDrops: handIn.strayDrops,
      warningCount: handIn.warningCount,
      kitNotAtHome: handIn.kitNotAtHome,
      figure: shown(handIn.figure),
      figureExpanded: shown(handIn.figureExpanded),
      dragCoefficient: shown(handIn.dragCoefficient),
      reynolds: shown(handIn.reynolds),
      viscosityPaS: shown(handIn.viscosityPaS),
    },
    markedVersion: row.handInChangedSinceMarked ? (row.markedHandIn?.version ?? null) : null,
    classLabel: row.classLabel,
    flagged: row.flagged,
    mark: mark && {
      scores: mark.scores,
      latePenaltyPoints: mark.latePenaltyPoints,
      releasedAt: mark.releasedAt,
      markedBy: mark.markedBy && { name: mark.markedBy.name },
    },
    expectedVersion: row.expectedVersion,
    suggestions: Object.fromEntries(
      Object.entries(row.suggestions).map(([id, suggestion]) => [
        id,
        id === criterionId ? suggestion : { points: suggestion.points, reason: "" },
      ]),
    ),
    handInChangedSinceMarked: row.handInChangedSinceMarked,
    needsRemarking: row.needsRemarking,
    resultChangedSinceMarked: row.resultChangedSinceMarked && {
      oldFigure: shown(row.resultChangedSinceMarked.oldFigure),
      newFigure: shown(row.resultChangedSinceMarked.newFigure),
    },
  };
}
