import { describe, expect, it } from "vitest";
import { addressesImportedSentence, addressPreviewHeading } from "./address-words";

describe("the address import's words", () => {
  it("heads the preview at 0, 1 and 2 rows", () => {
    expect([0, 1, 2].map((n) => addressPreviewHeading(n, { new: n, changed: 0, unchanged: 0, error: 0 }))).toEqual([
      "Preview: 0 rows — 0 new, 0 changed, 0 unchanged, 0 with problems",
      "Preview: 1 row — 1 new, 0 changed, 0 unchanged, 0 with problems",
      "Preview: 2 rows — 2 new, 0 changed, 0 unchanged, 0 with problems",
    ]);
  });

  it("says what an import wrote at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => addressesImportedSentence({ written: n, unchanged: n, skipped: n }))).toEqual([
      "Imported: 0 addresses written, 0 unchanged, 0 rows with problems left out.",
      "Imported: 1 address written, 1 unchanged, 1 row with problems left out.",
      "Imported: 2 addresses written, 2 unchanged, 2 rows with problems left out.",
    ]);
  });
});
