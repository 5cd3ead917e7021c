import { Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.new";
import { LabFields } from "~/components/labs/lab-form";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { fieldErrors, formFailure } from "~/lib/forms/parse-form";
import { experimentKinds, labInputFor, labInputFromForm, newLabFormValues, submittedLabFormValues } from "~/lib/labs/lab-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { createLab, getLabFormOptions } from "~/server/labs/labs.server";

const newLabSearch = z.object({ kind: z.enum(experimentKinds).default("drag") });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const options = await getLabFormOptions(db, access.course.id);
  const { kind } = readSearchParams(request, newLabSearch);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    ...options,
    values: newLabFormValues(
      kind,
      options.cohorts.map((cohort) => cohort.id),
    ),
  };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const form = await request.formData();
  const values = submittedLabFormValues(form);
  const parsed = labInputFor(access.course.timeZone).safeParse(labInputFromForm(form));
  if (!parsed.success) return formFailure(values.fields, fieldErrors(parsed.error), { submitted: values });
  try {
    const lab = await createLab(db, { access, input: parsed.data, request });
    // A new lab is a draft: the edit page is where it is checked and published.
    return redirect(`/courses/${access.course.id}/labs/${lab.id}/edit?saved=created`);
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    return formFailure(values.fields, { [error.field ?? "form"]: [error.message] }, { submitted: values });
    throw error;
  }
}

export default function NewLab({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, cohorts, parts } = loaderData;
  const navigation = useNavigation();
  const errors = actionData?.errors ?? {};
  return (
    <div className="flex max-w-4xl flex-col gap-6">
      <PageHeader title="New lab" trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}>
        A new lab is saved as a draft: students see it once you publish it.
      </PageHeader>
      <Form method="post" className="flex flex-col gap-6">
        {errors.form ? <Notice tone="error">{errors.form.join(" ")}</Notice> : null}
        {Object.keys(errors).length && !errors.form ? (
          <Notice tone="error">Some fields need correcting; see the messages beside them.</Notice>
        ) : null}
        <LabFields
          values={actionData?.submitted ?? loaderData.values}
          errors={errors}
          timeZone={timeZone}
          cohorts={cohorts}
          parts={parts}
        />
        <div className="flex gap-3">
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Save the draft
          </Button>
          <Link to={`/courses/${courseId}/labs`} className="px-4 py-2 text-sm underline">
            Cancel
          </Link>
        </div>
      </Form>
    </div>
  );
}

export function meta() {
  return [{ title: "New lab · Benchpost" }];
}
