import { useCallback, useState } from "react";
import { data, Form, Link, useNavigation } from "react-router";
import type { Route } from "./+types/courses.$courseId.kits.tracking-import";
import { LabTime } from "~/components/drop-logs/lab-time";
import { CsvImport, type CsvColumn, type CsvFile } from "~/components/import/csv-import";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { kitStateLabels } from "~/lib/kits/kit-states";
import {
  checkTrackingRows,
  missingTrackingColumns,
  normaliseTrackingHeader,
  outcomeWords,
  trackingCommit,
  trackingRowsFromRecords,
  type TrackingDirection,
  type TrackingRowCheck,
} from "~/lib/shipping/tracking-rows";
import { nothingImportedSentence } from "~/lib/import/import-words";
import { counted } from "~/lib/plural";
import { trackingImportedSentence } from "~/lib/shipping/tracking-words";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { importTracking, trackingImportKits } from "~/server/shipping/tracking-import.server";

/** How many rows the preview table shows; the counts above it cover every row. */
const previewLimit = 300;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { courseId: access.course.id, timeZone: access.course.timeZone, kits: await trackingImportKits(db, access.course.id) };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, trackingCommit);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { direction, importKey, rows } = submission.value;
  const result = await importTracking(db, { courseId: access.course.id, actorId: access.user.id, direction, importKey, rows, request });
  if (!result.ok) {
    const reply = submission.reply({
      formErrors: [nothingImportedSentence(result.problems.length, "kits")],
    });
    return data({ ...reply, problems: result.problems.slice(0, previewLimit) }, { status: 400 });
  }
  return { ...result, direction, committedAt: result.duplicate ? result.committedAt.toISOString() : null };
});

const directionWords: Record<TrackingDirection, string> = {
  outbound: "Outbound: kits going to students",
  return: "Returns: kits coming back to us",
};

export default function TrackingImport({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, kits } = loaderData;
  const navigation = useNavigation();
  const [direction, setDirection] = useState<TrackingDirection>("outbound");
  const review = useCallback(
    (file: CsvFile) => ({
      checks: checkTrackingRows(trackingRowsFromRecords(file.records), direction, kits),
      problems: missingTrackingColumns(file.headers),
    }),
    [direction, kits],
  );
  const imported = actionData && "ok" in actionData ? actionData : null;
  const refused = actionData && "status" in actionData ? actionData : null;

  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Import tracking numbers (CSV)"
        trail={[{ to: `/courses/${courseId}/kits`, label: "Kits" }]}
        actions={
          <a
            href={`/courses/${courseId}/kits/tracking-template.csv`}
            className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20"
            download
          >
            Download the template CSV
          </a>
        }
      >
        The file your carrier&apos;s shipping desk exports, one parcel per line, with the kit number as the parcel&apos;s reference.
        Columns: <code>Reference</code> (or <code>Kit</code>), <code>Tracking number</code>, <code>Carrier</code> and <code>Ship date</code>{" "}
        (or <code>Date</code>, as YYYY-MM-DD). Nothing is saved until you import a file without problems; then every line goes in together,
        or none does.
      </PageHeader>

      {imported && !imported.duplicate ? (
        <Notice tone="success">
          {trackingImportedSentence(imported)}{" "}
          <Link to={`/courses/${courseId}/kits`} className="underline">
            Back to the kits
          </Link>
        </Notice>
      ) : null}
      {imported && imported.duplicate && imported.committedAt ? (
        <Notice tone="info">
          Already imported on <LabTime at={imported.committedAt} courseTimeZone={timeZone} />: nothing was written again.
        </Notice>
      ) : null}
      {refused ? (
        <Notice tone="error">
          {Object.values(refused.error ?? {})
            .flat()
            .join(" ")}
          {"problems" in refused ? (
            <ul className="mt-2 list-disc pl-5">
              {(refused.problems as TrackingRowCheck[]).map((check) => (
                <li key={check.row.line}>
                  Line {check.row.line}: {check.problems.join(" ")}
                </li>
              ))}
            </ul>
          ) : null}
        </Notice>
      ) : null}

      <fieldset className="flex flex-col gap-1 text-sm">
        <legend className="mb-1 font-medium">The parcels in this file</legend>
        {(Object.keys(directionWords) as TrackingDirection[]).map((value) => (
          <label key={value} className="flex items-center gap-2">
            <input type="radio" name="direction-choice" checked={direction === value} onChange={() => setDirection(value)} />
            {directionWords[value]}
          </label>
        ))}
      </fieldset>

      <CsvImport
        transformHeader={normaliseTrackingHeader}
        review={review}
        columns={trackingPreviewColumns(direction)}
        line={(check) => check.row.line}
        previewLimit={previewLimit}
        clearWhen={imported}
        commit={({ checks }, file) => (
          // The file's reading names this preview: committing it twice imports it once.
          <Form method="post">
            <input type="hidden" name="direction" value={direction} />
            <input type="hidden" name="importKey" value={file.readId} />
            <input type="hidden" name="rows" value={JSON.stringify(checks.map((check) => check.row))} />
            <Button type="submit" disabled={navigation.state === "submitting"}>
              Import {counted(checks.length, `${direction} parcel`, `${direction} parcels`)}
            </Button>
          </Form>
        )}
      />
    </div>
  );
}

function trackingPreviewColumns(direction: TrackingDirection): CsvColumn<TrackingRowCheck>[] {
  return [
    { header: "Kit", cell: ({ kit, row }) => kit?.number ?? row.kit },
    { header: "Student", cell: ({ kit }) => kit?.holderName ?? "" },
    { header: "State", cell: ({ kit }) => (kit ? kitStateLabels[kit.state] : "") },
    { header: "Parcel", cell: ({ row }) => [row.carrier, row.tracking, row.date].filter(Boolean).join(" · ") },
    { header: "What happens", cell: (check) => outcomeWords(check, direction) },
  ];
}

export function meta() {
  return [{ title: "Import tracking numbers · Benchpost" }];
}
