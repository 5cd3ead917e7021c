import { useEffect, useRef } from "react";
import { data, Form, Link, useFetcher, useNavigation, useSubmit } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.comparison";
import { DragCurveChart, FigureStripChart, ViscometryChart, type ComparisonPoint } from "~/components/comparison/comparison-charts";
import { labelWords } from "~/components/comparison/chart-parts";
import { Button } from "~/components/ui/button";
import { SelectField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { ClassLabelTag } from "~/components/comparison/class-label";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { PageHeader } from "~/components/ui/page-header";
import { TableHead } from "~/components/ui/table-head";
import { fieldErrors, formValues } from "~/lib/forms/parse-form";
import { comparisonLabels, comparisonMethods, comparisonSettings, methodNames } from "~/lib/comparison/comparison-settings";
import { formatNumber } from "~/lib/kits/part-display";
import {
  comparisonJson,
  getLabComparison,
  previewLabSettings,
  readComparisonFilters,
  updateComparisonSettings,
} from "~/server/comparison/class-comparison.server";
import { db } from "~/server/db.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadComparisonLab } from "~/server/comparison/class-comparison.server";
import { staffRoles } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadComparisonLab);
  const filters = readComparisonFilters(request);
  const comparison = await getLabComparison(db, access, lab, filters);
  return { ...comparisonJson(comparison), filters, courseId: access.course.id, mayEdit: access.membership.role === "instructor" };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const form = await request.formData();
  const intent = form.get("intent");
  // Any staff member may preview; changing the lab's method is the instructor's.
  const { access, lab } = await requireLabAccess(
    { request, context },
    params,
    intent === "save" ? ["instructor"] : ["instructor", "ta"],
    loadComparisonLab,
  );
  if (intent !== "preview" && intent !== "save")
    return data({ intent: "unknown" as const, errors: { form: ["Unknown request."] } }, { status: 400 });
  const parsed = comparisonSettings.safeParse(formValues(form));
  if (!parsed.success) return data({ intent, errors: fieldErrors(parsed.error), values: formValues(form) }, { status: 400 });
  if (intent === "preview") return { intent, preview: await previewLabSettings(db, lab, parsed.data) };
  const outcome = await updateComparisonSettings(db, { access, lab, settings: parsed.data, request });
  return { intent, saved: outcome };
}

type LoaderData = Route.ComponentProps["loaderData"];

export default function ComparisonPage({ loaderData, actionData }: Route.ComponentProps) {
  const { lab, method, classSize, counts, handIns, courseId, filters, cohorts, limits, mayEdit } = loaderData;
  const base = `/courses/${courseId}/labs/${lab.id}`;
  const points: ComparisonPoint[] = handIns.map((handIn) => ({
    id: handIn.dropLogId,
    href: handIn.href,
    studentName: handIn.student.name,
    label: handIn.label,
    figure: handIn.figure,
    reynolds: handIn.reynolds,
    dragCoefficient: handIn.dragCoefficient,
    viscosityPaS: handIn.viscosityPaS,
    referenceViscosityPaS: handIn.referenceViscosityPaS,
    temperatureC: handIn.temperatureC,
  }));
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
          <>
            <a href={`${base}/comparison.csv`} className="rounded px-3 py-2 text-sm underline" download>
              Download the table (CSV)
            </a>
          </>
        }
      >
        {classSize} counted hand-in{classSize === 1 ? "" : "s"}, compared by {method.description}. Labels are computed from the latest
        versions each time this page opens.
      </PageHeader>
      {actionData && "saved" in actionData && actionData.saved ? (
        <Notice tone="success">
          The method is saved and every hand-in relabelled: {actionData.saved.changed} label{actionData.saved.changed === 1 ? "" : "s"}{" "}
          changed.
        </Notice>
      ) : null}

      <Filters cohorts={cohorts} filters={filters} />
      <Counts counts={counts} />

      <section aria-labelledby="plots-heading" className="flex flex-col gap-8">
        <h2 id="plots-heading" className="text-lg font-semibold">
          Plots
        </h2>
        {lab.kind === "drag" ? (
          <DragCurveChart points={points} title={`Drag coefficient against Reynolds number, ${lab.title}`} />
        ) : (
          <ViscometryChart points={points} title={`Measured against reference viscosity, ${lab.title}`} />
        )}
        <FigureStripChart points={points} limits={limits} title={`Normalised figures of ${lab.title}`} />
      </section>

      <HandInTable handIns={handIns} />
      <MethodForm method={method} mayEdit={mayEdit} failure={actionData && "errors" in actionData ? actionData : undefined} />
      <p className="text-sm text-ink-700">
        The same data as JSON:{" "}
        <code>
          GET /api/v1/labs/{lab.id}/class-comparison{filterQuery ? `?${filterQuery}` : ""}
        </code>
      </p>
    </div>
  );
}

