import { AppError } from "~/lib/app-error";
import { describe, expect, it } from "vitest";
import { applyMarkChange, freezeSuggestions, markTotals, sameContent } from "./marks";
import type { RubricCriterion } from "./rubric";

const criterion = (id: string, rest: Partial<RubricCriterion>): RubricCriterion => ({
  id,
  position: 0,
  title: id,
  description: "",
  kind: "range",
  levels: null,
  minPoints: 0,
  maxPoints: 5,
  autoRule: null,
  autoParams: {},
  ...rest,
});
const method = criterion("00000000-0000-4000-8000-000000000001", {
  kind: "levels",
  levels: [
    { points: 0, description: "Missing" },
    { points: 2, description: "Partly right" },
    { points: 4, description: "Right" },
  ],
  maxPoints: 4,
});
const discussion = criterion("00000000-0000-4000-8000-000000000002", { kind: "range", minPoints: 0, maxPoints: 5 });
const drops = criterion("00000000-0000-4000-8000-000000000003", { kind: "auto", autoRule: "required_drops", maxPoints: 2 });
const rubric = [method, discussion, drops];

describe("mark totals", () => {
  it("add levels, points and suggestions, take the late penalty off, and never go below 0", () => {
    const scores = { [method.id]: { points: 4, level: 3 }, [discussion.id]: { points: 3.5 } };
    const totals = markTotals(rubric, { scores, latePenaltyPoints: 1 }, { [drops.id]: { points: 2, reason: "10 drops" } });
    expect(totals).toMatchObject({ subtotal: 9.5, total: 8.5, maxTotal: 11, complete: true });
    expect(totals.cells[drops.id].source).toBe("suggestion");
    expect(markTotals(rubric, { scores, latePenaltyPoints: 20 }, {}).total).toBe(0);
  });

  it("are incomplete while a criterion has neither points nor a suggestion", () => {
    expect(
      markTotals(
        rubric,
        { scores: { [method.id]: { points: 2, level: 2 } }, latePenaltyPoints: 0 },
        { [drops.id]: { points: 2, reason: "" } },
      ).complete,
    ).toBe(false);
  });

  it("read a level's points from the rubric, so a changed level carries through", () => {
    const edited = { ...method, levels: [method.levels![0], { points: 3, description: "Partly right" }, method.levels![2]] };
    expect(markTotals([edited], { scores: { [method.id]: { points: 2, level: 2 } }, latePenaltyPoints: 0 }, {}).total).toBe(3);
  });

  it("prefer an override to the suggestion", () => {
    const totals = markTotals(
      [drops],
      { scores: { [drops.id]: { points: 1, overrideReason: "two drops timed twice" } }, latePenaltyPoints: 0 },
      { [drops.id]: { points: 2, reason: "" } },
    );
    expect(totals.cells[drops.id]).toMatchObject({ points: 1, source: "override", suggestion: { points: 2 } });
  });
});

describe("applying a change", () => {
  it("stores a level with its points, and refuses a level the criterion does not have", () => {
    const content = applyMarkChange(rubric, null, { kind: "score", criterionId: method.id, level: 2 });
    expect(content.scores[method.id]).toEqual({ points: 2, level: 2 });
    expect(() => applyMarkChange(rubric, null, { kind: "score", criterionId: method.id, level: 4 })).toThrow(AppError);
  });

  it("keeps range points within the range", () => {
    expect(applyMarkChange(rubric, null, { kind: "score", criterionId: discussion.id, points: 4.5 }).scores[discussion.id]).toEqual({
      points: 4.5,
    });
    expect(() => applyMarkChange(rubric, null, { kind: "score", criterionId: discussion.id, points: 5.5 })).toThrow(/between 0 and 5/);
  });

  it("needs a reason to override an automatic criterion", () => {
    expect(() => applyMarkChange(rubric, null, { kind: "score", criterionId: drops.id, points: 1 })).toThrow(/why/);
    expect(
      applyMarkChange(rubric, null, { kind: "score", criterionId: drops.id, points: 1, overrideReason: "two drops were timed twice" })
        .scores[drops.id],
    ).toMatchObject({ points: 1 });
  });

  it("clears a criterion, except on a released mark", () => {
    const before = applyMarkChange(rubric, null, { kind: "score", criterionId: discussion.id, points: 3 });
    expect(applyMarkChange(rubric, before, { kind: "score", criterionId: discussion.id, points: null }).scores).toEqual({});
    expect(() => applyMarkChange(rubric, before, { kind: "score", criterionId: discussion.id, points: null }, { released: true })).toThrow(
      AppError,
    );
  });

  it("refuses a criterion of another rubric and a negative late penalty", () => {
    expect(() => applyMarkChange(rubric, null, { kind: "score", criterionId: "00000000-0000-4000-8000-000000000009", points: 1 })).toThrow(
      /not in the lab's rubric/,
    );
    expect(() => applyMarkChange(rubric, null, { kind: "latePenalty", points: -1 })).toThrow(AppError);
  });

  it("tells a change to the same values apart from a real one, whatever the key order", () => {
    const before = { scores: { [method.id]: { points: 2, level: 2 } }, feedback: "Good", latePenaltyPoints: 0 };
    expect(sameContent(before, applyMarkChange(rubric, before, { kind: "score", criterionId: method.id, level: 2 }))).toBe(true);
    expect(sameContent(before, applyMarkChange(rubric, before, { kind: "score", criterionId: method.id, level: 3 }))).toBe(false);
  });
});

describe("release", () => {
  it("writes in the suggestions that are not overridden, and only those", () => {
    const other = criterion("00000000-0000-4000-8000-000000000004", { kind: "auto", autoRule: "on_time", maxPoints: 1 });
    const frozen = freezeSuggestions(
      [drops, other],
      { [other.id]: { points: 0, overrideReason: "handed in by e-mail" } },
      { [drops.id]: { points: 2, reason: "" }, [other.id]: { points: 1, reason: "" } },
    );
    expect(frozen).toEqual({ [drops.id]: { points: 2, frozen: true }, [other.id]: { points: 0, overrideReason: "handed in by e-mail" } });
  });
});
