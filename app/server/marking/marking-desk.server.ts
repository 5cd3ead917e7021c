/**
 * The marking desk: one row per student of the viewer's cohorts among the lab's (instructors see
 * every cohort), with the hand-in's status and key results, the class label and its reason, the
 * automatic criteria's suggestions, the rubric's cells and the total. Filters, sorting and paging run
 * on the server; whatever the class size it costs two statements (students with hand-ins and marks,
 * the class's counted hand-ins for the labels), run side by side.
 */
import {
  deskStatusFilters,
  isToMark,
  MAX_DESK_PAGE_SIZE,
  type DeskSortKey,
  type DeskStatusFilter,
  type MarkingDeskFilters,
} from "~/lib/marking/desk-filters";
import { maxTotalOf } from "~/lib/marking/rubric";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { deskRow, loadClassLabels, loadStudentMarkRows, type MarkingDeskRow } from "./mark-rows.server";
import { assertMarkingStaff, markableCohortIds, markingRefusal, type MarkingLab } from "./marking-lab.server";

// The filter definitions are pure (the page uses them in the browser); re-exported here for the loader.
export {
  DEFAULT_DESK_PAGE_SIZE,
  deskSortKeys,
  deskStatusFilters,
  MAX_DESK_PAGE_SIZE,
  markingDeskSearch,
  type DeskSortKey,
  type DeskStatusFilter,
  type MarkingDeskFilters,
} from "~/lib/marking/desk-filters";

export type MarkingDesk = {
  lab: MarkingLab;
  /** The lab's cohorts the viewer may mark, for the cohort filter. */
  cohorts: { id: string; name: string }[];
  /** The rows of the requested page. */
  rows: MarkingDeskRow[];
  /** Rows passing the filters (all pages). */
  totalRows: number;
  /** Every student passing the filters, on every page: what "select all that match" selects. */
  matchingIds: string[];
  /** Those of them whose hand-in is still to mark, in the same order: where the "next to mark" key goes beyond this page. */
  toMarkIds: string[];
  /** The student asked for in the URL, when they pass the filters: opened beside the table. */
  openId: string | null;
  page: number;
  pageSize: number;
  pageCount: number;
  /** Counts over the viewer's students in the chosen cohort, before the status filter: for the filter buttons. */
  counts: { all: number } & Record<DeskStatusFilter, number>;
  maxTotal: number;
  /** TAs may change marks until the lab's marking is marked ready; instructors always. */
  canEdit: boolean;
};

const labelRank = { outlier: 0, suspect: 1, consistent: 2 } as const;
const statusRank = { missing: 0, "not-due": 1, late: 2, "on-time": 3 } as const;
const progressRank = { unmarked: 0, partial: 1, marked: 2 } as const;

function sortValue(row: MarkingDeskRow, by: DeskSortKey): string | number | null {
  switch (by) {
    case "name":
      return row.studentName.toLocaleLowerCase();
    case "cohort":
      return row.cohortName.toLocaleLowerCase();
    case "status":
      return statusRank[row.status];
    case "submittedAt":
      return row.handIn?.submittedAt ?? null;
    case "figure":
      return row.handIn?.figure ?? null;
    case "label":
      return row.classLabel ? labelRank[row.classLabel.label] : null;
    case "total":
      return row.total;
    case "progress":
      return progressRank[row.progress];
  }
}

/** Sorts by the key, then by name; empty values (no hand-in, no label) go last either way. */
function sortRows(rows: MarkingDeskRow[], sort: MarkingDeskFilters["sort"]): MarkingDeskRow[] {
  if (!sort || (sort.by === "name" && sort.direction === "asc")) return rows; // the statement's own order
  const sign = sort.direction === "desc" ? -1 : 1;
  return [...rows].sort((a, b) => {
    const x = sortValue(a, sort.by);
    const y = sortValue(b, sort.by);
    if (x === null || y === null) return x === y ? 0 : x === null ? 1 : -1;
    const order = x < y ? -1 : x > y ? 1 : 0;
    return order !== 0 ? sign * order : a.studentName.localeCompare(b.studentName);
  });
}

const passes = (row: MarkingDeskRow, status: DeskStatusFilter) =>
  status === "unmarked" ? row.progress !== "marked" : status === "flagged" ? row.flagged : row.status === status;

/**
 * The desk for `access`: TAs get the students of their cohorts, instructors everyone's. Students are
 * refused (and recorded); a cohort filter naming a cohort the viewer may not mark is refused as bad input.
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
  const cohortIds = filters.cohortId ? [filters.cohortId] : allowed;
  const [students, labels] = await Promise.all([
    loadStudentMarkRows(executor, lab, { cohortIds: allowed, now }),
    loadClassLabels(executor, lab),
  ]);

  const cohorts = [...new Map(students.map((student) => [student.cohortId, student.cohortName])).entries()]
    .map(([id, name]) => ({ id, name }))
    .sort((a, b) => a.name.localeCompare(b.name));
  const inCohort = students.filter((student) => cohortIds.includes(student.cohortId)).map((student) => deskRow(lab, student, labels));
  const counts: MarkingDesk["counts"] = { all: inCohort.length, unmarked: 0, flagged: 0, late: 0, missing: 0, "not-due": 0 };
  for (const row of inCohort) for (const status of deskStatusFilters) if (passes(row, status)) counts[status]++;

  const filtered = sortRows(filters.status ? inCohort.filter((row) => passes(row, filters.status!)) : inCohort, filters.sort);
  const pageSize = Math.min(Math.max(1, Math.floor(filters.pageSize)), MAX_DESK_PAGE_SIZE);
  const pageCount = Math.max(1, Math.ceil(filtered.length / pageSize));
  const asked = filters.studentId ? filtered.findIndex((row) => row.membershipId === filters.studentId) : -1;
  const page = asked >= 0 ? Math.floor(asked / pageSize) + 1 : Math.min(Math.max(1, Math.floor(filters.page)), pageCount);
  return {
    lab,
    cohorts,
    rows: filtered.slice((page - 1) * pageSize, page * pageSize),
    totalRows: filtered.length,
    matchingIds: filtered.map((row) => row.membershipId),
    toMarkIds: filtered.filter(isToMark).map((row) => row.membershipId),
    openId: asked >= 0 ? filtered[asked].membershipId : null,
    page,
    pageSize,
    pageCount,
    counts,
    maxTotal: maxTotalOf(lab.rubric),
    canEdit: access.membership.role === "instructor" || lab.marking.readyAt === null,
  };
}
