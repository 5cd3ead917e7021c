import { getFormProps, useForm } from "@conform-to/react";
import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.addresses.import";
import { Button } from "~/components/ui/button";
import { TextAreaField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { TableHead } from "~/components/ui/table-head";
import { AppError } from "~/lib/app-error";
import { formatDateTime } from "~/lib/format-date";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { addressImportColumns } from "~/lib/shipping/address-import";
import { addressesImportedSentence, addressPreviewHeading } from "~/lib/shipping/address-words";
import { counted } from "~/lib/plural";
import { importAddresses, previewAddressImport, readAddressCsv } from "~/server/shipping/addresses.server";
import type { AddressImportPreview, AddressImportRow } from "~/server/shipping/addresses.server";

const previewInput = z.object({ intent: z.literal("preview"), csv: z.string().optional(), file: z.unknown().optional() });
const commitInput = z.object({
  intent: z.literal("commit"),
  csv: z.string().min(1, "The rows did not arrive; read the file again."),
  importKey: z.string().min(8, "The import key is missing; read the file again.").max(200),
  fingerprint: z.string().regex(/^[0-9a-f]{64}$/, "The preview did not arrive whole; read the file again."),
});

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { courseId: access.course.id, timeZone: access.course.timeZone };
}

/** The file's rows, or its one problem at the field it came from. */
function recordsOf(csv: string, field: string) {
  const { records, problem } = readAddressCsv(csv);
  if (problem) throw new AppError({ code: "address_import_refused", message: problem, field });
  return records;
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  if (formData.get("intent") === "commit") {
    const submission = parseSubmission(formData, commitInput);
    if (submission.status !== "success") return data(submission.reply(), { status: 400 });
    const { csv, importKey, fingerprint } = submission.value;
    const result = await importAddresses(db, {
      courseId: access.course.id,
      actorId: access.user.id,
      importKey,
      fingerprint,
      records: recordsOf(csv, "csv"),
      request,
    });
    if (!result.ok)
      return data({ intent: "commit" as const, stale: true as const, preview: result.preview, csv, importKey }, { status: 409 });
    return { intent: "commit" as const, result: result.duplicate ? { ...result, committedAt: result.committedAt.toISOString() } : result };
  }
  const submission = parseSubmission(formData, previewInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const file = formData.get("file");
  const csv = file instanceof File && file.size > 0 ? await file.text() : (submission.value.csv ?? "").trim();
  if (!csv) throw new AppError({ code: "address_import_empty", message: "Paste the rows, or choose a CSV file.", field: "csv" });
  const preview = await previewAddressImport(db, access.course.id, recordsOf(csv, "csv"));
  // The key names this preview: committing it twice writes once.
  return { intent: "preview" as const, preview, csv, importKey: crypto.randomUUID() };
});

export default function ImportAddresses({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone } = loaderData;
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({ id: "preview", lastResult: replyFor(actionData, "preview") });
  const commitErrors = replyFor(actionData, "commit")?.error;
  const shown = actionData && "preview" in actionData ? actionData : null;
  const done = actionData && "result" in actionData ? actionData.result : null;
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Import shipping addresses"
        trail={[{ to: `/courses/${courseId}/members`, label: "Members" }]}
        actions={
          <a href={`/courses/${courseId}/addresses/template.csv`} className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20" download>
            Download the template CSV
          </a>
        }
      >
        One address per line, matched by e-mail to a student of the course or a pending invitation. Columns:{" "}
        {addressImportColumns.map((column, index) => (
          <span key={column}>
            {index ? ", " : null}
            <code>{column}</code>
          </span>
        ))}{" "}
        (a blank name is the student&apos;s own). Nothing is written until you confirm the preview; then every ready row is written
        together, or none is.
      </PageHeader>

      {done && !done.duplicate ? <Notice tone="success">{addressesImportedSentence(done)}</Notice> : null}
      {done && done.duplicate ? (
        <Notice tone="info">Already imported on {formatDateTime(done.committedAt, timeZone)}: nothing was written again.</Notice>
      ) : null}
      {shown && "stale" in shown ? (
        <Notice tone="warning">
          The course changed since the preview (an address entered or an invitation accepted): nothing was written. Here is the preview
          again.
        </Notice>
      ) : null}
      {commitErrors ? <Notice tone="error">{Object.values(commitErrors).flat().join(" ")}</Notice> : null}

      <Form method="post" encType="multipart/form-data" className="grid gap-4 md:grid-cols-2" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="preview" />
        <div className="flex flex-col gap-2">
          <label htmlFor="address-file" className="text-sm font-medium">
            Upload a CSV file
          </label>
          <input id="address-file" name="file" type="file" accept=".csv,text/csv" className="text-sm" />
        </div>
        <TextAreaField label="…or paste the rows, header first" field={fields.csv} rows={4} controlClassName="font-mono text-xs" />
        <Button type="submit" variant="secondary" disabled={busy} className="self-start">
          Preview against the course
        </Button>
      </Form>

      {shown?.preview && shown.csv && shown.importKey ? (
        <Preview preview={shown.preview} csv={shown.csv} importKey={shown.importKey} busy={busy} />
      ) : null}
    </div>
  );
}

