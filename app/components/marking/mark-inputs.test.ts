import { describe, expect, it } from "vitest";
import { outOfBounds } from "./mark-inputs";

describe("outOfBounds", () => {
  it("lets through what is within the points, blank, or not a number yet", () => {
    expect(outOfBounds("3", { min: 0, max: 4 })).toBeNull();
    expect(outOfBounds("0,5", { min: 0, max: 4 })).toBeNull();
    expect(outOfBounds("", { min: 0, max: 4 })).toBeNull();
    expect(outOfBounds("-", { min: 0, max: 4 })).toBeNull();
  });
  it("says why a number outside them is refused, the points agreeing with the maximum at 0, 1 and 2", () => {
    expect(outOfBounds("7", { min: 0, max: 4 })).toBe("7 is not taken: give between 0 and 4 points.");
    expect(outOfBounds("-1", { min: 0, max: 2 })).toBe("-1 is not taken: give between 0 and 2 points.");
    expect(outOfBounds("2", { min: 0, max: 1 })).toBe("2 is not taken: give between 0 and 1 point.");
    expect(outOfBounds("1", { min: 0, max: 0 })).toBe("1 is not taken: give between 0 and 0 points.");
  });
});
