import Papa from "papaparse";
import { useMemo, useState } from "react";
import { data, useFetcher } from "react-router";
import type { Route } from "./+types/courses.$courseId.roster";
import { TextAreaField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { LabTime } from "~/components/drop-logs/lab-time";
import { checkRosterRows, rosterCommitInput, rosterImportKey, rosterRowsFromRecords, type RosterRow } from "~/lib/roster/roster-rows";
import { requireCourseRole } from "~/server/auth/access.server";
import { importRoster, rosterContext } from "~/server/members/roster-import.server";
import { db } from "~/server/db.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { cohortNames, memberEmails } = await rosterContext(db, access.course.id);
  return { courseId: access.course.id, timeZone: access.course.timeZone, cohortNames, memberEmails };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const form = await request.formData();
  let rows: unknown;
  try {
    rows = JSON.parse(String(form.get("rows") ?? ""));
  } catch {
    return data({ ok: false as const, message: "The import did not arrive whole; parse the file again and retry." }, { status: 400 });
  }
  const parsed = rosterCommitInput.safeParse(rows);
  if (!parsed.success) return data({ ok: false as const, message: parsed.error.issues[0].message }, { status: 400 });
  const importKey = rosterImportKey.safeParse(form.get("importKey"));
  if (!importKey.success) return data({ ok: false as const, message: importKey.error.issues[0].message }, { status: 400 });
  const result = await importRoster(db, {
    courseId: access.course.id,
    inviter: { id: access.user.id, name: access.user.name },
    importKey: importKey.data,
    rows: parsed.data,
    request,
  });
  if (!result.ok) {
    return data(
      {
        ok: false as const,
        message: `Nothing was imported: ${result.problems.length} rows have problems (the course changed since the preview?).`,
        problems: result.problems,
      },
      { status: 400 },
    );
  }
  return result.duplicate ? { ...result, committedAt: result.committedAt.toISOString() } : result;
}

/** `importKey` names this one preview: committing it twice imports it once. */
type Parsed = { rows: RosterRow[]; importKey: string; fileProblem?: string };

/** Parses in the browser, reporting progress so that a file of thousands of rows never looks stuck. */
function parseRoster(source: File | string, onProgress: (fraction: number) => void): Promise<Parsed> {
  return new Promise((resolve) => {
    const records: Record<string, string>[] = [];
    const size = typeof source === "string" ? source.length : source.size;
    Papa.parse<Record<string, string>>(source, {
      header: true,
      skipEmptyLines: "greedy",
      transformHeader: (header) => header.trim().toLowerCase(),
      chunkSize: 64 * 1024,
      chunk: (results) => {
        records.push(...results.data);
        onProgress(Math.min(1, results.meta.cursor / Math.max(1, size)));
      },
      complete: () => {
        onProgress(1);
        resolve({ rows: rosterRowsFromRecords(records), importKey: crypto.randomUUID() });
      },
      error: (error: Error) => resolve({ rows: [], importKey: "", fileProblem: `The file could not be read: ${error.message}` }),
    });
  });
}

