/**
 * The term mark book's inputs as the URL and the settings form carry them, and the words of its cells.
 * Pure, so the page (in the browser) and its loader read the same definitions.
 */
import { z } from "zod";
import { entityId } from "~/lib/forms/ids";
import { pagingSearch, searchText } from "~/lib/forms/search-params";
import { typedNumber } from "~/lib/forms/typed-number";

export const markBookSortKeys = ["name", "number", "cohort", "total", "counted"] as const;
export type MarkBookSortKey = (typeof markBookSortKeys)[number];

export type MarkBookQuery = {
  search?: string;
  cohortId?: string;
  /** A column's key, or a lab's id to sort by that lab's percentage. */
  sort: { by: MarkBookSortKey | { labId: string }; direction: "asc" | "desc" };
  /** 1-based; without paging, every matching student (the exports). */
  paging?: { page: number; pageSize: number };
};

export const DEFAULT_MARK_BOOK_PAGE_SIZE = 50;

/**
 * `?search=…&cohort=…&sort=-total&page=2&size=50`: `sort=-total` sorts by the term total, highest
 * first; `sort=<lab id>` by that lab's percentage. A value it does not know is refused (400).
 */
export const markBookSearch = z
  .object({
    search: searchText(80),
    cohort: entityId.optional(),
    sort: z
      .string()
      .regex(new RegExp(`^-?(${markBookSortKeys.join("|")}|[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12})$`, "i"))
      .optional(),
    ...pagingSearch(DEFAULT_MARK_BOOK_PAGE_SIZE),
  })
  .transform(({ search, cohort, sort, page, size }): MarkBookQuery & { sortParam: string } => {
    const key = sort?.replace(/^-/, "") ?? "name";
    return {
      search: search || undefined,
      cohortId: cohort,
      sort: {
        by: (markBookSortKeys as readonly string[]).includes(key) ? (key as MarkBookSortKey) : { labId: key.toLowerCase() },
        direction: sort?.startsWith("-") ? "desc" : "asc",
      },
      sortParam: sort ?? "name",
      paging: { page, pageSize: size },
    };
  });

/** The exports take the page's filters and sort, never its paging. */
export const markBookExportSearch = markBookSearch.transform(({ paging: _paging, ...query }) => query);

/**
 * Where a student stands on one lab: a released mark (with its percentage), handed in or marked but
 * not released yet, nothing handed in, or a lab not set for the student's cohort.
 */
export type MarkBookStanding = "released" | "unreleased" | "missing" | "not-set";
export const markBookStandingWords: Record<Exclude<MarkBookStanding, "released">, string> = {
  unreleased: "not released",
  missing: "not handed in",
  "not-set": "not set",
};

/**
 * A released lab's place in the term total: counted, dropped as one of the student's lowest, or left
 * out (a weight of 0, or a lab without a rubric, whose points are no percentage).
 */
export type MarkBookUse = "counted" | "dropped" | "left-out";

/** A percentage as the mark book prints it: one decimal. */
export const formatPercent = (value: number | null) => (value === null ? "—" : `${value.toFixed(1)} %`);

/** Most labs a course's settings form takes at once: far more than a term has. */
const MAX_LABS = 100;

/** The settings form: each lab's weight (0 leaves it out), and how many of each student's lowest labs are dropped. */
export const markBookSettingsInput = z.object({
  dropLowest: typedNumber(
    z
      .number({ error: "Give the number of lowest labs to drop as a whole number, e.g. 0 or 1." })
      .int("Give the number of lowest labs to drop as a whole number, e.g. 0 or 1.")
      .min(0, "The number of labs dropped cannot be negative.")
      .max(20, "Drop 20 labs at most."),
  ),
  labs: z
    .array(
      z.object({
        labId: entityId,
        weight: typedNumber(
          z
            .number({ error: "Give the weight as a number, e.g. 1 or 0.5; 0 leaves the lab out." })
            .min(0, "A weight cannot be negative; 0 leaves the lab out.")
            .max(1000, "Keep weights at 1,000 or less: only their ratios matter."),
        ),
      }),
    )
    .max(MAX_LABS),
});
export type MarkBookSettingsInput = z.infer<typeof markBookSettingsInput>;
