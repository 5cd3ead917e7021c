import { describe, expect, it } from "vitest";
import { counted, plural } from "./plural";

// English (CLDR plural rules, as Intl.PluralRules implements them): only exactly 1 takes the singular;
// 0 and fractions such as 1.5 take the plural.
describe("counts in words", () => {
  it("agrees at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => counted(n, "point", "points"))).toEqual(["0 points", "1 point", "2 points"]);
    expect([0, 1, 2].map((n) => `There ${plural(n, "is", "are")} ${counted(n, "hour", "hours")} left`)).toEqual([
      "There are 0 hours left",
      "There is 1 hour left",
      "There are 2 hours left",
    ]);
  });

  it("writes large numbers with a thousands separator, and halves in the plural", () => {
    expect(counted(1200, "row", "rows")).toBe("1,200 rows");
    expect(counted(1.5, "point", "points")).toBe("1.5 points");
  });
});
