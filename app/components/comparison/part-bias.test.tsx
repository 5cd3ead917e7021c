import { describe, expect, it } from "vitest";
import { comparisonText } from "./part-bias";

/** A tested lab comparison with `count` hand-ins, peer hand-ins, peer parts and tests in the family (the statistics are placeholders). */
const tested = (count: number) => ({
  labId: "lab",
  labTitle: "Drag lab",
  mode: "drag" as const,
  n: count,
  peerCount: count,
  peerParts: count,
  relativeToPeers: 0.05,
  t: 2.5,
  degreesOfFreedom: 12.3,
  pValue: 0.03,
  holmLevel: 0.05,
  flagged: true,
  mayOpenComparison: true,
});

describe("the part-bias evidence sentence", () => {
  it("agrees with its hand-ins, peer parts and tests at 0, 1 and 2", () => {
    const [zero, one, two] = [0, 1, 2].map((count) => comparisonText(tested(count), 0.05, count));
    expect(zero).toMatch(
      /^0 hand-ins with this part, \+5 % from the 0 hand-ins with 0 other parts of its kind .* over the course's 0 tests\)/,
    );
    expect(one).toMatch(/^1 hand-in with this part, \+5 % from the 1 hand-in with 1 other part of its kind .* over the course's 1 test\)/);
    expect(two).toMatch(
      /^2 hand-ins with this part, \+5 % from the 2 hand-ins with 2 other parts of its kind .* over the course's 2 tests\)/,
    );
  });

  it("says why there was no test, counting the hand-ins", () => {
    const untested = {
      ...tested(1),
      t: null,
      pValue: null,
      degreesOfFreedom: null,
      relativeToPeers: null,
      holmLevel: null,
      flagged: false,
    };
    expect(comparisonText(untested, 0.05, 3)).toMatch(/^1 hand-in with this part; no test: it needs at least \d+ hand-ins/);
  });
});