export default function RosterImport({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, cohortNames, memberEmails } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const [progress, setProgress] = useState<number | null>(null);
  const [parsed, setParsed] = useState<Parsed | null>(null);
  const [pasted, setPasted] = useState("");
  const checks = useMemo(
    () => (parsed ? checkRosterRows(parsed.rows, { cohortNames, memberEmails }) : []),
    [parsed, cohortNames, memberEmails],
  );
  const withProblems = checks.filter((check) => check.problems.length > 0);

  async function read(source: File | string) {
    setParsed(null);
    setProgress(0);
    setParsed(await parseRoster(source, setProgress));
  }

  const result = fetcher.data;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Import the roster"
        actions={
          <a href={`/courses/${courseId}/roster-template.csv`} className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20" download>
            Download the template CSV
          </a>
        }
      >
        Columns: <code>email</code>, <code>name</code>, <code>cohort</code> (one of:{" "}
        {cohortNames.join(", ") || "no cohorts yet — add them in Settings"}), <code>role</code> (student or ta; empty means student).
        Nothing is written until you confirm the preview; everyone in the file then gets an invitation by e-mail.
      </PageHeader>

      <div className="grid gap-4 md:grid-cols-2">
        <div className="flex flex-col gap-2">
          <label htmlFor="roster-file" className="text-sm font-medium">
            Upload a CSV file
          </label>
          <input
            id="roster-file"
            type="file"
            accept=".csv,text/csv"
            onChange={(event) => {
              const file = event.currentTarget.files?.[0];
              if (file) void read(file);
            }}
          />
        </div>
        <div className="flex flex-col gap-2">
          <TextAreaField
            label="…or paste the rows, header first"
            rows={4}
            value={pasted}
            onChange={(event) => setPasted(event.currentTarget.value)}
          />
          <Button type="button" variant="secondary" disabled={!pasted.trim()} onClick={() => void read(pasted)}>
            Preview the pasted rows
          </Button>
        </div>
      </div>

      {progress !== null && progress < 1 ? (
        <div>
          <label htmlFor="roster-progress" className="text-sm">
            Reading the file…
          </label>
          <progress id="roster-progress" className="w-full" max={1} value={progress} />
        </div>
      ) : null}

      {parsed?.fileProblem ? <Notice tone="error">{parsed.fileProblem}</Notice> : null}
      {result && result.ok && !result.duplicate ? (
        <Notice tone="success">
          Imported: {result.invited} invitations sent ({result.students} students, {result.tas} TAs).
        </Notice>
      ) : null}
      {result && result.ok && result.duplicate ? (
        <Notice tone="info">
          Already imported on <LabTime at={result.committedAt} courseTimeZone={timeZone} /> ({result.rowCount} rows): no invitations were
          sent again.
        </Notice>
      ) : null}
      {result && !result.ok ? <Notice tone="error">{result.message}</Notice> : null}

      {parsed && !parsed.fileProblem ? (
        <section aria-labelledby="preview-heading" className="flex flex-col gap-3">
          <h2 id="preview-heading" className="text-lg font-semibold">
            Preview: {checks.length} rows, {withProblems.length} with problems
          </h2>
          {withProblems.length === 0 && checks.length > 0 ? (
            <fetcher.Form method="post">
              <input type="hidden" name="rows" value={JSON.stringify(parsed.rows)} />
              <input type="hidden" name="importKey" value={parsed.importKey} />
              <Button type="submit" disabled={fetcher.state !== "idle"}>
                {fetcher.state !== "idle" ? "Importing…" : `Import ${checks.length} people and send their invitations`}
              </Button>
            </fetcher.Form>
          ) : checks.length > 0 ? (
            <Notice tone="warning">Fix the rows marked below in your file, then read it again. Nothing has been written.</Notice>
          ) : (
            <Notice tone="warning">The file has no rows under its header.</Notice>
          )}
          <PreviewTable checks={withProblems.length ? [...withProblems, ...checks.filter((c) => !c.problems.length)] : checks} />
        </section>
      ) : null}
    </div>
  );
}

/** The first 500 rows, problems first: enough to see what is wrong without rendering thousands of rows. */
function PreviewTable({ checks }: { checks: ReturnType<typeof checkRosterRows> }) {
  const shown = checks.slice(0, 500);
  return (
    <div
      role="region"
      aria-label="Roster preview"
      tabIndex={0}
      className="overflow-x-auto rounded-lg bg-white ring-1 ring-ink-900/10 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-ink-700"
    >
      <table className="min-w-full text-left text-sm">
        <caption className="sr-only">Roster preview</caption>
        <thead className="bg-paper-100 text-xs uppercase text-ink-700">
          <tr>
            <th scope="col" className="px-3 py-2">
              Line
            </th>
            <th scope="col" className="px-3 py-2">
              E-mail
            </th>
            <th scope="col" className="px-3 py-2">
              Name
            </th>
            <th scope="col" className="px-3 py-2">
              Cohort
            </th>
            <th scope="col" className="px-3 py-2">
              Role
            </th>
            <th scope="col" className="px-3 py-2">
              Problems
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink-900/5">
          {shown.map(({ row, problems }) => (
            <tr key={row.line} className={problems.length ? "bg-red-50" : undefined}>
              <td className="px-3 py-1.5">{row.line}</td>
              <td className="px-3 py-1.5">{row.email}</td>
              <td className="px-3 py-1.5">{row.name}</td>
              <td className="px-3 py-1.5">{row.cohort}</td>
              <td className="px-3 py-1.5">{row.role || "student"}</td>
              <td className="px-3 py-1.5 text-outlier">{problems.join(" ") || <span className="text-consistent">Ready</span>}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {checks.length > shown.length ? (
        <p className="px-3 py-2 text-sm text-ink-600">…and {checks.length - shown.length} more rows.</p>
      ) : null}
    </div>
  );
}

export function meta() {
  return [{ title: "Roster import · Benchpost" }];
}
