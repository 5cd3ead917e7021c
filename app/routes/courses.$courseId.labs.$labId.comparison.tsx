import { data } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.comparison";
import { ComparisonFilters, LabelCountList } from "~/components/comparison/comparison-filters";
import { ComparisonPlots } from "~/components/comparison/comparison-plots";
import { HandInTable } from "~/components/comparison/hand-in-table";
import { MethodForm } from "~/components/comparison/method-form";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { comparisonSettings } from "~/lib/comparison/comparison-settings";
import { parseSubmission } from "~/lib/forms/submission";
import {
  COMPARISON_TABLE_PAGE_SIZE,
  comparisonJson,
  getLabComparison,
  loadComparisonLab,
  plotPointsOf,
  previewLabSettings,
  readComparisonFilters,
  updateComparisonSettings,
} from "~/server/comparison/class-comparison.server";
import { db } from "~/server/db.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { staffRoles } from "~/server/auth/access.server";
import { formAction } from "~/server/errors.server";
import { counted } from "~/lib/plural";
import { pagingSearch } from "~/lib/forms/search-params";
import { readSearchParams } from "~/server/http.server";
import { Pager } from "~/components/ui/data-table";

/** The hand-in table's page (`?page=`), in links that work without JavaScript. */
const tableSearch = z.object(pagingSearch(COMPARISON_TABLE_PAGE_SIZE));

/** The method form, sent to count ("preview") or to save. */
const methodSubmission = comparisonSettings.extend({ intent: z.enum(["preview", "save"], { error: "Unknown request." }) });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadComparisonLab);
  const filters = readComparisonFilters(request);
  const { page, size } = readSearchParams(request, tableSearch);
  const { handIns, ...comparison } = comparisonJson(await getLabComparison(db, access, lab, filters));
  // The plots and counts cover every hand-in shown; the table only its page, so the page's weight follows the table's size, not the class's.
  const shownPage = Math.min(page, Math.max(1, Math.ceil(handIns.length / size)));
  return {
    ...comparison,
    points: plotPointsOf(handIns),
    handIns: handIns.slice((shownPage - 1) * size, shownPage * size),
    pageInfo: { page: shownPage, pageSize: size, total: handIns.length },
    filters,
    courseId: access.course.id,
    mayEdit: access.membership.role === "instructor",
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  // Any staff member may count; changing the lab's method is the instructor's.
  const { access, lab } = await requireLabAccess(
    { request, context },
    params,
    formData.get("intent") === "save" ? ["instructor"] : ["instructor", "ta"],
    loadComparisonLab,
  );
  const submission = parseSubmission(formData, methodSubmission);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { intent, ...settings } = submission.value;
  if (intent === "preview") return { intent, preview: await previewLabSettings(db, lab, settings) };
  return { intent, saved: await updateComparisonSettings(db, { access, lab, settings, request }) };
});

export default function ComparisonPage({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, method, classSize, counts, points, handIns, pageInfo, courseId, filters, cohorts, limits, mayEdit } = loaderData;
  const base = `/courses/${courseId}/labs/${lab.id}`;
  const filterQuery = new URLSearchParams({
    ...(filters.cohortId ? { cohort: filters.cohortId } : {}),
    ...(filters.label ? { label: filters.label } : {}),
  }).toString();
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={mayEdit} />}
        actions={
          <a href={`${base}/comparison.csv`} className="rounded px-3 py-2 text-sm underline" download>
            Download the table (CSV)
          </a>
        }
      >
        {counted(classSize, "counted hand-in", "counted hand-ins")}, compared by {method.description}. Labels are computed from the latest
        versions each time this page opens.
      </PageHeader>
      {actionData && "saved" in actionData && actionData.saved ? (
        <Notice tone="success">
          The method is saved and every hand-in relabelled: {counted(actionData.saved.changed, "label", "labels")} changed.
        </Notice>
      ) : null}

      <ComparisonFilters cohorts={cohorts} filters={filters} />
      <LabelCountList counts={counts} />
      <ComparisonPlots courseId={courseId} lab={lab} points={points} limits={limits} />
      <div className="flex flex-col gap-2">
        <HandInTable handIns={handIns} />
        {pageInfo.total > pageInfo.pageSize ? <Pager pageInfo={pageInfo} /> : null}
      </div>
      <MethodForm
        method={method}
        mayEdit={mayEdit}
        lastResult={actionData && "status" in actionData ? actionData : undefined}
        countedWithoutScript={actionData && "preview" in actionData ? actionData.preview : undefined}
      />
      <p className="text-sm text-ink-700">
        The same data as JSON:{" "}
        <code>
          GET /api/v1/labs/{lab.id}/class-comparison{filterQuery ? `?${filterQuery}` : ""}
        </code>
      </p>
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData ? `Comparison · ${loaderData.lab.title}` : "Class comparison"} · Benchpost` }];
}
