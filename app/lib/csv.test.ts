import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { neutraliseCell, toCsv } from "./csv";

// OWASP "CSV Injection": cells beginning with = + - @ (and tab, carriage return) are run as formulas.
describe("CSV export", () => {
  it.each(["=1+1", "+SUM(A1)", "-2+3", "@cmd", "\t=x", "\r=x"])("neutralises %j", (cell) => {
    expect(neutraliseCell(cell)).toBe(`'${cell}`);
  });

  it("keeps ordinary text, numbers (negative too) and empty cells as they are", () => {
    expect(neutraliseCell("Kit 12")).toBe("Kit 12");
    expect(neutraliseCell(-1.5)).toBe("-1.5");
    expect(neutraliseCell(null)).toBe("");
  });

  it("writes a header and quotes commas and quotes so the file reads back to the same cells", () => {
    const csv = toCsv(
      [{ name: 'O"Neil, Sam', formula: "=HYPERLINK(1)" }],
      [
        { header: "name", value: (row) => row.name },
        { header: "formula", value: (row) => row.formula },
      ],
    );
    expect(Papa.parse<string[]>(csv).data).toEqual([
      ["name", "formula"],
      ['O"Neil, Sam', "'=HYPERLINK(1)"],
    ]);
  });
});
