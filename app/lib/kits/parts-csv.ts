/**
 * The parts CSV: one mapping between a spreadsheet row and a `PartInput`, shared by the import
 * (checked in the browser for the preview and again on the server), the template and the export,
 * so a file exported from Benchpost imports back unchanged.
 */
import { toCsv } from "~/lib/csv";
import { partInput, type PartInput, type PartKind } from "~/lib/kits/part-input";

/** The import columns, in file order. Units are in the names, as in the database. */
export const partCsvColumns = [
  "kind",
  "label",
  "material",
  "diameter_mm",
  "diameter_resolution_mm",
  "mass_g",
  "mass_resolution_g",
  "fluid_name",
  "density_kg_m3",
  "density_uncertainty_kg_m3",
  "density_temperature_coefficient_kg_m3_k",
  "glycerol_mass_fraction",
  "calibration",
  "inner_diameter_mm",
  "inner_diameter_uncertainty_mm",
  "timed_distance_mm",
  "run_in_mm",
  "margin_below_mm",
  "accessory_type",
  "notes",
] as const;
export type PartCsvColumn = (typeof partCsvColumns)[number];
export type PartCsvRow = Partial<Record<string, string>>;

/** The largest file one import takes: it goes in as one multi-row insert, well under PostgreSQL's parameter limit. */
export const maxImportRows = 2000;

/** Which columns each kind fills, with the `PartInput` field they hold. */
const kindColumns: Record<PartKind, [PartCsvColumn, string][]> = {
  sphere: [
    ["material", "material"],
    ["diameter_mm", "diameterMm"],
    ["diameter_resolution_mm", "diameterResolutionMm"],
    ["mass_g", "massG"],
    ["mass_resolution_g", "massResolutionG"],
  ],
  fluid_lot: [
    ["fluid_name", "fluidName"],
    ["density_kg_m3", "densityKgM3"],
    ["density_uncertainty_kg_m3", "densityUncertaintyKgM3"],
    ["density_temperature_coefficient_kg_m3_k", "densityTemperatureCoefficientKgM3K"],
    ["glycerol_mass_fraction", "glycerolMassFraction"],
    ["calibration", "calibration"],
  ],
  column: [
    ["inner_diameter_mm", "innerDiameterMm"],
    ["inner_diameter_uncertainty_mm", "innerDiameterUncertaintyMm"],
    ["timed_distance_mm", "timedDistanceMm"],
    ["run_in_mm", "runInMm"],
    ["margin_below_mm", "marginBelowMm"],
  ],
  accessory: [["accessory_type", "accessoryType"]],
};

const kindWords: Record<string, PartKind> = {
  sphere: "sphere",
  fluid_lot: "fluid_lot",
  "fluid lot": "fluid_lot",
  column: "column",
  accessory: "accessory",
};

const calibrationHint = "write the points as temperature °C:viscosity Pa·s pairs separated by semicolons, e.g. 20:0.545;25:0.38";

/** "20:0.545;25:0.38" → points, or null when a pair is malformed. Numbers stay text for zod to check with its messages. */
export function parseCalibration(cell: string): { temperatureC: string; viscosityPaS: string }[] | null {
  const pairs = cell
    .split(";")
    .map((pair) => pair.trim())
    .filter(Boolean);
  const points = pairs.map((pair) => pair.split(":").map((part) => part.trim()));
  if (points.some((point) => point.length !== 2 || point.some((part) => part === ""))) return null;
  return points.map(([temperatureC, viscosityPaS]) => ({ temperatureC, viscosityPaS }));
}

export function formatCalibration(points: { temperatureC: number; viscosityPaS: number }[]): string {
  return points.map((point) => `${point.temperatureC}:${point.viscosityPaS}`).join(";");
}

/** Where a zod issue points, in the file's words: the column name, and the calibration point if any. */
function columnOf(path: PropertyKey[]): string {
  const [field, index] = path;
  if (field === "calibration") return typeof index === "number" ? `calibration (point ${index + 1})` : "calibration";
  for (const columns of Object.values(kindColumns)) {
    const found = columns.find(([, key]) => key === field);
    if (found) return found[0];
  }
  return String(field ?? "row");
}

