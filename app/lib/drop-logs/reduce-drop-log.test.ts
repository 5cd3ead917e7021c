import { describe, expect, it } from "vitest";
import { calibrationUncertainty, fitFluidViscosity, viscosityAt } from "~/lib/reduction";
import { reduceDropLog, type KitRecordsInput, type LabSettings } from "./reduce-drop-log";

const lab: LabSettings = {
  kind: "viscometry",
  wallCorrection: "haberman-sayre",
  dragModel: "schiller-naumann",
  requiredDrops: 5,
  resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5, thermometerAccuracyC: 0.3 },
};
// Invented lot and parts, glycerol-like.
const calibration = [
  { temperatureC: 15, viscosityPaS: 2.2 },
  { temperatureC: 20, viscosityPaS: 1.41 },
  { temperatureC: 25, viscosityPaS: 0.95 },
  { temperatureC: 30, viscosityPaS: 0.61 },
];
const kit: KitRecordsInput = {
  sphere: { id: "s", label: "S-1", material: "steel", diameterMm: 2, diameterResolutionMm: null, massG: 0.0327, massResolutionG: null },
  fluidLot: {
    id: "f",
    label: "GLY-1",
    fluidName: "glycerol",
    densityKgM3: 1261,
    densityUncertaintyKgM3: 0.8,
    densityTemperatureCoefficientKgM3K: -0.65,
    calibration,
  },
  column: { id: "c", label: "C-1", innerDiameterMm: 40, innerDiameterUncertaintyMm: 0.05, timedDistanceMm: 200, runInMm: 100 },
};
const input = { sphereId: "s", temperatureC: 23, drops: [11.2, 11.3, 11.1, 11.25, 11.15] };

describe("reduceDropLog — uncertainty inputs", () => {
  const result = reduceDropLog({ lab, kit, input });
  const rows = result.reduction.uncertaintyBudget.rows;
  const row = (name: string) => rows.find((candidate) => candidate.input === name);

  it("corrects ρf to the drop temperature from 20 °C with the lot's dρ/dT", () => {
    // 1261 − 0.65 · (23 − 20) = 1259.05 kg/m³
    expect(result.kitRecords.fluidLot.densityAtTemperatureKgM3).toBeCloseTo(1259.05, 10);
    expect(row("Fluid density ρf")?.value).toBeCloseTo(1259.05, 10);
    expect(row("Fluid density ρf")?.standardUncertainty).toBe(0.8);
  });

  it("combines the thermometer's resolution (r/√12) and accuracy (a/√3) into u(T)", () => {
    expect(result.kitRecords.standardUncertainties.temperature).toBeCloseTo(Math.sqrt(0.5 ** 2 / 12 + 0.3 ** 2 / 3), 12);
    expect(row("Fluid temperature T")?.standardUncertainty).toBeCloseTo(Math.sqrt(0.5 ** 2 / 12 + 0.3 ** 2 / 3), 12);
  });

  it("takes u(D) from the column record, and from the lab's diameter resolution without one", () => {
    expect(row("Column bore D")?.standardUncertainty).toBeCloseTo(0.05e-3, 15);
    const without = reduceDropLog({ lab, kit: { ...kit, column: { ...kit.column, innerDiameterUncertaintyMm: null } }, input });
    expect(
      without.reduction.uncertaintyBudget.rows.find((candidate) => candidate.input === "Column bore D")?.standardUncertainty,
    ).toBeCloseTo(0.01e-3 / Math.sqrt(12), 15);
  });

  it("gives μ/μ_ref(T) the lot's calibration uncertainty at T with N − 2 degrees of freedom", () => {
    const fit = fitFluidViscosity(calibration.map((point) => ({ temperature: point.temperatureC, viscosity: point.viscosityPaS })));
    expect(result.kitRecords.standardUncertainties.fluidViscosity).toBeCloseTo(
      calibrationUncertainty(fit, 23).relative * viscosityAt(fit, 23),
      12,
    );
    const figure = result.reduction.uncertaintyBudget.normalisedFigure!;
    expect(figure.value).toBeCloseTo(result.normalisedFigure!, 12);
    // The figure's uncertainty exceeds μ's own relative one: it adds T (through μ_ref) and the calibration.
    expect(figure.combined / figure.value).toBeGreaterThan(
      result.reduction.uncertaintyBudget.combined / result.reduction.uncertaintyBudget.value,
    );
  });

  it("reads a lab saved before the thermometer accuracy existed with the ±0.5 K default", () => {
    const { thermometerAccuracyC: _omitted, ...older } = lab.resolutions;
    const old = reduceDropLog({ lab: { ...lab, resolutions: older }, kit, input });
    expect(old.kitRecords.standardUncertainties.temperature).toBeCloseTo(Math.sqrt(0.5 ** 2 / 12 + 0.5 ** 2 / 3), 12);
  });
});

describe("reduceDropLog — the column's margin below the lower band", () => {
  it("passes the recorded margin to the end-effect check, and keeps it with the kit's records", () => {
    const close = reduceDropLog({ lab, kit: { ...kit, column: { ...kit.column, marginBelowMm: 15 } }, input });
    // Bore 40 mm: one column radius is 20 mm, more than the 15 mm left below the band (Tanner 1963).
    expect(close.warnings).toContainEqual(expect.objectContaining({ code: "margin-below-too-short", level: "warn", field: "form" }));
    expect(close.kitRecords.column.marginBelowMm).toBe(15);
    const clear = reduceDropLog({ lab, kit: { ...kit, column: { ...kit.column, marginBelowMm: 25 } }, input });
    expect(clear.warnings.map((warning) => warning.code)).not.toContain("margin-below-too-short");
  });
});
