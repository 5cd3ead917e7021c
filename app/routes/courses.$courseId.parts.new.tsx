import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.parts.new";
import { PartFields } from "~/components/kits/part-fields";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { fieldErrors, formValues } from "~/lib/forms/parse-form";
import { calibrationRows, partFormCandidate } from "~/lib/kits/part-form";
import { partInput, partKindLabels } from "~/lib/kits/part-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { createPart } from "~/server/kits/parts.server";

const chosenKind = z.enum(["sphere", "fluid_lot", "column", "accessory"]);
const newPartSearch = z.object({ kind: chosenKind.optional() });

/** Empty rows offered for calibration points on a new fluid lot, so the form works without JavaScript. */
const blankCalibrationRows = 4;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { kind } = readSearchParams(request, newPartSearch);
  return { courseId: access.course.id, kind: kind ?? null };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const form = await request.formData();
  const failure = (errors: Record<string, string[]>) =>
    data({ errors, values: formValues(form), calibration: calibrationRows(form) }, { status: 400 });
  const parsed = partInput.safeParse(partFormCandidate(form));
  if (!parsed.success) return failure(fieldErrors(parsed.error));
  let partId: string;
  try {
    partId = (await createPart(db, { courseId: access.course.id, actorId: access.user.id, input: parsed.data })).part.id;
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    return failure({ [error.field ?? "form"]: [error.message] });
  }
  // The part page shows the checks (warnings) against today's inventory, so the redirect only says "saved".
  return redirect(`/courses/${access.course.id}/parts/${partId}?saved=created`);
}

export default function NewPart({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, kind } = loaderData;
  const navigation = useNavigation();
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
        <Form method="post" className="flex flex-col gap-4" key={kind}>
          {actionData?.errors.form ? <Notice tone="error">{actionData.errors.form.join(" ")}</Notice> : null}
          <PartFields
            kind={kind}
            values={actionData?.values ?? {}}
            calibration={
              actionData?.calibration ?? Array.from({ length: blankCalibrationRows }, () => ({ temperatureC: "", viscosityPaS: "" }))
            }
            errors={actionData?.errors ?? {}}
          />
          <div className="flex gap-3">
            <Button type="submit" disabled={navigation.state === "submitting"}>
              Save the part
            </Button>
            <Link to={base} className="px-4 py-2 text-sm underline">
              Cancel
            </Link>
          </div>
        </Form>
      ) : (
        <p className="text-ink-700">Choose the kind first: each asks for its own measurements.</p>
      )}
    </div>
  );
}

export function meta() {
  return [{ title: "Add a part · Benchpost" }];
}
