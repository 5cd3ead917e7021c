import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import type { PartInput } from "./part-input";
import {
  checkImportHeaders,
  checkImportRows,
  csvRowToPartInput,
  inventoryCsv,
  parseCalibration,
  partToCsvRow,
  templateCsv,
} from "./parts-csv";

const parts: PartInput[] = [
  {
    kind: "sphere",
    label: "T-1",
    material: "glass",
    diameterMm: 4,
    diameterResolutionMm: 0.01,
    massG: 0.08,
    massResolutionG: undefined,
    notes: null,
  },
  {
    kind: "fluid_lot",
    label: "T-2",
    fluidName: "syrup, lot 7",
    densityKgM3: 1380,
    densityUncertaintyKgM3: 2.5,
    densityTemperatureCoefficientKgM3K: -0.7,
    calibration: [
      { temperatureC: -5, viscosityPaS: 9 },
      { temperatureC: 22.5, viscosityPaS: 2.5 },
    ],
    notes: 'said "thick"',
  },
  {
    kind: "column",
    label: "T-3",
    innerDiameterMm: 40,
    innerDiameterUncertaintyMm: 0.03,
    timedDistanceMm: 250,
    runInMm: 150,
    marginBelowMm: 60,
    notes: null,
  },
  { kind: "accessory", label: "T 4/b", accessoryType: "thermometer", notes: "=1+1" },
  {
    kind: "fluid_lot",
    label: "T-5",
    fluidName: "glycerol–water 85 %",
    densityKgM3: 1221,
    glycerolMassFraction: 0.85,
    calibration: [{ temperatureC: 20, viscosityPaS: 0.109 }],
    notes: null,
  },
];

/** Reads a CSV as the import page does: header row, every cell text. */
const readCsv = (csv: string) => Papa.parse<Record<string, string>>(csv.replace(/^\uFEFF/, ""), { header: true, skipEmptyLines: "greedy" });

describe("parts CSV", () => {
  it("round-trips every kind through the export and back", () => {
    const csv = inventoryCsv(parts.map((part) => ({ ...part, status: "in_service", kitNumber: null })));
    const read = readCsv(csv);
    expect(checkImportHeaders(read.meta.fields ?? [])).toEqual([]);
    const back = read.data.map((row) => csvRowToPartInput(row));
    // The optional resolution left empty comes back as absent, the formula-looking note without its apostrophe.
    expect(back).toEqual(parts.map((input) => ({ ok: true, input: JSON.parse(JSON.stringify(input)) })));
  });

  it("refuses a positive density temperature coefficient and a negative bore uncertainty, naming the column", () => {
    const lot = csvRowToPartInput({
      kind: "fluid_lot",
      label: "F",
      fluid_name: "oil",
      density_kg_m3: "900",
      density_temperature_coefficient_kg_m3_k: "0.6",
      calibration: "20:0.5",
    });
    expect(lot).toEqual({ ok: false, problems: [expect.stringMatching(/^density_temperature_coefficient_kg_m3_k: Liquids get lighter/)] });
    const column = csvRowToPartInput({
      kind: "column",
      label: "C",
      inner_diameter_mm: "40",
      inner_diameter_uncertainty_mm: "-1",
      timed_distance_mm: "200",
      run_in_mm: "150",
      margin_below_mm: "50",
    });
    expect(column).toEqual({ ok: false, problems: [expect.stringMatching(/^inner_diameter_uncertainty_mm: /)] });
  });

  it("refuses a glycerol mass fraction written as a percentage, saying how to write it", () => {
    const lot = csvRowToPartInput({
      kind: "fluid_lot",
      label: "F",
      fluid_name: "glycerol–water",
      density_kg_m3: "1221",
      glycerol_mass_fraction: "85",
      calibration: "20:0.109",
    });
    expect(lot).toEqual({ ok: false, problems: ["glycerol_mass_fraction: Enter the mass fraction from 0 to 1: 85 % glycerol is 0.85."] });
  });

  it("neutralises a formula in the export but keeps the value readable", () => {
    const csv = inventoryCsv([{ ...parts[3], status: "retired", kitNumber: "7" }]);
    expect(readCsv(csv).data[0]).toMatchObject({ notes: "'=1+1", status: "retired", kit_number: "7" });
  });

  it("gives a template whose example rows import cleanly", () => {
    const read = readCsv(templateCsv());
    expect(read.meta.fields).toContain("calibration");
    expect(read.meta.fields).toContain("glycerol_mass_fraction");
    expect(checkImportRows(read.data, []).map((row) => row.problems)).toEqual([[], [], [], []]);
  });

  it("lists every problem of a bad row with the column it is in", () => {
    const result = csvRowToPartInput({ kind: "sphere", label: "S 1!", material: "", diameter_mm: "", mass_g: "-2", density_kg_m3: "1000" });
    expect(result.ok).toBe(false);
    const problems = result.ok ? [] : result.problems;
    expect(problems).toEqual(
      expect.arrayContaining([
        expect.stringMatching(/^density_kg_m3: not used for a sphere/),
        expect.stringMatching(/^label: Use letters/),
        "material: Say what the sphere is made of.",
        "diameter_mm: Enter the diameter in mm.",
        "mass_g: The mass must be greater than zero.",
      ]),
    );
  });

  it("explains a malformed calibration and a bad kind", () => {
    expect(parseCalibration("20:0.5;25")).toBeNull();
    expect(csvRowToPartInput({ kind: "fluid_lot", label: "F", fluid_name: "oil", density_kg_m3: "900", calibration: "20=0.5" })).toEqual({
      ok: false,
      problems: [
        expect.stringMatching(/^calibration: write the points as temperature/),
        expect.stringMatching(/^calibration: Add at least one/),
      ],
    });
    expect(csvRowToPartInput({ kind: "bead", label: "B" })).toEqual({ ok: false, problems: [expect.stringMatching(/^kind: use sphere/)] });
    const hot = csvRowToPartInput({
      kind: "fluid lot",
      label: "F",
      fluid_name: "oil",
      density_kg_m3: "900",
      calibration: "20:0.5;120:0.1",
    });
    expect(hot.ok ? [] : hot.problems).toEqual([expect.stringMatching(/^calibration \(point 2\): Calibration temperatures above 100/)]);
  });

  it("flags labels repeated in the file and labels the course already uses, by spreadsheet line", () => {
    const row = (label: string) => partToCsvRow({ ...parts[2], label });
    const checks = checkImportRows([row("A"), row("B"), row("A"), row("C-9")], ["C-9"]);
    expect(checks.map((check) => [check.line, check.problems])).toEqual([
      [2, []],
      [3, []],
      [4, ["label: A is also on line 2 of this file."]],
      [5, ["label: C-9 is already used by a part in this course."]],
    ]);
    expect(checks[0].input).toMatchObject({ kind: "column", label: "A" });
    expect(checks[2].input).toBeNull();
  });

  it("asks for the kind and label columns and names unknown ones", () => {
    expect(checkImportHeaders(["label", "diameter"])).toEqual([
      "The file needs the column kind in its first line.",
      "Unknown column diameter: check the spelling against the template.",
    ]);
  });
});