/** Cohort and label filters: with JavaScript they reload only the data as they change; without, the button does. */
function Filters({ cohorts, filters }: Pick<LoaderData, "cohorts" | "filters">) {
  const submit = useSubmit();
  const navigation = useNavigation();
  return (
    <Form
      method="get"
      className="no-print flex flex-wrap items-end gap-4"
      onChange={(event) => submit(event.currentTarget, { replace: true, preventScrollReset: true })}
    >
      <SelectField label="Cohort" name="cohort" defaultValue={filters.cohortId ?? ""}>
        <option value="">All cohorts you see</option>
        {cohorts.map((cohort) => (
          <option key={cohort.id} value={cohort.id}>
            {cohort.name}
          </option>
        ))}
      </SelectField>
      <SelectField label="Label" name="label" defaultValue={filters.label ?? ""}>
        <option value="">Every label</option>
        {comparisonLabels.map((label) => (
          <option key={label} value={label}>
            {labelWords[label]}
          </option>
        ))}
      </SelectField>
      <Button type="submit" variant="secondary">
        Show
      </Button>
      {navigation.state === "loading" ? (
        <span className="text-sm text-ink-600" role="status">
          Updating…
        </span>
      ) : null}
    </Form>
  );
}

function Counts({ counts }: Pick<LoaderData, "counts">) {
  return (
    <dl className="flex flex-wrap gap-6 text-sm">
      {comparisonLabels.map((label) => (
        <div key={label} className="rounded-lg bg-white px-4 py-2 ring-1 ring-ink-900/10">
          <dt className="text-ink-600">{labelWords[label]}</dt>
          <dd className="text-xl font-semibold" style={{ color: `var(--color-${label})` }}>
            {counts[label]}
          </dd>
        </div>
      ))}
    </dl>
  );
}

