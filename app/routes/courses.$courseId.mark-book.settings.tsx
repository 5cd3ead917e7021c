import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { data, Form, useNavigation } from "react-router";
import type { Route } from "./+types/courses.$courseId.mark-book.settings";
import { TextField } from "~/components/ui/field";
import { Button, ButtonLink } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { parseSubmission } from "~/lib/forms/submission";
import { markBookSettingsInput } from "~/lib/marking/mark-book";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { markBookFrame, saveMarkBookSettings } from "~/server/marking/mark-book.server";
import { counted } from "~/lib/plural";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { dropLowest, labs } = await markBookFrame(db, access);
  return { courseId: access.course.id, timeZone: access.course.timeZone, dropLowest, labs };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, markBookSettingsInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  await saveMarkBookSettings(db, { access, input: submission.value, request });
  return { saved: true as const };
});

export default function MarkBookSettings({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, dropLowest, labs } = loaderData;
  const navigation = useNavigation();
  const reply = actionData && "saved" in actionData ? undefined : actionData;
  const [form, fields] = useForm({
    id: "mark-book-settings",
    lastResult: reply,
    defaultValue: { dropLowest: String(dropLowest), labs: labs.map((lab) => ({ labId: lab.id, weight: String(lab.weight) })) },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, markBookSettingsInput),
  });
  const labFields = fields.labs.getFieldList();
  return (
    <div className="flex max-w-2xl flex-col gap-6">
      <PageHeader title="Mark book: weights and dropped labs" trail={[{ to: `/courses/${courseId}/mark-book`, label: "Mark book" }]}>
        The term total is each student&apos;s released lab percentages averaged with these weights. A weight says how much a lab counts
        against the others (2 counts twice as much as 1); 0 leaves it out.
      </PageHeader>
      {actionData && "saved" in actionData ? <Notice tone="success">Saved. The mark book uses the new weights.</Notice> : null}
      <Form method="post" className="flex flex-col gap-5" {...getFormProps(form)}>
        {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
        {labs.length === 0 ? <p className="text-ink-700">No lab is published yet: the weights come with the labs.</p> : null}
        <fieldset className="flex flex-col gap-3">
          <legend className="mb-1 text-sm font-medium">Weight of each lab</legend>
          {labFields.map((labField, index) => {
            const lab = labs[index];
            const row = labField.getFieldset();
            if (!lab) return null;
            return (
              <div key={labField.key} className="flex flex-wrap items-end gap-3">
                <input {...getInputProps(row.labId, { type: "hidden" })} />
                <TextField
                  label={lab.title}
                  field={row.weight}
                  inputMode="decimal"
                  className="w-72"
                  hint={`Due ${formatDateTime(lab.dueAt, timeZone, "long")}${lab.maximum > 0 ? `, out of ${counted(lab.maximum, "point", "points")}` : ", no rubric yet"}`}
                />
              </div>
            );
          })}
        </fieldset>
        <TextField
          label="Lowest labs dropped per student"
          field={fields.dropLowest}
          inputMode="numeric"
          className="w-72"
          // Dropping each student's lowest lab (or two) is common practice in lab courses: one bad week does not sink a term.
          hint="Each student's lowest percentages among their weighted labs are left out of the total, never all of them. 0 drops none."
        />
        <div className="flex gap-3">
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Save the weights
          </Button>
          <ButtonLink to={`/courses/${courseId}/mark-book`} variant="secondary">
            Back to the mark book
          </ButtonLink>
        </div>
      </Form>
    </div>
  );
}

export function meta() {
  return [{ title: "Mark book settings · Benchpost" }];
}
