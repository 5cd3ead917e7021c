import { describe, expect, it } from "vitest";
import { markingDeskSearchParams, readMarkingDeskFilters } from "./desk-filters";

describe("the desk's filters in the URL", () => {
  it("read back what they write, defaults left out", () => {
    const filters = { cohortId: "00000000-0000-4000-8000-000000000001", status: "flagged" as const, sort: { by: "total" as const, direction: "desc" as const }, page: 2, pageSize: 100 };
    const params = markingDeskSearchParams(filters);
    expect(params.toString()).toBe("cohort=00000000-0000-4000-8000-000000000001&status=flagged&sort=-total&page=2&pageSize=100");
    expect(readMarkingDeskFilters(new URL(`http://x/?${params}`))).toEqual(filters);
    expect(markingDeskSearchParams({ page: 1, pageSize: 50 }).toString()).toBe("");
  });

  it("fall back to the defaults for values they do not know", () => {
    expect(readMarkingDeskFilters(new URL("http://x/?status=graded&sort=shoe&page=-3"))).toEqual({ cohortId: undefined, status: undefined, sort: undefined, page: 1, pageSize: 50 });
  });
});
