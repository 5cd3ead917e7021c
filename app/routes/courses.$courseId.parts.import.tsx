import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.parts.import";
import { CsvImport } from "~/components/import/csv-import";
import { PartColumns, partPreviewColumns, RejectedRows, usePartReview } from "~/components/import/part-import";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { maxImportRows, normaliseHeader, type ImportRowCheck } from "~/lib/kits/parts-csv";
import { counted } from "~/lib/plural";
import { nothingImportedSentence, partsImportedSentence } from "~/lib/import/import-words";
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
    const reply = submission.reply({ formErrors: [nothingImportedSentence(result.rejected.length, "parts")] });
    return data({ ...reply, rejected: result.rejected.slice(0, previewLimit) }, { status: 400 });
  }
  return { ok: true as const, ...result };
});

export default function ImportParts({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, existingLabels } = loaderData;
  const base = `/courses/${courseId}/parts`;
  const navigation = useNavigation();
  const imported = actionData && "ok" in actionData ? actionData : null;
  const review = usePartReview(existingLabels);

  return (
    <div className="flex flex-col gap-6">
      <PageHeader title="Import parts (CSV)" trail={[{ to: base, label: "Parts" }]}>
        One part per line. The file is checked here, in your browser, and nothing is saved until you import a file without problems; then
        every row goes in together, or none does.
      </PageHeader>

      {imported ? (
        <Notice tone="success">
          {partsImportedSentence(
            imported.created,
            imported.warnings.map((warning) => warning.label),
          )}{" "}
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
          {"rejected" in actionData ? <RejectedRows checks={actionData.rejected as ImportRowCheck[]} /> : null}
        </Notice>
      ) : null}

      <PartColumns templateHref={`${base}/template.csv`} />

      <CsvImport
        transformHeader={normaliseHeader}
        review={review}
        columns={partPreviewColumns}
        line={(check) => check.line}
        previewLimit={previewLimit}
        clearWhen={imported}
        commit={({ rows, checks }) => (
          <Form method="post">
            <input type="hidden" name="rows" value={JSON.stringify(rows)} />
            <Button type="submit" disabled={navigation.state === "submitting"}>
              Import {counted(checks.length, "part", "parts")}
            </Button>
          </Form>
        )}
      />
    </div>
  );
}

export function meta() {
  return [{ title: "Import parts · Benchpost" }];
}
