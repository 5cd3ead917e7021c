import { data, redirect, useSearchParams } from "react-router";
import type { Route } from "./+types/courses.$courseId.parts.$partId";
import { PartBiasBadge, PartBiasEvidence } from "~/components/comparison/part-bias";
import { StatusBadge } from "~/components/kits/status-badge";
import { CalibrationSection } from "~/components/parts/calibration-section";
import { PartHistory } from "~/components/parts/part-history";
import { RecordedValues } from "~/components/parts/recorded-values";
import { RemeasureForm } from "~/components/parts/remeasure-form";
import { RereductionList } from "~/components/parts/rereduction-list";
import { StatusActions } from "~/components/parts/status-actions";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { isEntityId } from "~/lib/forms/ids";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { measurementSummary } from "~/lib/kits/part-display";
import { partRemeasure, partStatusChange } from "~/lib/kits/part-form";
import { partKindLabels, type PartKind } from "~/lib/kits/part-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { listPartBias, partBiasFor } from "~/server/comparison/part-quality.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { getPartPage, setPartStatus, updatePart } from "~/server/kits/parts.server";
import { listRereductions } from "~/server/kits/rereduce.server";

function partIdFrom(params: { partId?: string }): string {
  const partId = isEntityId(params.partId) ? params.partId : null;
  if (!partId) throw data("Not found", { status: 404 });
  return partId;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor", "ta"]);
  const partId = partIdFrom(params);
  const [page, bias, rereductions] = await Promise.all([
    getPartPage(db, access, partId),
    listPartBias(db, access.course.id, partId),
    listRereductions(db, partId),
  ]);
  if (!page) throw data("Not found", { status: 404 });
  const report = bias.get(partId);
  return {
    ...page,
    bias: report ? partBiasFor(access, report) : null,
    rereductions,
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    mayEdit: access.membership.role === "instructor",
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const partId = partIdFrom(params);
  const submission = parseSubmission(formData, formData.get("intent") === "status" ? partStatusChange : partRemeasure);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const scope = { courseId: access.course.id, partId, actorId: access.user.id };
  const input = submission.value;
  const done =
    input.intent === "status"
      ? await setPartStatus(db, { ...scope, status: input.status, note: input.note })
      : await updatePart(db, { ...scope, input, note: input.note });
  if (!done) throw data("Not found", { status: 404 });
  return redirect(`/courses/${access.course.id}/parts/${partId}?saved=${input.intent === "status" ? "status" : "remeasured"}`);
});

const savedMessages: Record<string, string> = {
  created: "The part is recorded.",
  remeasured: "The new measurements are saved; the history keeps the old ones. Hand-ins that used this part get a new reduction revision.",
  status: "The status is changed.",
};

export default function PartPage({ loaderData, actionData }: Route.ComponentProps) {
  const { part, kit, warnings, calibration, bias, rereductions, courseId, timeZone, mayEdit } = loaderData;
  const [search] = useSearchParams();
  const saved = savedMessages[search.get("saved") ?? ""];
  const base = `/courses/${courseId}`;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader title={`${partKindLabels[part.kind as PartKind]} ${part.label}`} trail={[{ to: `${base}/parts`, label: "Parts" }]}>
        <span className="flex flex-wrap items-center gap-2">
          <StatusBadge status={part.status} />
          {bias?.flagged ? <PartBiasBadge /> : null}
          <span>{measurementSummary(part)}</span>
        </span>
      </PageHeader>
      {saved ? <Notice tone="success">{saved}</Notice> : null}
      <RereductionList runs={rereductions} timeZone={timeZone} />
      {warnings.length ? (
        <Notice tone="warning">
          <p className="font-medium">Check these measurements</p>
          <ul className="mt-1 list-disc pl-5">
            {warnings.map((warning) => (
              <li key={warning.message}>{warning.message}</li>
            ))}
          </ul>
        </Notice>
      ) : null}

      <section aria-labelledby="values-heading" className="grid gap-6 md:grid-cols-2">
        <RecordedValues part={part} kit={kit} courseId={courseId} />
        {mayEdit ? <StatusActions status={part.status} lastResult={replyFor(actionData, "status")} /> : null}
      </section>

      {bias ? <PartBiasEvidence bias={bias} courseId={courseId} /> : null}

      {calibration ? <CalibrationSection calibration={calibration} label={part.label} /> : null}

      {mayEdit ? <RemeasureForm kind={part.kind} defaults={part} lastResult={replyFor(actionData, "remeasure")} /> : null}

      <PartHistory kind={part.kind} events={part.events} courseId={courseId} timeZone={timeZone} />
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData ? `Part ${loaderData.part.label}` : "Part"} · Benchpost` }];
}
