import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { PartBiasEvidence } from "./part-bias";

const comparison = {
  labId: "lab-1",
  labTitle: "Glycerol viscometry",
  mode: "viscometry" as const,
  n: 6,
  peerCount: 24,
  peerParts: 4,
  relativeToPeers: 0.1,
  t: 6.9,
  degreesOfFreedom: 7.4,
  pValue: 0.0002,
  holmLevel: 0.01,
  flagged: true,
  mayOpenComparison: true,
};

describe("PartBiasEvidence", () => {
  it("names the peer comparison and Holm's level, and never a test against 1", () => {
    const markup = renderToStaticMarkup(
      <PartBiasEvidence
        courseId="c"
        bias={{ alpha: 0.05, flagged: true, testsInFamily: 5, comparisons: [comparison], handIns: [], otherHandIns: 0 }}
      />,
    );
    expect(markup).toContain("re-measure: differs from peers");
    expect(markup).toContain("Welch&#x27;s t = 6.9, 7.4 degrees of freedom, p = 0.0002 against Holm&#x27;s level 0.01");
    expect(markup).toContain("+10 % from the 24 hand-ins with 4 other parts of its kind");
    expect(markup).not.toMatch(/against 0|One-sample/);
  });

  it("says why a part was not tested", () => {
    const untested = {
      ...comparison,
      peerCount: 0,
      peerParts: 1,
      relativeToPeers: null,
      t: null,
      degreesOfFreedom: null,
      pValue: null,
      holmLevel: null,
      flagged: false,
    };
    const markup = renderToStaticMarkup(
      <PartBiasEvidence
        courseId="c"
        bias={{ alpha: 0.05, flagged: false, testsInFamily: 0, comparisons: [untested], handIns: [], otherHandIns: 0 }}
      />,
    );
    expect(markup).toContain("no test: it needs at least 3 hand-ins with this part and 3 with at least 2 other parts of its kind");
  });
});