/** The fields that hold a measured number. */
export const measuredFields = new Set([
  "diameterMm",
  "diameterResolutionMm",
  "massG",
  "massResolutionG",
  "densityKgM3",
  "densityUncertaintyKgM3",
  "densityTemperatureCoefficientKgM3K",
  "glycerolMassFraction",
  "innerDiameterMm",
  "innerDiameterUncertaintyMm",
  "timedDistanceMm",
  "runInMm",
  "marginBelowMm",
]);

/** An empty number box is a missing value ("enter the diameter"), not a zero ("must be greater than zero"). */
export function blankAsMissing(field: string, value: string): string | undefined {
  return value === "" && measuredFields.has(field) ? undefined : value;
}

export type CsvRowResult = { ok: true; input: PartInput } | { ok: false; problems: string[] };

/** One spreadsheet row checked with the same schema as the forms; every problem is listed, not only the first. */
export function csvRowToPartInput(row: PartCsvRow): CsvRowResult {
  // Our export puts an apostrophe before a cell that would run as a formula; it is not part of the value.
  const cell = (column: string) => (row[column] ?? "").trim().replace(/^'(?=[=+\-@])/, "");
  const kind = kindWords[cell("kind").toLowerCase()];
  if (!kind) return { ok: false, problems: [`kind: use sphere, fluid_lot, column or accessory (found "${cell("kind")}").`] };

  const problems: string[] = [];
  const otherColumns = Object.entries(kindColumns)
    .filter(([other]) => other !== kind)
    .flatMap(([, columns]) => columns.map(([column]) => column))
    .filter((column) => cell(column) !== "");
  if (otherColumns.length) problems.push(`${otherColumns.join(", ")}: not used for a ${kind.replace("_", " ")}; leave empty.`);

  const candidate: Record<string, unknown> = { kind, label: cell("label"), notes: cell("notes") };
  for (const [column, field] of kindColumns[kind]) {
    const value = cell(column);
    if (field === "calibration") {
      const points = value === "" ? [] : parseCalibration(value);
      if (points === null) problems.push(`calibration: ${calibrationHint}.`);
      candidate.calibration = points ?? [];
    } else {
      candidate[field] = blankAsMissing(field, value);
    }
  }

  const parsed = partInput.safeParse(candidate);
  if (!parsed.success) problems.push(...parsed.error.issues.map((issue) => `${columnOf(issue.path)}: ${issue.message}`));
  return problems.length || !parsed.success ? { ok: false, problems } : { ok: true, input: parsed.data };
}

/** A part's fields as they are stored or typed; only its kind's fields are read. */
export type PartFields = { kind: PartKind; label: string; notes?: string | null } & Record<string, unknown>;

export function partToCsvRow(part: PartFields): Record<PartCsvColumn, string> {
  const row = Object.fromEntries(partCsvColumns.map((column) => [column, ""])) as Record<PartCsvColumn, string>;
  row.kind = part.kind;
  row.label = part.label;
  row.notes = part.notes ?? "";
  for (const [column, field] of kindColumns[part.kind]) {
    const value = part[field];
    if (value === null || value === undefined) continue;
    row[column] = field === "calibration" ? formatCalibration(value as { temperatureC: number; viscosityPaS: number }[]) : String(value);
  }
  return row;
}

/** Where papaparse puts the cells of a line longer than the header; the import keeps them as text to report the line. */
export const extraCellsKey = "__parsed_extra";

export type ImportRowCheck = { line: number; label: string; input: PartInput | null; problems: string[] };

/**
 * Every row of an import checked before anything is written: the schema, labels repeated inside the
 * file, and labels the course already uses. The browser shows this as the preview; the server runs it
 * again on commit, so a tampered or stale preview cannot slip a bad row in.
 */
export function checkImportRows(rows: PartCsvRow[], existingLabels: Iterable<string>): ImportRowCheck[] {
  const taken = new Set(existingLabels);
  const firstLine = new Map<string, number>();
  return rows.map((row, index) => {
    // Line 1 is the header, so the first data row is line 2, as a spreadsheet numbers it.
    const line = index + 2;
    const result = csvRowToPartInput(row);
    const problems = result.ok ? [] : [...result.problems];
    if (row[extraCellsKey] !== undefined)
      problems.push("This line has more cells than the first line has column names; check for a stray comma.");
    const label = (row.label ?? "").trim();
    if (label) {
      if (taken.has(label)) problems.push(`label: ${label} is already used by a part in this course.`);
      const earlier = firstLine.get(label);
      if (earlier !== undefined) problems.push(`label: ${label} is also on line ${earlier} of this file.`);
      else firstLine.set(label, line);
    }
    return { line, label, input: result.ok && problems.length === 0 ? result.input : null, problems };
  });
}

/** Problems with the file as a whole: the columns it needs and the ones it does not know. */
export function checkImportHeaders(headers: string[]): string[] {
  const problems: string[] = [];
  const missing = (["kind", "label"] as const).filter((column) => !headers.includes(column));
  if (missing.length)
    problems.push(`The file needs the column${missing.length > 1 ? "s" : ""} ${missing.join(" and ")} in its first line.`);
  const unknown = headers.filter(
    (header) => header !== "" && !(partCsvColumns as readonly string[]).includes(header) && !inventoryOnlyColumns.includes(header),
  );
  if (unknown.length)
    problems.push(`Unknown column${unknown.length > 1 ? "s" : ""} ${unknown.join(", ")}: check the spelling against the template.`);
  return problems;
}

/** Headers as people type them: "Diameter_mm " reads as diameter_mm. */
export const normaliseHeader = (header: string) =>
  header
    .trim()
    .toLowerCase()
    .replace(/^\uFEFF/, "");

/** The export's extra columns; an exported file may be imported into another course, and these are ignored. */
const inventoryOnlyColumns: string[] = ["status", "kit_number"];

/** One example row per kind, so the template shows each kind's columns filled in. */
const templateParts: PartInput[] = [
  {
    kind: "sphere",
    label: "S-01",
    material: "steel",
    diameterMm: 3.175,
    diameterResolutionMm: 0.01,
    massG: 0.1305,
    massResolutionG: 0.0001,
    notes: null,
  },
  {
    kind: "fluid_lot",
    label: "FL-01",
    fluidName: "glycerol–water 85 %",
    densityKgM3: 1221,
    densityUncertaintyKgM3: 1,
    densityTemperatureCoefficientKgM3K: -0.6,
    glycerolMassFraction: 0.85,
    calibration: [
      { temperatureC: 20, viscosityPaS: 0.109 },
      { temperatureC: 25, viscosityPaS: 0.081 },
    ],
    notes: null,
  },
  {
    kind: "column",
    label: "C-01",
    innerDiameterMm: 32,
    innerDiameterUncertaintyMm: 0.05,
    timedDistanceMm: 200,
    runInMm: 100,
    marginBelowMm: 50,
    notes: null,
  },
  { kind: "accessory", label: "M-01", accessoryType: "retrieval magnet", notes: "Keep away from pacemakers." },
];

export function templateCsv(): string {
  return toCsv(
    templateParts,
    partCsvColumns.map((column) => ({ header: column, value: (part: PartInput) => partToCsvRow(part)[column] })),
  );
}

/** The inventory export: the import columns plus status and kit number, formulas neutralised by `toCsv`. */
export function inventoryCsv(parts: (PartFields & { status: string; kitNumber: string | null })[]): string {
  return toCsv(
    parts.map((part) => ({ ...partToCsvRow(part), status: part.status, kit_number: part.kitNumber ?? "" })),
    [...partCsvColumns, "status", "kit_number"].map((column) => ({ header: column, value: (row: Record<string, string>) => row[column] })),
  );
}
