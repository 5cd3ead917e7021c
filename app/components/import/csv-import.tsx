/**
 * The CSV import both the parts and the roster pages use: a file or pasted rows, read in the browser
 * by papaparse with its progress shown, checked by the page, previewed row by row (problems first),
 * then committed by the page's own form. Nothing is sent before the preview has no problems, unless the
 * page commits only the rows without problems (`leavesOutProblems`), as the roster import does.
 */
import Papa from "papaparse";
import { useEffect, useId, useMemo, useState, type ReactNode } from "react";
import { Button } from "~/components/ui/button";
import { TextAreaField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { leftOutSentence, previewHeading, shownRowsSentence } from "~/lib/import/import-words";

/** One reading of a file: `readId` is new each time, so a page can tell two previews apart (e.g. to import one once). */
export type CsvFile = { name: string; readId: string; headers: string[]; records: Record<string, string>[] };

/** What the page makes of a file: each row's check, and the problems of the file as a whole. */
export type CsvReview = { checks: { problems: string[] }[]; problems: string[] };

export type CsvColumn<Check> = { header: string; cell: (check: Check) => ReactNode };

type Reading = { file: CsvFile } | { unreadable: string };

/** Where papaparse puts the cells of a line longer than its header (`extraCellsKey` of the parts' checks). */
const extraCells = "__parsed_extra";

/** The extra cells as one text cell, so that every cell is text and a page's check can name the line. */
function textCells(record: Record<string, unknown>): Record<string, string> {
  const extra = record[extraCells];
  return (Array.isArray(extra) ? { ...record, [extraCells]: extra.join(",") } : record) as Record<string, string>;
}

/** Reads in chunks, so that a file of thousands of rows shows its progress instead of freezing the page. */
function readCsv(
  source: File | string,
  {
    name,
    transformHeader,
    onProgress,
  }: { name: string; transformHeader: (header: string) => string; onProgress: (fraction: number) => void },
): Promise<Reading> {
  return new Promise((resolve) => {
    const records: Record<string, string>[] = [];
    let headers: string[] = [];
    const size = typeof source === "string" ? source.length : source.size;
    Papa.parse<Record<string, unknown>>(source, {
      header: true,
      skipEmptyLines: "greedy",
      transformHeader,
      chunkSize: 64 * 1024,
      chunk: (results) => {
        headers = results.meta.fields ?? headers;
        records.push(...results.data.map(textCells));
        onProgress(Math.min(1, results.meta.cursor / Math.max(1, size)));
      },
      complete: () => resolve({ file: { name, readId: crypto.randomUUID(), headers, records } }),
      error: (error: Error) => resolve({ unreadable: `The file could not be read: ${error.message}` }),
    });
  });
}

export function CsvImport<Review extends CsvReview>({
  transformHeader,
  review,
  columns,
  line,
  commit,
  previewLimit = 500,
  clearWhen,
  leavesOutProblems = false,
}: {
  transformHeader: (header: string) => string;
  /** Checks a file; keep it stable (useCallback), it runs again only when it or the file changes. */
  review: (file: CsvFile) => Review;
  /** The page's columns of the preview, between the line number and the check. */
  columns: CsvColumn<Review["checks"][number]>[];
  line: (check: Review["checks"][number]) => number;
  /** The form that sends a file without problems. */
  commit: (review: Review, file: CsvFile) => ReactNode;
  previewLimit?: number;
  /** A new value (the reply of a finished import) empties the preview, which would only repeat rows now taken. */
  clearWhen?: unknown;
  /** The commit takes only the rows without problems, so it is offered beside rows that have some. */
  leavesOutProblems?: boolean;
}) {
  const fileId = useId();
  const [reading, setReading] = useState<Reading | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  const [pasted, setPasted] = useState("");
  useEffect(() => {
    if (clearWhen) setReading(null);
  }, [clearWhen]);
  const file = reading && "file" in reading ? reading.file : null;
  const checked = useMemo(() => (file ? review(file) : null), [file, review]);

  async function read(source: File | string, name: string) {
    setReading(null);
    setProgress(0);
    setReading(await readCsv(source, { name, transformHeader, onProgress: setProgress }));
    setProgress(null);
  }

  return (
    <>
      <section aria-labelledby={`${fileId}-source`} className="grid gap-4 md:grid-cols-2">
        <h2 id={`${fileId}-source`} className="sr-only">
          The rows to import
        </h2>
        <div className="flex flex-col gap-2">
          <label htmlFor={fileId} className="text-sm font-medium">
            Upload a CSV file
          </label>
          <input
            id={fileId}
            type="file"
            accept=".csv,text/csv"
            className="text-sm file:mr-3 file:rounded-md file:border-0 file:bg-ink-800 file:px-4 file:py-2 file:text-paper-50"
            onChange={(event) => {
              const chosen = event.currentTarget.files?.[0];
              if (chosen) void read(chosen, chosen.name);
            }}
          />
          {progress !== null ? (
            <label className="flex flex-col gap-1 text-sm">
              Reading the file… {Math.round(progress * 100)} %
              <progress value={progress} max={1} className="w-full accent-amber-500" />
            </label>
          ) : null}
        </div>
        <div className="flex flex-col gap-2">
          <TextAreaField
            label="…or paste the rows, header first"
            rows={4}
            value={pasted}
            onChange={(event) => setPasted(event.currentTarget.value)}
            controlClassName="font-mono text-xs"
          />
          <Button
            type="button"
            variant="secondary"
            className="self-start"
            disabled={!pasted.trim()}
            onClick={() => void read(pasted.trim(), "the pasted rows")}
          >
            Preview the pasted rows
          </Button>
        </div>
      </section>

      {reading && "unreadable" in reading ? <Notice tone="error">{reading.unreadable}</Notice> : null}
      {file && checked ? (
        <Preview
          file={file}
          review={checked}
          columns={columns}
          line={line}
          commit={commit}
          previewLimit={previewLimit}
          leavesOutProblems={leavesOutProblems}
        />
      ) : null}
    </>
  );
}

function Preview<Review extends CsvReview>({
  file,
  review,
  columns,
  line,
  commit,
  previewLimit,
  leavesOutProblems,
}: {
  file: CsvFile;
  review: Review;
  columns: CsvColumn<Review["checks"][number]>[];
  line: (check: Review["checks"][number]) => number;
  commit: (review: Review, file: CsvFile) => ReactNode;
  previewLimit: number;
  leavesOutProblems: boolean;
}) {
  const { checks, problems } = review;
  const withProblems = checks.filter((check) => check.problems.length > 0);
  // Rows with problems first: they are what has to be acted on.
  const ordered = [...withProblems, ...checks.filter((check) => check.problems.length === 0)];
  const shown = ordered.slice(0, previewLimit);
  return (
    <section aria-labelledby="preview-heading" className="flex flex-col gap-3">
      <h2 id="preview-heading" className="text-lg font-semibold">
        {previewHeading(checks.length, withProblems.length)}
      </h2>
      <p className="text-sm text-ink-700">From {file.name}.</p>
      {problems.length ? (
        <Notice tone="error">
          <ul className="list-disc pl-5">
            {problems.map((problem) => (
              <li key={problem}>{problem}</li>
            ))}
          </ul>
        </Notice>
      ) : null}
      {checks.length === 0 ? (
        <Notice tone="warning">The file has no rows under its header.</Notice>
      ) : problems.length || (withProblems.length && !leavesOutProblems) ? (
        <Notice tone="warning">Fix the problems marked here in your file, then read it again. Nothing has been written.</Notice>
      ) : (
        <>
          {withProblems.length ? <Notice tone="warning">{leftOutSentence(withProblems.length)}</Notice> : null}
          {commit(review, file)}
        </>
      )}
      <div
        role="region"
        aria-label="Every row of the file with its problems"
        tabIndex={0}
        className="overflow-x-auto rounded-lg bg-white ring-1 ring-ink-900/10 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-ink-700"
      >
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Every row of the file with its problems</caption>
          <thead className="bg-paper-100 text-xs uppercase tracking-wide text-ink-700">
            <tr>
              {["Line", ...columns.map((column) => column.header), "Check"].map((header) => (
                <th key={header} scope="col" className="px-3 py-2">
                  {header}
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/5">
            {shown.map((check) => (
              <tr key={line(check)} className={check.problems.length ? "bg-red-50" : undefined}>
                <td className="px-3 py-1.5">{line(check)}</td>
                {columns.map((column) => (
                  <td key={column.header} className="px-3 py-1.5">
                    {column.cell(check)}
                  </td>
                ))}
                <td className="px-3 py-1.5">
                  {check.problems.length ? (
                    <ul className="text-outlier">
                      {check.problems.map((problem) => (
                        <li key={problem}>Problem: {problem}</li>
                      ))}
                    </ul>
                  ) : (
                    <span className="text-consistent">Ready</span>
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        {ordered.length > shown.length ? (
          <p className="px-3 py-2 text-sm text-ink-700">{shownRowsSentence(shown.length, ordered.length)}</p>
        ) : null}
      </div>
    </section>
  );
}
