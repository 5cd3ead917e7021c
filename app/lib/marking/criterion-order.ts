/**
 * The order in which the desk lays out the class for one criterion: by what decides that criterion,
 * in bands (the groups a bulk action can take at once), the hand-ins most in need of a look first.
 * The class-comparison criterion goes by the class label, the reference criterion by the figure's
 * distance from the reference, the drop-count and the manual criteria by the drop log itself (stray
 * drops, then too few drops), the timing criterion by the hand-in's timing. Pure.
 */
import { counted } from "~/lib/plural";
import type { HandInStanding } from "~/lib/drop-logs/hand-in-window";
import type { ClassComparisonLabel } from "~/lib/reduction";
import type { RubricCriterion } from "./rubric";

/** What the ordering reads of a desk row. */
export type OrderEvidence = {
  status: HandInStanding;
  handIn: { figure: number | null; dropCount: number | null; strayDropCount: number | null } | null;
  classLabel: { label: ClassComparisonLabel } | null;
};

export type Band = { key: string; title: string };
type Placed = Band & { rank: number; within: number };

const nothing: Placed = { key: "nothing", title: "Nothing handed in", rank: 99, within: 0 };

/** What the criterion is decided by, in words, for the desk's heading. */
export function decidedBy(criterion: Pick<RubricCriterion, "kind" | "autoRule">): string {
  switch (criterion.kind === "auto" ? criterion.autoRule : null) {
    case "not_outlier":
      return "the class-comparison label";
    case "within_reference":
      return "the figure's distance from the reference";
    case "required_drops":
      return "the number of drops";
    case "on_time":
      return "the hand-in's timing";
    default:
      return "the drop log: stray drops first, then too few drops";
  }
}

function place(criterion: Pick<RubricCriterion, "kind" | "autoRule" | "autoParams">, row: OrderEvidence, requiredDrops: number): Placed {
  const handIn = row.handIn;
  if (!handIn) return nothing;
  const figure = handIn.figure !== null && handIn.figure > 0 ? handIn.figure : null;
  switch (criterion.kind === "auto" ? criterion.autoRule : null) {
    case "not_outlier": {
      // The comparison works in log space, so the distance from the class is read there too.
      const within = figure === null ? 0 : -Math.abs(Math.log(figure));
      if (row.classLabel?.label === "outlier") return { key: "outlier", title: "Outliers in the class comparison", rank: 0, within };
      if (row.classLabel?.label === "suspect") return { key: "suspect", title: "Suspect in the class comparison", rank: 1, within };
      if (row.classLabel?.label === "consistent") return { key: "consistent", title: "Consistent with the class", rank: 2, within };
      return { key: "uncompared", title: "Not in the class comparison", rank: 3, within: 0 };
    }
    case "within_reference": {
      const tolerance = criterion.autoParams.tolerancePercent ?? 0;
      if (figure === null) return { key: "no-figure", title: "No figure to compare", rank: 2, within: 0 };
      const off = Math.abs(figure - 1);
      // The same hair's width for binary rounding as the rule itself.
      return off <= tolerance / 100 + 1e-12
        ? { key: "within", title: `Within ±${tolerance} % of the reference`, rank: 1, within: -off }
        : { key: "beyond", title: `Beyond ±${tolerance} % of the reference`, rank: 0, within: -off };
    }
    case "required_drops": {
      const required = counted(requiredDrops, "drop", "drops");
      if (handIn.dropCount === null) return { key: "unknown", title: "Drop count unknown", rank: 2, within: 0 };
      return handIn.dropCount < requiredDrops
        ? { key: "fewer", title: `Fewer than the ${required} required`, rank: 0, within: handIn.dropCount }
        : { key: "enough", title: `At least the ${required} required`, rank: 1, within: handIn.dropCount };
    }
    case "on_time":
      return row.status === "late"
        ? { key: "after-due", title: "Handed in after the due time", rank: 0, within: 0 }
        : { key: "in-time", title: "Handed in by the due time", rank: 1, within: 0 };
    default: {
      const strays = handIn.strayDropCount ?? 0;
      if (strays > 0) return { key: "strays", title: "With stray drops", rank: 0, within: -strays };
      if (handIn.dropCount !== null && handIn.dropCount < requiredDrops)
        return { key: "few-drops", title: "Fewer drops than required", rank: 1, within: handIn.dropCount };
      return { key: "clean", title: "Clean drop logs", rank: 2, within: -(handIn.dropCount ?? 0) };
    }
  }
}

/**
 * The rows in the criterion's order with each one's band, and the bands in that order. The sort is
 * stable, so rows that decide alike keep the order they came in (by name).
 */
export function orderForCriterion<Row extends OrderEvidence>(
  criterion: Pick<RubricCriterion, "kind" | "autoRule" | "autoParams">,
  rows: readonly Row[],
  requiredDrops: number,
): { rows: { row: Row; band: string }[]; bands: Band[] } {
  const placed = rows.map((row) => ({ row, at: place(criterion, row, requiredDrops) }));
  placed.sort((a, b) => a.at.rank - b.at.rank || a.at.within - b.at.within);
  const bands = new Map<string, Band>();
  for (const { at } of placed) if (!bands.has(at.key)) bands.set(at.key, { key: at.key, title: at.title });
  return { rows: placed.map(({ row, at }) => ({ row, band: at.key })), bands: [...bands.values()] };
}
