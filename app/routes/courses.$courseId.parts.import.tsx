import Papa from "papaparse";
import { useEffect, useMemo, useState } from "react";
import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.parts.import";
import { TextAreaField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { partKindLabels, type PartKind } from "~/lib/kits/part-input";
import {
  checkImportHeaders,
  checkImportRows,
  extraCellsKey,
  maxImportRows,
  normaliseHeader,
  partCsvColumns,
  type ImportRowCheck,
  type PartCsvRow,
} from "~/lib/kits/parts-csv";
import { requireCourseRole } from "~/server/auth/access.server";
import { parseSubmission } from "~/lib/forms/submission";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { importParts, listPartLabels } from "~/server/kits/parts.server";

/** The commit: the previewed rows as the file gave them, every cell text; the server checks them all again. */
const importCommit = z.object({
  rows: z
    .string()
    .transform((text, context) => {
      try {
        return JSON.parse(text) as unknown;
      } catch {
        context.addIssue({ code: "custom", message: "The rows did not arrive intact; check the file again." });
        return z.NEVER;
      }
    })
    .pipe(
      z
        .array(z.record(z.string(), z.string()))
        .min(1, "The file has no parts in it.")
        .max(maxImportRows, `Import at most ${maxImportRows} parts at a time.`),
    ),
});

/** How many rows the preview table shows; the counts above it cover every row. */
const previewLimit = 300;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { courseId: access.course.id, existingLabels: await listPartLabels(db, access.course.id) };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, importCommit);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const result = await importParts(db, { courseId: access.course.id, actorId: access.user.id, rows: submission.value.rows });
  if (result.rejected.length) {
    const reply = submission.reply({ formErrors: [`${result.rejected.length} rows have problems; nothing was imported.`] });
    return data({ ...reply, rejected: result.rejected.slice(0, previewLimit) }, { status: 400 });
  }
  return { ok: true as const, ...result };
});

type ParsedFile = { name: string; headers: string[]; rows: PartCsvRow[] };

