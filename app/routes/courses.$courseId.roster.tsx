import { useCallback } from "react";
import { data, useFetcher } from "react-router";
import type { Route } from "./+types/courses.$courseId.roster";
import { LabTime } from "~/components/drop-logs/lab-time";
import { CsvImport, type CsvColumn, type CsvFile } from "~/components/import/csv-import";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import {
  checkRosterRows,
  rosterCommitInput,
  rosterImportKey,
  rosterRowsFromRecords,
  type RosterChange,
  type RosterRowCheck,
} from "~/lib/roster/roster-rows";
import { counted } from "~/lib/plural";
import { rosterCommitLabel, rosterImportedSentence } from "~/lib/roster/roster-words";
import { nothingImportedSentence } from "~/lib/import/import-words";
import { requireCourseRole } from "~/server/auth/access.server";
import { importRoster, rosterContext } from "~/server/members/roster-import.server";
import { db } from "~/server/db.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { cohortNames, people } = await rosterContext(db, access.course.id);
  return { courseId: access.course.id, timeZone: access.course.timeZone, cohortNames, people };
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
        message: nothingImportedSentence(result.problems.length, "course"),
        problems: result.problems,
      },
      { status: 400 },
    );
  }
  return result.duplicate ? { ...result, committedAt: result.committedAt.toISOString() } : result;
}

export default function RosterImport({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, cohortNames, people } = loaderData;
  const fetcher = useFetcher<typeof action>();
  const review = useCallback(
    (file: CsvFile) => ({ checks: checkRosterRows(rosterRowsFromRecords(file.records), { cohortNames, people }), problems: [] }),
    [cohortNames, people],
  );
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
        {cohortNames.join(", ") || "no cohorts yet — add them in Settings"}), <code>role</code> (student or ta; empty means student), and
        optionally <code>student_number</code>. People are matched by e-mail: someone new gets an invitation by e-mail; for a member or an
        open invitation, the name, cohort and student number are updated to the file's (an empty cell keeps what is there). Roles are not
        changed by an import. Nothing is written until you confirm the preview.
      </PageHeader>

      {result && result.ok && !result.duplicate ? <Notice tone="success">{rosterImportedSentence(result)}</Notice> : null}
      {result && result.ok && result.duplicate ? (
        <Notice tone="info">
          Already imported on <LabTime at={result.committedAt} courseTimeZone={timeZone} /> ({counted(result.rowCount, "row", "rows")}): no
          invitations were written again.
        </Notice>
      ) : null}
      {result && !result.ok ? <Notice tone="error">{result.message}</Notice> : null}

      <CsvImport
        transformHeader={(header) => header.trim().toLowerCase()}
        review={review}
        columns={rosterPreviewColumns}
        line={(check) => check.row.line}
        leavesOutProblems
        commit={({ checks }, file) => {
          const chosen = checks.filter((check) => check.status === "new" || check.status === "updated");
          if (chosen.length === 0) return <Notice tone="info">Every row matches the course already: there is nothing to import.</Notice>;
          // The file's reading names this preview: committing it twice imports it once.
          return (
            <fetcher.Form method="post">
              <input type="hidden" name="rows" value={JSON.stringify(chosen.map((check) => check.row))} />
              <input type="hidden" name="importKey" value={file.readId} />
              <Button type="submit" disabled={fetcher.state !== "idle"}>
                {fetcher.state !== "idle" ? "Importing…" : commitWords(chosen)}
              </Button>
            </fetcher.Form>
          );
        }}
      />
    </div>
  );
}

function commitWords(chosen: RosterRowCheck[]) {
  const invited = chosen.filter((check) => check.status === "new").length;
  return rosterCommitLabel(invited, chosen.length - invited);
}

const changeWords = (change: RosterChange) => `${change.field} ${change.from ? `“${change.from}”` : "(none)"} → “${change.to}”`;

const outcomeWords = {
  new: () => "New: an invitation is sent",
  unchanged: ({ match }: RosterRowCheck) => (match?.kind === "invitation" ? "Invited already, unchanged" : "Member already, unchanged"),
  updated: ({ match, changes }: RosterRowCheck) =>
    `${match?.kind === "invitation" ? "Invitation updated" : "Member updated"}: ${changes.map(changeWords).join("; ")}`,
  problem: () => "Left out",
} satisfies Record<RosterRowCheck["status"], (check: RosterRowCheck) => string>;

const rosterPreviewColumns: CsvColumn<RosterRowCheck>[] = [
  { header: "E-mail", cell: ({ row }) => row.email },
  { header: "Name", cell: ({ row }) => row.name },
  { header: "Cohort", cell: ({ row }) => row.cohort },
  { header: "Role", cell: ({ row }) => row.role || "student" },
  { header: "Student number", cell: ({ row }) => row.studentNumber },
  { header: "What happens", cell: (check) => outcomeWords[check.status](check) },
];

export function meta() {
  return [{ title: "Roster import · Benchpost" }];
}
