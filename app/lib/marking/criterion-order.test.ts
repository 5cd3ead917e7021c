import { describe, expect, it } from "vitest";
import { orderForCriterion, type OrderEvidence } from "./criterion-order";
import type { RubricCriterion } from "./rubric";

const criterion = (autoRule: RubricCriterion["autoRule"], autoParams: RubricCriterion["autoParams"] = {}) =>
  ({ kind: autoRule ? "auto" : "levels", autoRule, autoParams }) as const;
const handIn = (figure: number | null, dropCount = 10, strayDropCount = 0) => ({ figure, dropCount, strayDropCount });
const row = (name: string, evidence: Partial<OrderEvidence>): OrderEvidence & { name: string } => ({
  name,
  status: "on-time",
  handIn: handIn(1),
  classLabel: null,
  ...evidence,
});

const names = (ordered: { rows: { row: { name: string }; band: string }[] }) =>
  ordered.rows.map((entry) => `${entry.band}:${entry.row.name}`);

describe("the desk's order for a criterion", () => {
  it("puts the figures furthest from the reference first, those beyond the tolerance in their own band", () => {
    const rows = [
      row("a", { handIn: handIn(1.02) }),
      row("b", { handIn: handIn(0.8) }),
      row("c", { handIn: handIn(1.3) }),
      row("d", { handIn: null }),
    ];
    const ordered = orderForCriterion(criterion("within_reference", { tolerancePercent: 10 }), rows, 5);
    expect(names(ordered)).toEqual(["beyond:c", "beyond:b", "within:a", "nothing:d"]);
    expect(ordered.bands.map((band) => band.title)).toEqual([
      "Beyond ±10 % of the reference",
      "Within ±10 % of the reference",
      "Nothing handed in",
    ]);
  });

  it("goes by the class label for the class criterion, outliers first", () => {
    const rows = [
      row("a", { classLabel: { label: "consistent" } }),
      row("b", { classLabel: { label: "outlier" } }),
      row("c", { classLabel: { label: "suspect" } }),
      row("d", { handIn: handIn(null) }),
    ];
    expect(names(orderForCriterion(criterion("not_outlier"), rows, 5))).toEqual(["outlier:b", "suspect:c", "consistent:a", "uncompared:d"]);
  });

  it("goes by the drop log for drops and for manual criteria, keeping the given order among equals", () => {
    const rows = [row("a", {}), row("b", { handIn: handIn(1, 3) }), row("c", { handIn: handIn(1, 10, 2) }), row("d", {})];
    const drops = orderForCriterion(criterion("required_drops"), rows, 5);
    expect(names(drops)).toEqual(["fewer:b", "enough:a", "enough:c", "enough:d"]);
    expect(drops.bands[0].title).toBe("Fewer than the 5 drops required");
    expect(orderForCriterion(criterion("required_drops"), rows, 1).bands[0].title).toBe("At least the 1 drop required");
    expect(names(orderForCriterion(criterion(null), rows, 5))).toEqual(["strays:c", "few-drops:b", "clean:a", "clean:d"]);
  });
});
