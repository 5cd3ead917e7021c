/**
 * CSV for spreadsheets. Cells that a spreadsheet would run as a formula (starting with =, +, -, @,
 * or a tab or carriage return) get a leading apostrophe, as the OWASP "CSV Injection" guidance
 * recommends, so an exported name like "=HYPERLINK(…)" stays text.
 */
import Papa from "papaparse";

const formulaStart = /^[=+\-@\t\r]/;

export function neutraliseCell(value: unknown): string {
  if (value === null || value === undefined) return "";
  const text = value instanceof Date ? value.toISOString() : String(value);
  // Plain negative numbers are data, not formulas: keep them as numbers.
  if (typeof value === "number") return text;
  return formulaStart.test(text) ? `'${text}` : text;
}

export function toCsv<Row>(rows: Row[], columns: { header: string; value: (row: Row) => unknown }[]): string {
  return Papa.unparse({
    fields: columns.map((column) => column.header),
    data: rows.map((row) => columns.map((column) => neutraliseCell(column.value(row)))),
  });
}

/** A download response for a CSV file; the BOM lets spreadsheet programs detect UTF-8. */
export function csvResponse(filename: string, csv: string): Response {
  return new Response(`\uFEFF${csv}`, {
    headers: {
      "Content-Type": "text/csv; charset=utf-8",
      "Content-Disposition": `attachment; filename="${filename.replace(/[^\w.-]/g, "_")}"`,
      "Cache-Control": "no-store",
    },
  });
}
