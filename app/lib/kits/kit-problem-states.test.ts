import { describe, expect, it } from "vitest";
import { canChangeProblem, kitProblemStatuses, nextProblemStatusesByHand, type KitProblemStatus } from "./kit-problem-states";

const legal: [KitProblemStatus, KitProblemStatus][] = [
  ["received", "replacement_sent"],
  ["received", "resolved"],
  ["replacement_sent", "resolved"],
];

describe("kit problem statuses", () => {
  it.each(legal)("allows %s → %s", (from, to) => {
    expect(canChangeProblem(from, to)).toBe(true);
  });

  it("refuses every other change, staying put included", () => {
    for (const from of kitProblemStatuses)
      for (const to of kitProblemStatuses)
        if (!legal.some(([a, b]) => a === from && b === to)) expect(canChangeProblem(from, to), `${from} → ${to}`).toBe(false);
  });

  it("offers by hand only what needs no part sent", () => {
    expect(nextProblemStatusesByHand("received")).toEqual(["resolved"]);
    expect(nextProblemStatusesByHand("replacement_sent")).toEqual(["resolved"]);
    expect(nextProblemStatusesByHand("resolved")).toEqual([]);
  });
});
