/**
 * The marking desk, criterion first: one criterion marked across the viewer's cohorts among the lab's
 * (instructors see every cohort), the hand-ins laid out in that criterion's order and bands (see
 * `criterion-order`), with every criterion's progress for the switcher and the counts of each hand-in
 * state for the legend. Filters and paging run on the server; whatever the class size it costs two
 * statements (students with hand-ins and marks, the class's counted hand-ins for the labels), run side
 * by side.
 */
import { orderForCriterion, type Band } from "~/lib/marking/criterion-order";
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
  /** Every student passing the filters, on every page, in order: what "select all that match" selects. */
  matchingIds: string[];
  /** Those of them still to score on this criterion, in the same order: where the "next to score" key goes beyond this page. */
  toMarkIds: string[];
  /** The student asked for in the URL, when they pass the filters: their card takes the focus. */
  openId: string | null;
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
  const asked = filters.studentId ? ordered.rows.findIndex((entry) => entry.row.membershipId === filters.studentId) : -1;
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
    // Without a rubric there is no criterion to score, but a hand-in still waits for its mark.
    toMarkIds: ordered.rows
      .filter((entry) => (criterion ? isToScoreFor(entry.row, criterion.id) : isToMark(entry.row)))
      .map((entry) => entry.row.membershipId),
    openId: asked >= 0 ? ordered.rows[asked].row.membershipId : null,
    page,
    pageSize,
    pageCount,
    counts,
    maxTotal: maxTotalOf(lab.rubric),
    canEdit: access.membership.role === "instructor" || lab.marking.readyAt === null,
  };
}
