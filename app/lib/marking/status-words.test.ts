import { describe, expect, it } from "vitest";
import { handInStates, handInStatesOf, stateWords, type StateEvidence } from "./status-words";

const evidence = (extra: Partial<StateEvidence>): StateEvidence => ({
  status: "on-time",
  handIn: {},
  progress: "unmarked",
  flagged: false,
  handInChangedSinceMarked: false,
  needsRemarking: false,
  ...extra,
});

describe("the hand-in states", () => {
  it("name timing, scoring and the comparison, an on-time hand-in with no timing state", () => {
    expect(handInStatesOf(evidence({}))).toEqual(["to-score"]);
    expect(handInStatesOf(evidence({ status: "late", progress: "partial", flagged: true }))).toEqual([
      "after-due",
      "part-scored",
      "flagged",
    ]);
    expect(handInStatesOf(evidence({ status: "missing", handIn: null }))).toEqual(["absent"]);
    expect(handInStatesOf(evidence({ status: "not-due", handIn: null }))).toEqual(["awaited"]);
    expect(handInStatesOf(evidence({ progress: "marked" }))).toEqual(["scored"]);
    expect(handInStatesOf(evidence({ progress: "marked", handInChangedSinceMarked: true }))).toEqual(["relogged"]);
  });

  it("give every state its own word and its own shape", () => {
    expect(new Set(handInStates.map((state) => stateWords[state].word)).size).toBe(handInStates.length);
    expect(new Set(handInStates.map((state) => stateWords[state].shape)).size).toBe(handInStates.length);
    // The grade-book words stay out of the state names.
    for (const state of handInStates) expect(stateWords[state].word).not.toMatch(/late|missing/i);
  });
});