const statusWords: Record<AddressImportRow["status"], string> = {
  new: "New",
  changed: "Changed",
  unchanged: "Unchanged",
  error: "Problem",
};

function Preview({ preview, csv, importKey, busy }: { preview: AddressImportPreview; csv: string; importKey: string; busy: boolean }) {
  const count = (status: AddressImportRow["status"]) => preview.rows.filter((row) => row.status === status).length;
  const toWrite = count("new") + count("changed");
  // Rows with problems first: they are what has to be acted on.
  const ordered = [...preview.rows].sort((a, b) => Number(b.status === "error") - Number(a.status === "error"));
  return (
    <section aria-labelledby="preview-title" className="flex flex-col gap-3">
      <h2 id="preview-title" className="text-lg font-semibold">
        {addressPreviewHeading(preview.rows.length, {
          new: count("new"),
          changed: count("changed"),
          unchanged: count("unchanged"),
          error: count("error"),
        })}
      </h2>
      {toWrite ? (
        <Form method="post" className="flex flex-col gap-2">
          <input type="hidden" name="intent" value="commit" />
          <input type="hidden" name="csv" value={csv} />
          <input type="hidden" name="importKey" value={importKey} />
          <input type="hidden" name="fingerprint" value={preview.fingerprint} />
          {count("error") ? (
            <p className="text-sm">The rows with problems are left out; fix them in the file and import it again.</p>
          ) : null}
          <Button type="submit" disabled={busy} className="self-start">
            {busy ? "Importing…" : `Write ${counted(toWrite, "address", "addresses")}`}
          </Button>
        </Form>
      ) : (
        <Notice tone="info">Nothing to write: every row is unchanged or has a problem.</Notice>
      )}
      <div className="overflow-x-auto rounded-lg bg-white ring-1 ring-ink-900/10">
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Every row of the file with what the import does with it</caption>
          <TableHead headers={["Line", "E-mail", "Student", "Address", "Import"]} />
          <tbody className="divide-y divide-ink-900/5">
            {ordered.map((row) => (
              <tr key={row.line} className={row.status === "error" ? "bg-red-50" : undefined}>
                <td className="px-3 py-1.5">{row.line}</td>
                <td className="px-3 py-1.5">{row.email}</td>
                <td className="px-3 py-1.5">{row.studentName ?? "—"}</td>
                <td className="px-3 py-1.5">
                  {row.address
                    ? [row.address.line1, row.address.city, row.address.postcode, row.address.country].filter(Boolean).join(", ")
                    : "—"}
                </td>
                <td className="px-3 py-1.5">
                  {statusWords[row.status]}
                  {row.changedFields.length ? ` (${row.changedFields.join(", ")})` : null}
                  {row.problems.length ? (
                    <ul className="text-outlier">
                      {row.problems.map((problem) => (
                        <li key={problem}>{problem}</li>
                      ))}
                    </ul>
                  ) : null}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

export function meta() {
  return [{ title: "Import shipping addresses · Benchpost" }];
}