function HandInTable({ handIns }: Pick<LoaderData, "handIns">) {
  return (
    <section aria-labelledby="table-heading">
      <h2 id="table-heading" className="mb-2 text-lg font-semibold">
        Hand-ins
      </h2>
      <div className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
        <table className="min-w-full text-left text-sm">
          <TableHead headers={["Student", "Cohort", "Sphere / lot / column", "Figure", "Label", "Why"]} />
          <tbody className="divide-y divide-ink-900/5">
            {handIns.length === 0 ? (
              <tr>
                <td colSpan={6} className="px-3 py-6 text-center text-ink-600">
                  No hand-ins match.
                </td>
              </tr>
            ) : (
              handIns.map((handIn) => (
                <tr key={handIn.dropLogId} id={`drop-log-${handIn.dropLogId}`}>
                  <td className="px-3 py-2">
                    <Link to={handIn.href} className="underline underline-offset-2">
                      {handIn.student.name}
                    </Link>
                    {handIn.late ? <span className="ml-1 text-ink-600">(late)</span> : null}
                    {handIn.kitNotAtHome ? (
                      <span className="ml-1 text-amber-800">(kit {handIn.kitNotAtHome.toLowerCase()} at hand-in)</span>
                    ) : null}
                  </td>
                  <td className="px-3 py-2">{handIn.cohort?.name ?? "—"}</td>
                  <td className="px-3 py-2">
                    {[handIn.parts.sphere, handIn.parts.fluidLot, handIn.parts.column].map((part) => part?.label ?? "—").join(" / ")}
                  </td>
                  <td className="px-3 py-2">{formatNumber(handIn.figure)}</td>
                  <td className="px-3 py-2">
                    <ClassLabelTag label={handIn.label} />
                  </td>
                  <td className="px-3 py-2 text-ink-800">{handIn.reason}</td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
    </section>
  );
}

type Failure = { errors: Record<string, string[] | undefined>; values?: Record<string, string> };

/**
 * The lab's method. As the fields change, a fetcher asks the server how many hand-ins this choice and
 * a few alternatives would flag, before anything is saved.
 */
function MethodForm({ method, mayEdit, failure }: { method: LoaderData["method"]; mayEdit: boolean; failure?: Failure }) {
  const preview = useFetcher<typeof action>();
  const formRef = useRef<HTMLFormElement>(null);
  const navigation = useNavigation();
  const askPreview = () => {
    if (!formRef.current) return;
    const body = new FormData(formRef.current);
    body.set("intent", "preview");
    void preview.submit(body, { method: "post" });
  };
  // The counts for the saved method show as soon as the page is interactive.
  useEffect(askPreview, []);
  const previewData = preview.data && "preview" in preview.data ? preview.data.preview : null;
  const previewErrors = preview.data && "errors" in preview.data ? (preview.data.errors as Failure["errors"]) : undefined;
  const errors = failure?.errors ?? previewErrors ?? {};
  const values = failure?.values;
  return (
    <section aria-labelledby="method-heading" className="no-print max-w-3xl">
      <h2 id="method-heading" className="mb-2 text-lg font-semibold">
        Outlier method
      </h2>
      <Form
        method="post"
        ref={formRef}
        onChange={askPreview}
        className="flex flex-col gap-4 rounded-lg bg-white p-4 ring-1 ring-ink-900/10"
      >
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField label="Method" name="method" defaultValue={values?.method ?? method.method} error={errors.method}>
            {comparisonMethods.map((value) => (
              <option key={value} value={value}>
                {methodNames[value]}
              </option>
            ))}
          </SelectField>
          <TextField
            label="Grubbs / ESD: significance α"
            name="alpha"
            inputMode="decimal"
            defaultValue={values?.alpha ?? String(method.alpha)}
            error={errors.alpha}
            hint="Outlier at α; suspect at 2α."
          />
          <TextField
            label="Grubbs: most removals; ESD: upper bound r"
            name="maxOutliers"
            inputMode="numeric"
            defaultValue={values?.maxOutliers ?? String(method.maxOutliers)}
            error={errors.maxOutliers}
          />
          <TextField
            label="Tukey: fence factor k"
            name="k"
            inputMode="decimal"
            defaultValue={values?.k ?? String(method.k)}
            error={errors.k}
            hint="Suspect beyond k·IQR, outlier beyond 2k·IQR."
          />
        </div>
        <div aria-live="polite">
          {previewData ? (
            <table className="text-sm [&_td]:py-1 [&_td]:pr-6 [&_th]:pr-6 [&_th]:text-left [&_th]:font-medium">
              <caption className="mb-1 text-left font-medium">Would flag, of {previewData.classSize} hand-ins</caption>
              <thead>
                <tr>
                  <th scope="col">Setting</th>
                  <th scope="col">Suspect</th>
                  <th scope="col">Outlier</th>
                </tr>
              </thead>
              <tbody>
                {previewData.previews.map((row, index) => (
                  <tr key={`${index}-${row.description}`} className={index === 0 ? "font-semibold" : undefined}>
                    <td>
                      {index === 0 ? "Your choice: " : ""}
                      {row.description}
                    </td>
                    <td>{row.counts.suspect}</td>
                    <td>{row.counts.outlier}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : (
            <p className="text-sm text-ink-600">
              {preview.state === "idle" ? "Change a field to see how many hand-ins it would flag." : "Counting…"}
            </p>
          )}
        </div>
        <div className="flex flex-wrap gap-2">
          <Button type="submit" name="intent" value="preview" variant="secondary">
            Count without saving
          </Button>
          {mayEdit ? (
            <Button type="submit" name="intent" value="save" disabled={navigation.state === "submitting"}>
              Save and relabel every hand-in
            </Button>
          ) : null}
        </div>
      </Form>
    </section>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData ? `Comparison · ${loaderData.lab.title}` : "Class comparison"} · Benchpost` }];
}
