import { FormProvider, getFormProps, useForm } from "@conform-to/react";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.parts.new";
import { PartFields } from "~/components/kits/part-fields";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { blankCalibrationRows } from "~/lib/kits/part-form";
import { partInput, partKindLabels, type PartFormInput, type PartInput, type PartKind } from "~/lib/kits/part-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import { createPart } from "~/server/kits/parts.server";

const chosenKind = z.enum(["sphere", "fluid_lot", "column", "accessory"]);
const newPartSearch = z.object({ kind: chosenKind.optional() });

/** Empty rows offered for calibration points on a new fluid lot, so the form works without JavaScript. */
const blankCalibrationRowCount = 4;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { kind } = readSearchParams(request, newPartSearch);
  return { courseId: access.course.id, kind: kind ?? null };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, partInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { part } = await createPart(db, { courseId: access.course.id, actorId: access.user.id, input: submission.value });
  // The part page shows the checks (warnings) against today's inventory, so the redirect only says "saved".
  return redirect(`/courses/${access.course.id}/parts/${part.id}?saved=created`);
});

export default function NewPart({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, kind } = loaderData;
  const base = `/courses/${courseId}/parts`;
  return (
    <div className="flex max-w-2xl flex-col gap-6">
      <PageHeader title={kind ? `Add a ${partKindLabels[kind].toLowerCase()}` : "Add a part"} trail={[{ to: base, label: "Parts" }]}>
        Measurements in the units shown beside each box. Benchpost checks them against the material and the rest of the inventory once
        saved.
      </PageHeader>
      <Form method="get" className="flex flex-wrap items-end gap-3">
        <fieldset className="flex flex-wrap gap-2">
          <legend className="mb-1 text-sm font-medium">What kind of part?</legend>
          {chosenKind.options.map((option) => (
            <Button
              key={option}
              type="submit"
              name="kind"
              value={option}
              variant={option === kind ? "primary" : "secondary"}
              aria-pressed={option === kind}
            >
              {partKindLabels[option]}
            </Button>
          ))}
        </fieldset>
      </Form>
      {kind ? (
        <NewPartForm key={kind} kind={kind} lastResult={actionData} cancelTo={base} />
      ) : (
        <p className="text-ink-700">Choose the kind first: each asks for its own measurements.</p>
      )}
    </div>
  );
}

/** The form of one kind; choosing another kind starts a fresh one. */
function NewPartForm({ kind, lastResult, cancelTo }: { kind: PartKind; lastResult: Route.ComponentProps["actionData"]; cancelTo: string }) {
  const navigation = useNavigation();
  const [form, fields] = useForm<PartFormInput, PartInput>({
    lastResult,
    defaultValue: { kind, calibration: blankCalibrationRows(blankCalibrationRowCount) },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, partInput),
  });
  return (
    <Form method="post" className="flex flex-col gap-4" {...getFormProps(form)}>
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
      <FormProvider context={form.context}>
        <PartFields kind={kind} fields={fields} />
      </FormProvider>
      <div className="flex gap-3">
        <Button type="submit" disabled={navigation.state === "submitting"}>
          Save the part
        </Button>
        <Link to={cancelTo} className="px-4 py-2 text-sm underline">
          Cancel
        </Link>
      </div>
    </Form>
  );
}

export function meta() {
  return [{ title: "Add a part · Benchpost" }];
}
