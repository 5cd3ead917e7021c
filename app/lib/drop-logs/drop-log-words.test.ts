import { describe, expect, it } from "vitest";
import { joinTimesQuestion } from "./drop-log-words";

describe("the drop log form's words", () => {
  it("asks how to join arriving times at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => joinTimesQuestion(n, "from the clipboard", n))).toEqual([
      "0 drop times from the clipboard, and the log already has 0 drops. Add them after the last drop, or replace the drops with them?",
      "1 drop time from the clipboard, and the log already has 1 drop. Add it after the last drop, or replace the drops with it?",
      "2 drop times from the clipboard, and the log already has 2 drops. Add them after the last drop, or replace the drops with them?",
    ]);
  });
});
