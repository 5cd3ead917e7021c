import { describe, expect, it } from "vitest";
import { comparisonLimits, labelClass, previewSettings } from "./class-labelling";
import { countLabels, describeSettings, type ComparisonSettings } from "./comparison-settings";

const grubbs: ComparisonSettings = { method: "grubbs", alpha: 0.05, maxOutliers: 3, k: 1.5 };
const tukey: ComparisonSettings = { ...grubbs, method: "iqr" };

// The comparison tests ln(figure), so figures e^x put the published values x themselves under test.
const asFigures = (values: number[]) => values.map((value, index) => ({ id: `h${index}`, figure: Math.exp(value) }));
// Grubbs' G is unchanged by x → (x − 200)/100, which keeps the figures near 1 (and the reasons readable).
const rescaled = (values: number[]) => values.map((value) => (value - 200) / 100);

describe("class labels against published and hand-worked examples", () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods §1.3.5.17.1, Grubbs' test example data, with
  // G = 2.4687 for 245.57 (from memory). The two-sided critical value G(0.05, 8) = 2.126 is in the table
  // of LibreTexts Analytical Chemistry, Appendix 07 "Critical Values for Grubb's Test" (checked with the search tool).
  const nist = rescaled([199.31, 199.53, 200.19, 200.82, 201.92, 201.95, 202.18, 245.57]);

  it("labels the NIST/SEMATECH Grubbs example's 245.57 an outlier with G = 2.47 > 2.13", () => {
    const results = labelClass(asFigures(nist), grubbs, "viscosity");
    expect(results[7].label).toBe("outlier");
    expect(results[7].reason).toMatch(/Grubbs G = 2\.47 > 2\.13 at α = 0\.05, n = 8$/);
    // By hand, the other seven: mean 200.843, s = 1.2024, largest G = 1.533/1.2024 = 1.27, below any critical value near 1.9.
    expect(results.slice(0, 7).every((result) => result.label === "consistent")).toBe(true);
  });

  // Tukey's fences (Tukey 1977) with type-7 quartiles (Hyndman & Fan 1996, R's default — from memory),
  // worked by hand on ln figures −0.04 −0.02 −0.01 0 0 0.01 0.02 0.09 0.30 (n = 9):
  // Q1 at h = 8·0.25 = 2 → −0.01; Q3 at h = 6 → 0.02; IQR = 0.03. Upper inner fence 0.02 + 1.5·0.03 = 0.065,
  // outer 0.02 + 3·0.03 = 0.11; lower inner −0.055. So 0.09 is suspect, 0.30 an outlier, −0.04 consistent.
  const worked = [-0.04, -0.02, -0.01, 0, 0, 0.01, 0.02, 0.09, 0.3];

  it("labels the hand-worked Tukey example: 0.09 suspect, 0.30 outlier", () => {
    const labels = labelClass(asFigures(worked), tukey, "drag").map((result) => result.label);
    expect(labels).toEqual([
      "consistent",
      "consistent",
      "consistent",
      "consistent",
      "consistent",
      "consistent",
      "consistent",
      "suspect",
      "outlier",
    ]);
    const limits = comparisonLimits(
      asFigures(worked).map((entry) => entry.figure),
      tukey,
    );
    expect(Math.log(limits!.inner[1])).toBeCloseTo(0.065, 10);
    expect(Math.log(limits!.outer![1])).toBeCloseTo(0.11, 10);
    expect(Math.log(limits!.inner[0])).toBeCloseTo(-0.055, 10);
  });

  it("draws the Grubbs limits of the first step where the NIST example's critical value puts them", () => {
    const limits = comparisonLimits(
      asFigures(nist).map((entry) => entry.figure),
      grubbs,
    )!;
    const mean = nist.reduce((sum, value) => sum + value, 0) / nist.length;
    // G = (x₈ − mean)/s = 2.4687 (NIST), so s = (x₈ − mean)/2.4687 and the upper limit is mean + 2.126·s.
    const s = (nist[7] - mean) / 2.4687;
    expect(Math.log(limits.inner[1])).toBeCloseTo(mean + 2.126 * s, 3);
  });

  it("previews the chosen setting first, then three Grubbs levels, three ESD levels and three fence factors", () => {
    const previews = previewSettings(asFigures(worked), tukey, "drag");
    expect(previews.map((preview) => preview.description)).toHaveLength(10);
    expect(previews[4].description).toBe("generalized ESD test, α = 0.01, up to r = 3 outliers");
    expect(previews[0].counts).toEqual(countLabels(labelClass(asFigures(worked), tukey, "drag")));
    expect(previews[0].counts).toEqual({ consistent: 7, suspect: 1, outlier: 1 });
  });
});

describe("the comparison settings in words", () => {
  it("count the removals and outliers allowed at 0, 1 and 2", () => {
    expect([0, 1, 2].map((maxOutliers) => describeSettings({ ...grubbs, maxOutliers }))).toEqual([
      "Grubbs' test, α = 0.05, at most 0 removals",
      "Grubbs' test, α = 0.05, at most 1 removal",
      "Grubbs' test, α = 0.05, at most 2 removals",
    ]);
    expect([0, 1, 2].map((maxOutliers) => describeSettings({ ...grubbs, method: "esd", maxOutliers }))).toEqual([
      "generalized ESD test, α = 0.05, up to r = 0 outliers",
      "generalized ESD test, α = 0.05, up to r = 1 outlier",
      "generalized ESD test, α = 0.05, up to r = 2 outliers",
    ]);
  });
});
