import { describe, expect, it } from "vitest";
import { evaluateAutoCriterion, suggestAutomaticCriteria, type HandInEvidence } from "./automatic-criteria";
import type { RubricCriterion } from "./rubric";

const auto = (
  autoRule: RubricCriterion["autoRule"],
  maxPoints: number,
  autoParams: RubricCriterion["autoParams"] = {},
): RubricCriterion => ({
  id: `c-${autoRule}`,
  position: 0,
  title: String(autoRule),
  description: "",
  kind: "auto",
  levels: null,
  minPoints: 0,
  maxPoints,
  autoRule,
  autoParams,
});
const handIn: HandInEvidence = {
  handedIn: true,
  late: false,
  dropCount: 10,
  requiredDrops: 10,
  figure: 1.04,
  classLabel: "consistent",
  classReason: "drag 2 % above the class median",
};

describe("automatic criteria", () => {
  it("give every rule 0 for a missing hand-in", () => {
    const rubric = [
      auto("required_drops", 2),
      auto("within_reference", 3, { tolerancePercent: 10 }),
      auto("not_outlier", 2),
      auto("on_time", 1),
    ];
    const suggestions = suggestAutomaticCriteria(rubric, { ...handIn, handedIn: false });
    expect(Object.values(suggestions).map((suggestion) => suggestion.points)).toEqual([0, 0, 0, 0]);
  });

  it("award the required drops only when the reduction has at least the lab's number", () => {
    const rule = auto("required_drops", 2);
    expect(evaluateAutoCriterion(rule, handIn).points).toBe(2);
    expect(evaluateAutoCriterion(rule, { ...handIn, dropCount: 9 }).points).toBe(0);
    expect(evaluateAutoCriterion(rule, { ...handIn, dropCount: null }).points).toBeNull();
  });

  it("compare the normalised figure with 1 within the tolerance, both sides, the bound included", () => {
    const rule = auto("within_reference", 3, { tolerancePercent: 5 });
    expect(evaluateAutoCriterion(rule, handIn).points).toBe(3);
    expect(evaluateAutoCriterion(rule, { ...handIn, figure: 0.94 }).points).toBe(0);
    expect(evaluateAutoCriterion(rule, { ...handIn, figure: 1.06 }).points).toBe(0);
    expect(evaluateAutoCriterion(rule, { ...handIn, figure: 0.95 }).points).toBe(3);
    expect(evaluateAutoCriterion(rule, { ...handIn, figure: null }).points).toBeNull();
  });

  it("follow the class label: consistent all, suspect the suspect points (half by default), outlier none", () => {
    expect(evaluateAutoCriterion(auto("not_outlier", 3), handIn)).toMatchObject({
      points: 3,
      reason: expect.stringContaining("2 % above the class median"),
    });
    expect(evaluateAutoCriterion(auto("not_outlier", 3), { ...handIn, classLabel: "suspect" }).points).toBe(1.5);
    expect(evaluateAutoCriterion(auto("not_outlier", 3, { suspectPoints: 1 }), { ...handIn, classLabel: "suspect" }).points).toBe(1);
    expect(evaluateAutoCriterion(auto("not_outlier", 3), { ...handIn, classLabel: "outlier" }).points).toBe(0);
    expect(evaluateAutoCriterion(auto("not_outlier", 3), { ...handIn, classLabel: null }).points).toBeNull();
  });

  it("leave the class criterion to a marker when the mark rests on a version the class comparison no longer labels", () => {
    expect(evaluateAutoCriterion(auto("not_outlier", 3), { ...handIn, classLabel: null, superseded: true })).toMatchObject({
      points: null,
      reason: expect.stringContaining("earlier version"),
    });
    // The other rules read the marked version itself, so they still decide.
    expect(evaluateAutoCriterion(auto("required_drops", 2), { ...handIn, superseded: true }).points).toBe(2);
  });

  it("take the late penalty off the on-time criterion, never below 0", () => {
    expect(evaluateAutoCriterion(auto("on_time", 2, { latePenaltyPoints: 0.5 }), handIn).points).toBe(2);
    expect(evaluateAutoCriterion(auto("on_time", 2, { latePenaltyPoints: 0.5 }), { ...handIn, late: true }).points).toBe(1.5);
    expect(evaluateAutoCriterion(auto("on_time", 2), { ...handIn, late: true }).points).toBe(0);
  });

  it("give their reasons in words that agree with the counts at 0, 1 and 2", () => {
    const drops = auto("required_drops", 2);
    expect([0, 1, 2].map((n) => evaluateAutoCriterion(drops, { ...handIn, dropCount: n, requiredDrops: 1 }).reason)).toEqual([
      "0 drops, fewer than the 1 required.",
      "1 drop, at least the 1 required.",
      "2 drops, at least the 1 required.",
    ]);
    expect(
      [0, 1, 2].map((n) => evaluateAutoCriterion(auto("on_time", 2, { latePenaltyPoints: n }), { ...handIn, late: true }).reason),
    ).toEqual(["Handed in late: 0 points off.", "Handed in late: 1 point off.", "Handed in late: 2 points off."]);
  });
});
