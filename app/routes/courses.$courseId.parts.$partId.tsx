import { formatDateTime } from "~/lib/format-date";
import { FormProvider, getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { useEffect } from "react";
import { data, Form, Link, redirect, useNavigation, useRevalidator, useSearchParams } from "react-router";
import type { Route } from "./+types/courses.$courseId.parts.$partId";
import { PartFields } from "~/components/kits/part-fields";
import { StatusBadge } from "~/components/kits/status-badge";
import { ViscosityChart } from "~/components/kits/viscosity-chart";
import { PartBiasBadge, PartBiasEvidence } from "~/components/comparison/part-bias";
import { TextAreaField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { readId } from "~/lib/forms/ids";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import type { FluidLotCalibration } from "~/lib/kits/fluid-lot-fit";
import type { CalibrationFinding } from "~/lib/kits/glycerol-water";
import { formatFieldValue, formatNumber, measurementSummary, partFieldLabels, partStatusLabels } from "~/lib/kits/part-display";
import { partRemeasure, partStatusChange, storedPartValues, type PartRemeasure, type PartRemeasureInput } from "~/lib/kits/part-form";
import { partKindLabels, type PartKind } from "~/lib/kits/part-input";
import { partToCsvRow } from "~/lib/kits/parts-csv";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { listPartBias, partBiasFor } from "~/server/comparison/part-quality.server";
import { getPartPage, setPartStatus, updatePart, type KitMention } from "~/server/kits/parts.server";
import { listRereductions, type RereductionProgress } from "~/server/kits/rereduce.server";

/** Spare empty calibration rows on the re-measure form, for adding points without JavaScript. */
const spareCalibrationRows = 2;

function partIdFrom(params: { partId?: string }): string {
  const partId = readId(params.partId);
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
        <div>
          <h2 id="values-heading" className="mb-2 text-lg font-semibold">
            Recorded values
          </h2>
          <dl className="grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
            {Object.entries(partToCsvRow(part))
              .filter(([column, value]) => value !== "" && column !== "kind" && column !== "calibration")
              .map(([column, value]) => (
                <div key={column} className="contents">
                  <dt className="text-ink-600">{partFieldLabels[columnField(column)] ?? column}</dt>
                  <dd>{value}</dd>
                </div>
              ))}
            <dt className="text-ink-600">Kit</dt>
            <dd>
              {kit ? (
                <>
                  <KitName kit={kit} courseId={courseId} />
                  {kit.id ? null : " (not a kit of your cohorts)"}
                </>
              ) : part.kind === "fluid_lot" ? (
                "Fills the bottles of the kits that name it"
              ) : (
                "In no kit"
              )}
            </dd>
          </dl>
        </div>
        {mayEdit ? <StatusActions status={part.status} lastResult={replyFor(actionData, "status")} /> : null}
      </section>

      {bias ? <PartBiasEvidence bias={bias} courseId={courseId} /> : null}

      {calibration ? <CalibrationSection calibration={calibration} label={part.label} /> : null}

      {mayEdit ? <RemeasureForm kind={part.kind} defaults={part} lastResult={replyFor(actionData, "remeasure")} /> : null}

      <History events={part.events} courseId={courseId} timeZone={timeZone} />
    </div>
  );
}

/** A kit the page mentions, linked only when the viewer may open it. */
function KitName({ kit, courseId }: { kit: KitMention; courseId: string }) {
  return kit.id ? (
    <Link to={`/courses/${courseId}/kits/${kit.id}`} className="underline">
      Kit {kit.number}
    </Link>
  ) : (
    <>Kit {kit.number}</>
  );
}

/** `diameter_mm` → `diameterMm`, to look up the on-screen label of a CSV column. */
const columnField = (column: string) => column.replace(/_(\w)/g, (_, letter: string) => letter.toUpperCase());

function StatusActions({ status, lastResult }: { status: keyof typeof partStatusLabels; lastResult?: SubmissionResult }) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "status",
    lastResult,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, partStatusChange),
  });
  const actions = [
    { to: "remeasure", label: "Send for re-measurement", show: status === "in_service" },
    { to: "in_service", label: "Return to service", show: status !== "in_service" },
    { to: "retired", label: "Retire the part", show: status !== "retired" },
  ] as const;
  return (
    <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
      <h2 className="text-lg font-semibold">Status</h2>
      <p className="text-sm text-ink-700">
        Now: {partStatusLabels[status]}. A part that needs re-measuring or is retired cannot be packed into a kit; saving new measurements
        returns it to service.
      </p>
      <input type="hidden" name="intent" value="status" />
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
      <TextAreaField label="Why (kept in the history)" field={fields.note} rows={2} maxLength={500} />
      <div className="flex flex-wrap gap-2">
        {actions
          .filter((action) => action.show)
          .map((action) => (
            <Button
              key={action.to}
              type="submit"
              name="status"
              value={action.to}
              variant={action.to === "retired" ? "danger" : "secondary"}
              disabled={navigation.state === "submitting"}
            >
              {action.label}
            </Button>
          ))}
      </div>
    </Form>
  );
}

