import { describe, expect, it } from "vitest";
import { timeLeftSentence, timeLeftWords } from "./deadline-words";

describe("the deadline reminder's time left", () => {
  it("agrees at 0, 1 and 2 hours, and counts whole hours", () => {
    expect([0, 1, 2].map(timeLeftWords)).toEqual(["less than an hour", "1 hour", "2 hours"]);
    expect([0, 1, 2].map(timeLeftSentence)).toEqual([
      "There is less than an hour left to hand in your drop log.",
      "There is 1 hour left to hand in your drop log.",
      "There are 2 hours left to hand in your drop log.",
    ]);
    expect(timeLeftSentence(24.6)).toBe("There are 24 hours left to hand in your drop log.");
  });
});
