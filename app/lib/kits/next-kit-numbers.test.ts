import { describe, expect, it } from "vitest";
import { nextKitNumbers } from "./next-kit-numbers";

describe("nextKitNumbers", () => {
  it("counts on from the highest number of the prefix most kits use, keeping its width", () => {
    expect(nextKitNumbers(["K-01", "K-07", "K-03", "J-9", "spare"], 3)).toEqual(["K-08", "K-09", "K-10"]);
  });

  it("widens past the digits it has, and starts a course with no numbered kit at K-01", () => {
    expect(nextKitNumbers(["B99"], 2)).toEqual(["B100", "B101"]);
    expect(nextKitNumbers([], 2)).toEqual(["K-01", "K-02"]);
  });
});
