import { describe, expect, it } from "vitest";
import {
  leftOutSentence,
  nothingImportedSentence,
  partsImportedSentence,
  previewHeading,
  shownRowsSentence,
  tooManyRowsSentence,
} from "./import-words";

const atZeroOneTwo = (say: (n: number) => string) => [0, 1, 2].map(say);

describe("the CSV imports' words", () => {
  it("heads the preview at 0, 1 and 2 rows", () => {
    expect(atZeroOneTwo((n) => previewHeading(n, 0))).toEqual([
      "Preview: 0 rows, 0 with problems",
      "Preview: 1 row, 0 with problems",
      "Preview: 2 rows, 0 with problems",
    ]);
  });

  it("says which rows are left out at 0, 1 and 2", () => {
    expect(atZeroOneTwo(leftOutSentence)).toEqual([
      "0 rows with problems are left out: fix them in your file and import it again to add them.",
      "1 row with problems is left out: fix it in your file and import it again to add it.",
      "2 rows with problems are left out: fix them in your file and import it again to add them.",
    ]);
  });

  it("says how many rows a cut-short preview shows", () => {
    expect(atZeroOneTwo((n) => shownRowsSentence(0, n))).toEqual([
      "The first 0 of 0 rows are shown, those with problems first.",
      "The first 0 of 1 row is shown, those with problems first.",
      "The first 0 of 2 rows are shown, those with problems first.",
    ]);
    expect(shownRowsSentence(200, 1500)).toBe("The first 200 of 1,500 rows are shown, those with problems first.");
  });

  it("refuses a commit whose rows no longer pass, at 0, 1 and 2", () => {
    expect(atZeroOneTwo((n) => nothingImportedSentence(n, "kits"))).toEqual([
      "Nothing was imported: 0 rows have problems (the kits changed since the preview?).",
      "Nothing was imported: 1 row has problems (the kits changed since the preview?).",
      "Nothing was imported: 2 rows have problems (the kits changed since the preview?).",
    ]);
  });

  it("refuses a file over the limit", () => {
    expect(atZeroOneTwo((n) => tooManyRowsSentence(n, 1))).toEqual([
      "The file has 0 rows; import at most 1 at a time.",
      "The file has 1 row; import at most 1 at a time.",
      "The file has 2 rows; import at most 1 at a time.",
    ]);
  });

  it("says how many parts were imported, and which want a look, at 0, 1 and 2", () => {
    expect(atZeroOneTwo((n) => partsImportedSentence(n, []))).toEqual(["0 parts imported.", "1 part imported.", "2 parts imported."]);
    expect(partsImportedSentence(2, ["S-1"])).toBe("2 parts imported. 1 of them raises checks (S-1); open it to see why.");
    expect(partsImportedSentence(2, ["S-1", "S-2"])).toBe("2 parts imported. 2 of them raise checks (S-1, S-2); open them to see why.");
  });
});
