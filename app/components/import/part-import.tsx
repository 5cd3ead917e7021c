/** The parts page's side of the CSV import: its columns, how it checks a file, and the rows the server refused. */
import { useCallback } from "react";
import type { CsvColumn, CsvFile } from "~/components/import/csv-import";
import { tooManyRowsSentence } from "~/lib/import/import-words";
import { partKindLabels, type PartKind } from "~/lib/kits/part-input";
import { checkImportHeaders, checkImportRows, maxImportRows, partCsvColumns, type ImportRowCheck } from "~/lib/kits/parts-csv";

export const partPreviewColumns: CsvColumn<ImportRowCheck>[] = [
  { header: "Label", cell: (check) => check.label || "—" },
  { header: "Kind", cell: (check) => (check.input ? partKindLabels[check.input.kind as PartKind] : "") },
];

/** Checks a file against the course's labels: the rows it would post, each row's check and the file's own problems. */
export function usePartReview(existingLabels: string[]) {
  return useCallback(
    (file: CsvFile) => {
      const rows = file.records;
      const problems = checkImportHeaders(file.headers);
      if (rows.length > maxImportRows) problems.push(tooManyRowsSentence(rows.length, maxImportRows));
      return { rows, checks: checkImportRows(rows, existingLabels), problems };
    },
    [existingLabels],
  );
}

export function PartColumns({ templateHref }: { templateHref: string }) {
  return (
    <section aria-labelledby="columns-heading" className="text-sm text-ink-700">
      <h2 id="columns-heading" className="mb-1 text-base font-semibold text-ink-900">
        Columns
      </h2>
      <p>
        <code className="break-words">{partCsvColumns.join(",")}</code>. Units are in the names (mm, g, kg/m³); <code>calibration</code>{" "}
        holds temperature °C : viscosity Pa·s pairs, e.g. <code>20:0.545;25:0.38</code>; <code>glycerol_mass_fraction</code> (0–1, only for
        a glycerol–water mix) has the calibration checked against handbook values. Fill only the columns of the row's kind. At most{" "}
        {maxImportRows} parts per file.{" "}
        <a href={templateHref} className="font-medium underline" download>
          Download the template
        </a>
      </p>
    </section>
  );
}

/** The rows the server refused on commit (the course changed since the preview, or the rows were tampered with). */
export function RejectedRows({ checks }: { checks: ImportRowCheck[] }) {
  return (
    <ul className="mt-2 list-disc pl-5">
      {checks.map((check) => (
        <li key={check.line}>
          Line {check.line}
          {check.label ? ` (${check.label})` : ""}: {check.problems.join(" ")}
        </li>
      ))}
    </ul>
  );
}
