/**
 * The marking desk's choices as the URL carries them (the criterion being marked, the cohort, a hand-in
 * state, the page), and the size limit of a bulk action. Pure, so the desk's page (in the browser) and
 * its loader read the same definitions.
 */
import { z } from "zod";
import { pageNumber } from "~/lib/forms/search-params";
import { handInStates, type HandInState } from "./status-words";

/** A hand-in state of `status-words`, or `waiting`: handed in and still to score in some way (see `isToMark`). */
export const deskStatusFilters = ["waiting", ...handInStates] as const;
export type DeskStatusFilter = (typeof deskStatusFilters)[number];
export type { HandInState };

export type MarkingDeskFilters = {
  /** The criterion marked across the class; the first one not fully scored when absent. */
  criterionId?: string;
  cohortId?: string;
  status?: DeskStatusFilter;
  /** 1-based. */
  page: number;
  pageSize: number;
  /** A student whose card to show: the page shown is theirs. */
  studentId?: string;
  /** "Next to score": the page and card of the first student after this one still to score on the criterion. */
  afterId?: string;
};

/**
 * A hand-in still to mark: handed in, and not fully marked or reopened by a hand-in after release. The
 * desk's `waiting` filter shows these; the course overview counts the same in SQL.
 */
export const isToMark = (row: { handIn: unknown; progress: "unmarked" | "partial" | "marked"; needsRemarking: boolean }) =>
  row.handIn !== null && (row.progress !== "marked" || row.needsRemarking);

/** A hand-in still to score on one criterion: handed in, and that criterion without points (or the whole mark reopened). */
export const isToScoreFor = (
  row: { handIn: unknown; needsRemarking: boolean; cells: Record<string, { points: number | null } | undefined> },
  criterionId: string,
) => row.handIn !== null && (row.cells[criterionId]?.points == null || row.needsRemarking);

/**
 * Cards per page: a screenful at a time (four rows of four on a laptop), so that a page weighs the same for 45 students or
 * 2,000 (each card carrying only its drop times, key figures and the criterion's score).
 */
export const DEFAULT_DESK_PAGE_SIZE = 16;
export const MAX_DESK_PAGE_SIZE = 200;
/** Most students one bulk action may name. */
export const MAX_BULK_STUDENTS = 5000;

/**
 * The desk's choices from the URL (`?criterion=…&cohort=…&status=after-due&page=2&pageSize=50`, or `&after=…` for the next card to score), as
 * `MarkingDeskFilters`. A value it does not know is refused (the loader answers 400), never guessed at.
 */
export const markingDeskSearch = z
  .object({
    criterion: z.uuid().optional(),
    cohort: z.uuid().optional(),
    status: z.enum(deskStatusFilters).optional(),
    page: pageNumber.default(1),
    pageSize: z.coerce.number().int().min(1).max(MAX_DESK_PAGE_SIZE).default(DEFAULT_DESK_PAGE_SIZE),
    student: z.uuid().optional(),
    after: z.uuid().optional(),
  })
  .transform((parsed): MarkingDeskFilters => ({
    criterionId: parsed.criterion,
    cohortId: parsed.cohort,
    status: parsed.status,
    page: parsed.page,
    pageSize: parsed.pageSize,
    studentId: parsed.student,
    afterId: parsed.after,
  }));

/** The search string for filters (defaults left out), the inverse of `markingDeskSearch`. */
export function markingDeskSearchParams(filters: Partial<MarkingDeskFilters>): URLSearchParams {
  const params = new URLSearchParams();
  if (filters.criterionId) params.set("criterion", filters.criterionId);
  if (filters.cohortId) params.set("cohort", filters.cohortId);
  if (filters.status) params.set("status", filters.status);
  if (filters.page && filters.page > 1) params.set("page", String(filters.page));
  if (filters.pageSize && filters.pageSize !== DEFAULT_DESK_PAGE_SIZE) params.set("pageSize", String(filters.pageSize));
  if (filters.studentId) params.set("student", filters.studentId);
  if (filters.afterId) params.set("after", filters.afterId);
  return params;
}
