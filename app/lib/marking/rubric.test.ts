import { describe, expect, it } from "vitest";
import { criterionColumns, describeAutoRule, rubricInput } from "./rubric";

describe("the rubric schema", () => {
  it("accepts levels, a range and automatic rules, and stores a levels criterion's lowest and highest level", () => {
    const parsed = rubricInput.parse({
      criteria: [
        {
          kind: "levels",
          title: "Method",
          levels: [
            { points: 1, description: "Some" },
            { points: 4, description: "All" },
          ],
        },
        { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 6 },
        { kind: "auto", title: "Close to the reference", rule: "within_reference", maxPoints: 3, params: { tolerancePercent: 10 } },
      ],
    });
    expect(criterionColumns(parsed.criteria[0])).toMatchObject({ minPoints: 1, maxPoints: 4, autoRule: null });
    expect(criterionColumns(parsed.criteria[2])).toMatchObject({ autoRule: "within_reference", autoParams: { tolerancePercent: 10 } });
  });

  it("refuses a tolerance rule without its tolerance, a reversed range, ten levels and a repeated criterion", () => {
    const fails = (criteria: unknown[]) => !rubricInput.safeParse({ criteria }).success;
    expect(fails([{ kind: "auto", title: "Close", rule: "within_reference", maxPoints: 3 }])).toBe(true);
    expect(fails([{ kind: "range", title: "Discussion", minPoints: 5, maxPoints: 2 }])).toBe(true);
    expect(
      fails([{ kind: "levels", title: "Method", levels: Array.from({ length: 10 }, (_, i) => ({ points: i, description: `L${i}` })) }]),
    ).toBe(true);
    const id = "00000000-0000-4000-8000-000000000001";
    expect(
      fails([
        { id, kind: "range", title: "A", minPoints: 0, maxPoints: 1 },
        { id, kind: "range", title: "B", minPoints: 0, maxPoints: 1 },
      ]),
    ).toBe(true);
  });

  it("describes what an automatic rule awards", () => {
    expect(describeAutoRule({ autoRule: "on_time", autoParams: { latePenaltyPoints: 1 }, maxPoints: 2 }, 10)).toBe(
      "2 points when handed in on time, 1 when late.",
    );
  });

  it("describes the points and drops of a rule in words that agree at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => describeAutoRule({ autoRule: "required_drops", autoParams: {}, maxPoints: n }, n))).toEqual([
      "0 points when the counted hand-in has at least the lab's 0 drops, none otherwise.",
      "1 point when the counted hand-in has at least the lab's 1 drop, none otherwise.",
      "2 points when the counted hand-in has at least the lab's 2 drops, none otherwise.",
    ]);
    expect(
      rubricInput.safeParse({
        criteria: [{ kind: "auto", title: "On time", rule: "on_time", maxPoints: 1, params: { latePenaltyPoints: 2 } }],
      }).error?.issues[0].message,
    ).toBe("At most the criterion's 1 point.");
  });
});