/** A calibration point's handbook check in words (the warnings above say what to do). */
const calibrationFindingWords: Record<CalibrationFinding["kind"], string> = {
  agrees: "agrees with the handbook",
  "outside-tolerance": "outside the tolerance",
  "unit-slip": "unit slip? (mPa·s vs Pa·s)",
  "not-compared": "within a kit fluid's range",
};

function CalibrationSection({ calibration, label }: { calibration: FluidLotCalibration; label: string }) {
  const { fit, quoted, points, glycerolMassFraction } = calibration;
  return (
    <section aria-labelledby="fit-heading" className="flex flex-col gap-4">
      <h2 id="fit-heading" className="text-lg font-semibold">
        Viscosity calibration
      </h2>
      <p className="text-sm text-ink-700">
        {fit.kind === "andrade" ? (
          <>
            Andrade fit ln(μ / Pa·s) = A + B/T with T in kelvin, by least squares over {fit.pointCount} points from{" "}
            {fit.temperatureRange[0]} to {fit.temperatureRange[1]} °C: A = {formatNumber(fit.a, 5)}, B = {formatNumber(fit.b, 5)} K. The
            largest residual is {formatNumber(fit.maxRelativeResidual * 100, 2)} %.
          </>
        ) : (
          <>A constant viscosity of {formatNumber(Math.exp(fit.a))} Pa·s.</>
        )}{" "}
        Every reduction with this lot uses this fit at the drop's temperature.
      </p>
      {fit.warning ? <Notice tone="warning">{fit.warning}</Notice> : null}
      <div className="overflow-x-auto">
        <table className="text-sm">
          <caption className="mb-1 text-left font-medium">Fitted viscosity at room temperatures</caption>
          <thead>
            <tr className="text-left text-ink-600">
              <th scope="col" className="pr-6">
                Temperature (°C)
              </th>
              <th scope="col" className="pr-6">
                μ (Pa·s)
              </th>
              <th scope="col" />
            </tr>
          </thead>
          <tbody>
            {quoted.map((row) => (
              <tr key={row.temperatureC}>
                <td className="pr-6">{row.temperatureC}</td>
                <td className="pr-6">{formatNumber(row.viscosityPaS)}</td>
                <td className="text-ink-600">{row.extrapolated ? "outside the calibrated range" : ""}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <figure className="flex flex-col gap-2">
        <ViscosityChart calibration={calibration} title={`Viscosity against temperature for fluid lot ${label}`} />
        <figcaption className="text-sm text-ink-700">
          Dots: calibration points; line: the fitted curve (log axis). Below: each point's residual, measured ÷ fitted − 1, in per cent.
        </figcaption>
      </figure>
      {glycerolMassFraction !== null ? (
        <p className="text-sm text-ink-700">
          Declared a glycerol–water mix with a glycerol mass fraction of {glycerolMassFraction}: each point is compared with the handbook
          correlation of Cheng (2008) for 0–100 °C. The tolerance combines the correlation's own spread with half a per cent of glycerol and
          half a kelvin, so it is wider for strong mixes.
        </p>
      ) : null}
      <div className="overflow-x-auto">
        <table className="text-sm">
          <caption className="mb-1 text-left font-medium">
            {glycerolMassFraction !== null ? "Calibration points, residuals and handbook values" : "Calibration points and residuals"}
          </caption>
          <thead>
            <tr className="text-left text-ink-600">
              <th scope="col" className="pr-6">
                Temperature (°C)
              </th>
              <th scope="col" className="pr-6">
                Measured μ (Pa·s)
              </th>
              <th scope="col" className="pr-6">
                Fitted μ (Pa·s)
              </th>
              <th scope="col" className="pr-6">
                Residual (%)
              </th>
              {glycerolMassFraction !== null ? (
                <>
                  <th scope="col" className="pr-6">
                    Handbook μ (Pa·s)
                  </th>
                  <th scope="col" className="pr-6">
                    Measured vs handbook (%)
                  </th>
                </>
              ) : null}
              <th scope="col">Check</th>
            </tr>
          </thead>
          <tbody>
            {points.map((point) => (
              <tr key={point.temperatureC}>
                <td className="pr-6">{point.temperatureC}</td>
                <td className="pr-6">{formatNumber(point.viscosityPaS)}</td>
                <td className="pr-6">{formatNumber(point.fittedPaS)}</td>
                <td className="pr-6">{formatNumber(point.residualPercent, 2)}</td>
                {glycerolMassFraction !== null ? (
                  <>
                    <td className="pr-6">{formatNumber(point.handbookPaS)}</td>
                    <td className="pr-6">
                      {"differencePercent" in point.finding
                        ? `${formatNumber(point.finding.differencePercent, 2)} (±${formatNumber(point.finding.tolerancePercent, 2)})`
                        : "—"}
                    </td>
                  </>
                ) : null}
                <td>
                  {point.finding.kind === "not-compared" && glycerolMassFraction !== null
                    ? "outside the handbook's 0–100 °C"
                    : calibrationFindingWords[point.finding.kind]}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </section>
  );
}

type StoredPart = Route.ComponentProps["loaderData"]["part"];

function RemeasureForm({ kind, defaults, lastResult }: { kind: PartKind; defaults: StoredPart; lastResult?: SubmissionResult }) {
  const navigation = useNavigation();
  const [form, fields] = useForm<PartRemeasureInput, PartRemeasure>({
    id: "remeasure",
    lastResult,
    defaultValue: storedPartValues(defaults, spareCalibrationRows),
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, partRemeasure),
  });
  return (
    <section aria-labelledby="remeasure-heading" className="max-w-2xl">
      <details open={lastResult !== undefined} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
        <summary id="remeasure-heading" className="cursor-pointer text-lg font-semibold">
          Re-measure
        </summary>
        <Form method="post" className="mt-4 flex flex-col gap-4" {...getFormProps(form)}>
          <input type="hidden" name="intent" value="remeasure" />
          {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
          <FormProvider context={form.context}>
            <PartFields kind={kind} fields={fields} />
          </FormProvider>
          <TextAreaField label="What was re-measured, and why (kept in the history)" field={fields.note} rows={2} maxLength={500} />
          <Button type="submit" className="self-start" disabled={navigation.state === "submitting"}>
            Save the new measurements
          </Button>
        </Form>
      </details>
    </section>
  );
}

const eventWords: Record<string, string> = {
  created: "Recorded",
  remeasured: "Re-measured",
  "status:remeasure": "Sent for re-measurement",
  "status:retired": "Retired",
  "status:in_service": "Returned to service",
  checked_in: "Checked in",
};

function History({ events, courseId, timeZone }: { events: StoredPart["events"]; courseId: string; timeZone: string }) {
  return (
    <section aria-labelledby="history-heading">
      <h2 id="history-heading" className="mb-2 text-lg font-semibold">
        History
      </h2>
      <ol className="flex flex-col gap-3">
        {events.map((event) => {
          const changed = Object.entries((event.detail.changed ?? {}) as Record<string, { from: unknown; to: unknown }>);
          return (
            <li key={event.id} className="rounded-md bg-white p-3 text-sm ring-1 ring-ink-900/10">
              <p>
                <span className="font-medium">{eventWords[event.action] ?? event.action}</span>
                {event.detail.source === "csv-import" ? " from a CSV import" : null}
                {event.kit ? (
                  <>
                    {" with "}
                    <KitName kit={event.kit} courseId={courseId} />
                    {event.detail.condition && event.detail.condition !== "fine" ? ` (${String(event.detail.condition)})` : null}
                  </>
                ) : null}{" "}
                by {event.actor?.name ?? "a former member"},{" "}
                <time dateTime={new Date(event.createdAt).toISOString()}>{formatDateTime(event.createdAt, timeZone)}</time>
              </p>
              {event.note ? <p className="mt-1 text-ink-700">“{event.note}”</p> : null}
              {changed.length ? (
                <ul className="mt-1 text-ink-800">
                  {changed.map(([field, change]) => (
                    <li key={field}>
                      {partFieldLabels[field] ?? field}: {formatFieldValue(change.from)} → {formatFieldValue(change.to)}
                    </li>
                  ))}
                </ul>
              ) : null}
            </li>
          );
        })}
      </ol>
    </section>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData ? `Part ${loaderData.part.label}` : "Part"} · Benchpost` }];
}

/** How often the page reloads its data while a re-reduction runs. */
const PROGRESS_POLL_MS = 1500;

/** The part's recent re-reductions with their progress; the page refreshes itself until they finish. */
function RereductionList({ runs, timeZone }: { runs: RereductionProgress[]; timeZone: string }) {
  const revalidator = useRevalidator();
  const running = runs.some((run) => !run.finishedAt);
  useEffect(() => {
    if (!running) return;
    const timer = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, PROGRESS_POLL_MS);
    return () => clearInterval(timer);
  }, [running, revalidator]);
  if (runs.length === 0) return null;
  return (
    <section aria-labelledby="rereduction-heading">
      <h2 id="rereduction-heading" className="mb-2 text-lg font-semibold">
        Reduction revisions
      </h2>
      <ul className="flex flex-col gap-1 text-sm" aria-live="polite">
        {runs.map((run) => (
          <li key={run.id} data-testid="rereduction-progress">
            <time dateTime={run.createdAt}>{formatDateTime(run.createdAt, timeZone)}</time>: {run.done} of {run.total} hand-ins recomputed
            {run.finishedAt ? " — finished; the class comparison is relabelled." : " — running…"}
          </li>
        ))}
      </ul>
    </section>
  );
}
