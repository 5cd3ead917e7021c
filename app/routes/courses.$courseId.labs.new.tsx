import { getFormProps, useForm } from "@conform-to/react";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.new";
import { LabFields } from "~/components/labs/lab-form";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { experimentKinds, labInputFor, newLabFormValues } from "~/lib/labs/lab-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
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
    values: newLabFormValues(kind),
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, labInputFor(access.course.timeZone));
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const lab = await createLab(db, { access, input: submission.value, request });
  // A new lab is a draft: the edit page is where it is checked and published.
  return redirect(`/courses/${access.course.id}/labs/${lab.id}/edit?saved=created`);
});

export default function NewLab({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, cohorts, parts } = loaderData;
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData,
    defaultValue: loaderData.values,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, labInputFor(timeZone)),
  });
  return (
    <div className="flex max-w-4xl flex-col gap-6">
      <PageHeader title="New lab" trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}>
        A new lab is saved as a draft: students see it once you publish it.
      </PageHeader>
      <Form method="post" className="flex flex-col gap-6" {...getFormProps(form)}>
        {form.errors?.length ? (
          <Notice tone="error">{form.errors.join(" ")}</Notice>
        ) : actionData?.error ? (
          <Notice tone="error">Some fields need correcting; see the messages beside them.</Notice>
        ) : null}
        <LabFields fields={fields} timeZone={timeZone} cohorts={cohorts} parts={parts} />
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
