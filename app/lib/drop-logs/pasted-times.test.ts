import { describe, expect, it } from "vitest";
import { enteredTimes, joinTimes, splitPastedTimes } from "./pasted-times";

describe("splitPastedTimes", () => {
  it("reads one time per line, tab or semicolon, without a trailing unit or blank cells", () => {
    expect(splitPastedTimes("4.12\r\n4.08 s\n\n4.15\t4.10;4,11\n")).toEqual(["4.12", "4.08", "4.15", "4.10", "4,11"]);
  });
});

describe("joinTimes", () => {
  const typed = ["4.12", "", "4.08", ""];
  const column = ["5.01", "5.02", "5.03"];

  it("asks nothing of an empty log: it has no entered times", () => {
    expect(enteredTimes(["", "  "])).toEqual([]);
    expect(enteredTimes(typed)).toEqual(["4.12", "4.08"]);
  });

  it("appends the column after the typed times, dropping the blank rows between", () => {
    expect(joinTimes(typed, column, "append")).toEqual(["4.12", "4.08", "5.01", "5.02", "5.03"]);
  });

  it("replaces every typed time with the column", () => {
    expect(joinTimes(typed, column, "replace")).toEqual(column);
  });
});
