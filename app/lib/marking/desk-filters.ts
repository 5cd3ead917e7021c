/**
 * The marking desk's filters, sorting and paging as the URL carries them, and the size limit of a bulk
 * action. Pure, so the desk's page (in the browser) and its loader read the same definitions.
 */
import { z } from "zod";
import { pageNumber } from "~/lib/forms/search-params";

export const deskStatusFilters = ["unmarked", "flagged", "late", "missing", "not-due"] as const;
export type DeskStatusFilter = (typeof deskStatusFilters)[number];
export const deskSortKeys = ["name", "cohort", "status", "submittedAt", "figure", "label", "total", "progress"] as const;
export type DeskSortKey = (typeof deskSortKeys)[number];

export type MarkingDeskFilters = {
  cohortId?: string;
  /**
   * unmarked: not every criterion scored yet; flagged: suspect or outlier; late; missing: nothing handed
   * in by the student's own due time; not-due: nothing handed in, their own due time still ahead.
   */
  status?: DeskStatusFilter;
  sort?: { by: DeskSortKey; direction: "asc" | "desc" };
  /** 1-based. */
  page: number;
  pageSize: number;
  /** A student to open beside the table: the page shown is theirs ("next to mark" links here). */
  studentId?: string;
};

/**
 * A hand-in still to mark: handed in, and not fully marked or reopened by a hand-in after release. The
 * desk's "next to mark" key goes to these; the course overview counts the same in SQL.
 */
export const isToMark = (row: { handIn: unknown; progress: "unmarked" | "partial" | "marked"; needsRemarking: boolean }) =>
  row.handIn !== null && (row.progress !== "marked" || row.needsRemarking);

export const DEFAULT_DESK_PAGE_SIZE = 50;
export const MAX_DESK_PAGE_SIZE = 200;
/** Most students one bulk action may name. */
export const MAX_BULK_STUDENTS = 5000;

/**
 * The desk's filters from the URL (`?cohort=…&status=late&sort=-total&page=2&pageSize=50`), as
 * `MarkingDeskFilters`; `sort=-total` sorts by total, highest first. A value it does not know is
 * refused (the loader answers 400), never guessed at.
 */
export const markingDeskSearch = z
  .object({
    cohort: z.uuid().optional(),
    status: z.enum(deskStatusFilters).optional(),
    sort: z
      .string()
      .regex(new RegExp(`^-?(${deskSortKeys.join("|")})$`))
      .optional(),
    page: pageNumber.default(1),
    pageSize: z.coerce.number().int().min(1).max(MAX_DESK_PAGE_SIZE).default(DEFAULT_DESK_PAGE_SIZE),
    student: z.uuid().optional(),
  })
  .transform((parsed): MarkingDeskFilters => ({
    cohortId: parsed.cohort,
    status: parsed.status,
    sort: parsed.sort
      ? { by: parsed.sort.replace(/^-/, "") as DeskSortKey, direction: parsed.sort.startsWith("-") ? "desc" : "asc" }
      : undefined,
    page: parsed.page,
    pageSize: parsed.pageSize,
    studentId: parsed.student,
  }));

/** The search string for filters (defaults left out), the inverse of `markingDeskSearch`. */
export function markingDeskSearchParams(filters: Partial<MarkingDeskFilters>): URLSearchParams {
  const params = new URLSearchParams();
  if (filters.cohortId) params.set("cohort", filters.cohortId);
  if (filters.status) params.set("status", filters.status);
  if (filters.sort) params.set("sort", `${filters.sort.direction === "desc" ? "-" : ""}${filters.sort.by}`);
  if (filters.page && filters.page > 1) params.set("page", String(filters.page));
  if (filters.pageSize && filters.pageSize !== DEFAULT_DESK_PAGE_SIZE) params.set("pageSize", String(filters.pageSize));
  if (filters.studentId) params.set("student", filters.studentId);
  return params;
}
