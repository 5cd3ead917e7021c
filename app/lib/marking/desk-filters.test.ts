import { describe, expect, it } from "vitest";
import { markingDeskSearch, markingDeskSearchParams } from "./desk-filters";

describe("the desk's filters in the URL", () => {
  it("read back what they write, defaults left out", () => {
    const filters = {
      cohortId: "00000000-0000-4000-8000-000000000001",
      status: "flagged" as const,
      sort: { by: "total" as const, direction: "desc" as const },
      page: 2,
      pageSize: 100,
    };
    const params = markingDeskSearchParams(filters);
    expect(params.toString()).toBe("cohort=00000000-0000-4000-8000-000000000001&status=flagged&sort=-total&page=2&pageSize=100");
    expect(markingDeskSearch.parse(Object.fromEntries(params))).toEqual(filters);
    expect(markingDeskSearchParams({ page: 1, pageSize: 50 }).toString()).toBe("");
  });

  it("refuse values they do not know, and pages no desk has", () => {
    for (const search of [
      { status: "graded" },
      { sort: "shoe" },
      { page: "-3" },
      { page: "Infinity" },
      { page: "1234567890123456789012345" },
      { pageSize: "999" },
      { cohort: "nope" },
    ]) {
      expect(markingDeskSearch.safeParse(search).success, JSON.stringify(search)).toBe(false);
    }
    expect(markingDeskSearch.parse({})).toEqual({ cohortId: undefined, status: undefined, sort: undefined, page: 1, pageSize: 50 });
  });
});
