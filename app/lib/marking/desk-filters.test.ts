import { describe, expect, it } from "vitest";
import { DEFAULT_DESK_PAGE_SIZE, markingDeskSearch, markingDeskSearchParams } from "./desk-filters";

describe("the desk's choices in the URL", () => {
  it("read back what they write, defaults left out", () => {
    const filters = {
      criterionId: "00000000-0000-4000-8000-000000000002",
      cohortId: "00000000-0000-4000-8000-000000000001",
      status: "after-due" as const,
      page: 2,
      pageSize: 100,
      studentId: undefined,
      afterId: undefined,
    };
    const params = markingDeskSearchParams(filters);
    expect(params.toString()).toBe(
      "criterion=00000000-0000-4000-8000-000000000002&cohort=00000000-0000-4000-8000-000000000001&status=after-due&page=2&pageSize=100",
    );
    expect(markingDeskSearch.parse(Object.fromEntries(params))).toEqual(filters);
    expect(markingDeskSearchParams({ page: 1, pageSize: DEFAULT_DESK_PAGE_SIZE }).toString()).toBe("");
  });

  it("refuse values they do not know, and pages no desk has", () => {
    for (const search of [
      { status: "late" },
      { status: "graded" },
      { criterion: "first" },
      { page: "-3" },
      { page: "Infinity" },
      { page: "1234567890123456789012345" },
      { pageSize: "999" },
      { cohort: "nope" },
    ]) {
      expect(markingDeskSearch.safeParse(search).success, JSON.stringify(search)).toBe(false);
    }
    expect(markingDeskSearch.parse({})).toEqual({
      criterionId: undefined,
      cohortId: undefined,
      status: undefined,
      page: 1,
      pageSize: DEFAULT_DESK_PAGE_SIZE,
      studentId: undefined,
      afterId: undefined,
    });
  });
});
