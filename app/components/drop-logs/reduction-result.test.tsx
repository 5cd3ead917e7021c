import { renderToStaticMarkup } from "react-dom/server";
import { describe, expect, it } from "vitest";
import { reduceDropLog, type DropLogReduction, type KitRecordsInput, type LabSettings } from "~/lib/drop-logs/reduce-drop-log";
import { ReductionResult } from "./reduction-result";

const lab: LabSettings = {
  kind: "drag",
  wallCorrection: "haberman-sayre",
  dragModel: "schiller-naumann",
  requiredDrops: 5,
  resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
};
// Invented parts; the sixth drop is mistimed so a stray drop is flagged.
const kit: KitRecordsInput = {
  sphere: { id: "s", label: "S-1", material: "steel", diameterMm: 2, diameterResolutionMm: null, massG: 0.0327, massResolutionG: null },
  fluidLot: {
    id: "f",
    label: "GLY-1",
    fluidName: "glycerol",
    densityKgM3: 1261,
    calibration: [
      { temperatureC: 20, viscosityPaS: 1.41 },
      { temperatureC: 25, viscosityPaS: 0.95 },
      { temperatureC: 30, viscosityPaS: 0.61 },
    ],
  },
  column: { id: "c", label: "C-1", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: null },
};
const result = reduceDropLog({
  lab,
  kit,
  input: { sphereId: "s", temperatureC: 22, drops: [11.2, 11.3, 11.1, 11.25, 11.15, 11.2, 11.3, 11.1, 11.25, 12.9] },
});

function render(reduction: DropLogReduction["reduction"], budgetOpen: boolean) {
  return renderToStaticMarkup(
    <ReductionResult
      reduction={reduction}
      normalisedFigure={result.normalisedFigure}
      kitRecords={result.kitRecords}
      warnings={result.warnings}
      temperatureC={22}
      budgetOpen={budgetOpen}
    />,
  );
}

describe("ReductionResult", () => {
  const markup = render(result.reduction, false);

  it("gives C_D rounded to its expanded uncertainty, with k", () => {
    const budget = result.reduction.uncertaintyBudget;
    expect(budget.expanded).toBeGreaterThan(0);
    expect(markup).toMatch(/± U with k = \d/);
    expect(markup).toContain(" ± ");
  });

  it("shows the budget as a captioned table with column and row headers, collapsed unless staff open it", () => {
    expect(markup).toMatch(/<details[^>]*><summary/);
    expect(markup).not.toMatch(/<details open/);
    expect(render(result.reduction, true)).toMatch(/<details open=""/);
    expect(markup).toContain("<caption");
    expect(markup).toContain('<th scope="col"');
    expect(markup).toContain("Sphere diameter d</th>");
    expect(markup).toContain("Effective degrees of freedom");
  });

  it("shows info notes as well as warnings, each with its level in words", () => {
    expect(result.warnings.some((warning) => warning.level === "info")).toBe(true);
    expect(markup).toContain("Note:</span>");
    expect(markup).toContain("Warning:</span>");
  });

  it("gives the results with and without the stray drop and says the all-drops result counts", () => {
    expect(result.reduction.withoutStrayDrops).not.toBeNull();
    expect(markup).toContain("Without stray drop 10");
    expect(markup).toMatch(/All drops<span[^>]*>counts<\/span>/);
  });

  it("names the parts used with their recorded values", () => {
    expect(markup).toContain("Sphere S-1");
    expect(markup).toContain("d = 2 mm, m = 0.0327 g");
    expect(markup).toContain("Fluid lot GLY-1");
    expect(markup).toContain("bore 40 mm");
  });

  it("reads ∞ back from a stored budget, where JSON has turned it into null", () => {
    const stored = JSON.parse(JSON.stringify(result.reduction)) as DropLogReduction["reduction"];
    expect(stored.uncertaintyBudget.rows[0].degreesOfFreedom).toBeNull();
    expect(render(stored, true)).toContain('<td class="py-1 pr-3">∞</td>');
  });

  it("copes with a version stored before budgets were kept", () => {
    const { uncertaintyBudget: _dropped, ...older } = result.reduction;
    const oldMarkup = render(older as DropLogReduction["reduction"], false);
    expect(oldMarkup).toContain("Not computed for this version");
    expect(oldMarkup).toContain("uncertainty not computed for this version");
  });
});
