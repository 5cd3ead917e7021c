import { describe, expect, it } from "vitest";
import { trackingImportedSentence } from "./tracking-words";

describe("the tracking import's outcome", () => {
  it("agrees with its numbers at 0, 1 and 2", () => {
    expect([0, 1, 2].map((n) => trackingImportedSentence({ direction: "outbound", moved: n, corrected: n, unchanged: n }))).toEqual([
      "Imported: 0 kits in transit (their students are e-mailed), 0 parcels corrected, 0 already up to date.",
      "Imported: 1 kit in transit (its student is e-mailed), 1 parcel corrected, 1 already up to date.",
      "Imported: 2 kits in transit (their students are e-mailed), 2 parcels corrected, 2 already up to date.",
    ]);
    expect(trackingImportedSentence({ direction: "return", moved: 1, corrected: 0, unchanged: 2 })).toBe(
      "Imported: 1 kit coming back, 0 parcels corrected, 2 already up to date.",
    );
  });
});