export default function ImportParts({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, existingLabels } = loaderData;
  const base = `/courses/${courseId}/parts`;
  const navigation = useNavigation();
  const [parsed, setParsed] = useState<ParsedFile | null>(null);
  const [progress, setProgress] = useState<number | null>(null);
  // After a successful import the previewed rows are in the course, so the preview would only repeat them as taken.
  useEffect(() => {
    if (actionData && "ok" in actionData) setParsed(null);
  }, [actionData]);
  const checks = useMemo(() => (parsed ? checkImportRows(parsed.rows, existingLabels) : []), [parsed, existingLabels]);
  const fileProblems = parsed ? checkImportHeaders(parsed.headers) : [];
  if (parsed && parsed.rows.length > maxImportRows)
    fileProblems.push(`The file has ${parsed.rows.length} rows; import at most ${maxImportRows} at a time.`);
  const rejected = checks.filter((check) => check.problems.length > 0);
  const ready = parsed !== null && checks.length > 0 && rejected.length === 0 && fileProblems.length === 0;

  /** Reads the file in chunks so a large inventory shows its progress instead of freezing the page. */
  const readFile = (file: File) => {
    const rows: PartCsvRow[] = [];
    let headers: string[] = [];
    setParsed(null);
    setProgress(0);
    Papa.parse<PartCsvRow>(file, {
      header: true,
      skipEmptyLines: "greedy",
      transformHeader: normaliseHeader,
      chunkSize: 64 * 1024,
      chunk: (results) => {
        headers = results.meta.fields ?? headers;
        rows.push(...results.data.map(keepExtraCellsAsText));
        setProgress(file.size ? Math.min(1, results.meta.cursor / file.size) : 1);
      },
      complete: () => {
        setProgress(null);
        setParsed({ name: file.name, headers, rows });
      },
      error: () => {
        setProgress(null);
        setParsed({ name: file.name, headers: [], rows: [] });
      },
    });
  };

  const readPasted = (text: string) => {
    const results = Papa.parse<PartCsvRow>(text.trim(), { header: true, skipEmptyLines: "greedy", transformHeader: normaliseHeader });
    setParsed({ name: "pasted rows", headers: results.meta.fields ?? [], rows: results.data.map(keepExtraCellsAsText) });
  };

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Import parts (CSV)" trail={[{ to: base, label: "Parts" }]}>
        One part per line. The file is checked here, in your browser, and nothing is saved until you import a file without problems; then
        every row goes in together, or none does.
      </PageHeader>

      {actionData && "ok" in actionData ? (
        <Notice tone="success">
          {actionData.created} parts imported.{" "}
          {actionData.warnings.length
            ? `${actionData.warnings.length} of them raise checks (${actionData.warnings.map((w) => w.label).join(", ")}); open them to see why.`
            : null}{" "}
          <Link to={base} className="underline">
            Back to the parts
          </Link>
        </Notice>
      ) : null}
      {actionData && "status" in actionData ? (
        <Notice tone="error">
          {Object.values(actionData.error ?? {})
            .flat()
            .join(" ")}
          {"rejected" in actionData ? <ProblemList checks={actionData.rejected as ImportRowCheck[]} /> : null}
        </Notice>
      ) : null}

      <section aria-labelledby="columns-heading" className="text-sm text-ink-700">
        <h2 id="columns-heading" className="mb-1 text-base font-semibold text-ink-900">
          Columns
        </h2>
        <p>
          <code className="break-words">{partCsvColumns.join(",")}</code>. Units are in the names (mm, g, kg/m³); <code>calibration</code>{" "}
          holds temperature °C : viscosity Pa·s pairs, e.g. <code>20:0.545;25:0.38</code>; <code>glycerol_mass_fraction</code> (0–1, only
          for a glycerol–water mix) has the calibration checked against handbook values. Fill only the columns of the row's kind. At most{" "}
          {maxImportRows} parts per file.{" "}
          <a href={`${base}/template.csv`} className="font-medium underline" download>
            Download the template
          </a>
        </p>
      </section>

      <section aria-labelledby="source-heading" className="grid gap-6 md:grid-cols-2">
        <h2 id="source-heading" className="sr-only">
          The rows to import
        </h2>
        <div className="flex flex-col gap-2">
          <label htmlFor="parts-file" className="text-sm font-medium">
            Upload a CSV file
          </label>
          <input
            id="parts-file"
            type="file"
            accept=".csv,text/csv"
            className="text-sm file:mr-3 file:rounded-md file:border-0 file:bg-ink-800 file:px-4 file:py-2 file:text-paper-50"
            onChange={(event) => {
              const file = event.currentTarget.files?.[0];
              if (file) readFile(file);
            }}
          />
          {progress !== null ? (
            <label className="flex flex-col gap-1 text-sm">
              Reading the file… {Math.round(progress * 100)} %
              <progress value={progress} max={1} className="w-full accent-amber-500" />
            </label>
          ) : null}
        </div>
        <form
          className="flex flex-col gap-2"
          onSubmit={(event) => {
            event.preventDefault();
            readPasted(String(new FormData(event.currentTarget).get("pasted") ?? ""));
          }}
        >
          <TextAreaField label="Or paste the rows, with the header line" name="pasted" rows={5} controlClassName="font-mono text-xs" />
          <Button type="submit" variant="secondary" className="self-start">
            Check the pasted rows
          </Button>
        </form>
      </section>

      {parsed ? (
        <section aria-labelledby="preview-heading" className="flex flex-col gap-3">
          <h2 id="preview-heading" className="text-lg font-semibold">
            Preview of {parsed.name}
          </h2>
          <p role="status" className="text-sm">
            {checks.length} rows: {checks.length - rejected.length} ready, {rejected.length} with problems.
          </p>
          {fileProblems.length ? (
            <Notice tone="error">
              <ul className="list-disc pl-5">
                {fileProblems.map((problem) => (
                  <li key={problem}>{problem}</li>
                ))}
              </ul>
            </Notice>
          ) : null}
          <PreviewTable checks={checks} />
          <Form method="post" className="flex flex-wrap items-center gap-3">
            <input type="hidden" name="rows" value={ready ? JSON.stringify(parsed.rows) : ""} />
            <Button type="submit" disabled={!ready || navigation.state === "submitting"}>
              Import {checks.length} parts
            </Button>
            {!ready ? (
              <span className="text-sm text-ink-700">Correct the file and choose it again; the problems are listed row by row.</span>
            ) : null}
          </Form>
        </section>
      ) : null}
    </div>
  );
}

/** A line with more cells than the header gets them as one text cell, so the check can name the line. */
function keepExtraCellsAsText(row: PartCsvRow & { [extraCellsKey]?: unknown }): PartCsvRow {
  const extra = row[extraCellsKey];
  return Array.isArray(extra) ? { ...row, [extraCellsKey]: extra.join(",") } : row;
}

function PreviewTable({ checks }: { checks: ImportRowCheck[] }) {
  // Rows with problems first: they are what the instructor has to act on.
  const ordered = [...checks.filter((check) => check.problems.length), ...checks.filter((check) => !check.problems.length)];
  return (
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
            <th scope="col" className="px-3 py-2">
              Line
            </th>
            <th scope="col" className="px-3 py-2">
              Label
            </th>
            <th scope="col" className="px-3 py-2">
              Kind
            </th>
            <th scope="col" className="px-3 py-2">
              Check
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink-900/5">
          {ordered.slice(0, previewLimit).map((check) => (
            <tr key={check.line} className={check.problems.length ? "bg-red-50" : undefined}>
              <td className="px-3 py-2">{check.line}</td>
              <td className="px-3 py-2">{check.label || "—"}</td>
              <td className="px-3 py-2">{check.input ? partKindLabels[check.input.kind as PartKind] : ""}</td>
              <td className="px-3 py-2">
                {check.problems.length ? (
                  <ul className="text-outlier">
                    {check.problems.map((problem) => (
                      <li key={problem}>Problem: {problem}</li>
                    ))}
                  </ul>
                ) : (
                  "Ready"
                )}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {ordered.length > previewLimit ? (
        <p className="px-3 py-2 text-sm text-ink-700">The first {previewLimit} rows are shown, those with problems first.</p>
      ) : null}
    </div>
  );
}

function ProblemList({ checks }: { checks: ImportRowCheck[] }) {
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

export function meta() {
  return [{ title: "Import parts · Benchpost" }];
}
