import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/courses.$courseId.messages.new";
import { Button } from "~/components/ui/button";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import {
  BODY_MAX,
  handInStateLabels,
  handInStates,
  type MessageForm,
  type MessageInput,
  messageInput,
  SUBJECT_MAX,
} from "~/lib/messages/message-input";
import { requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { messageChoices, previewCourseMessage, sendCourseMessage } from "~/server/messages/course-messages.server";
import { counted } from "~/lib/plural";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  return { ...(await messageChoices(db, access)), courseId: access.course.id };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const submission = parseSubmission(formData, messageInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { intent, cohortIds, labId, handInState, subject, body } = submission.value;
  const audience = { cohortIds, labId, handInState };
  if (intent === "preview") return { ...submission.reply(), preview: await previewCourseMessage(db, access, { audience, subject, body }) };
  const { sendKey, expectedCount } = submission.value;
  const sent = await sendCourseMessage(db, access, { audience, subject, body, sendKey, expectedCount }, request);
  return redirect(`/courses/${access.course.id}/messages?sent=${sent.recipientCount}`);
});

export default function NewCourseMessage({ loaderData, actionData }: Route.ComponentProps) {
  const { cohorts, labs, courseId } = loaderData;
  const busy = useNavigation().state !== "idle";
  const preview = actionData && "preview" in actionData ? actionData.preview : undefined;
  const [form, fields] = useForm<MessageForm, MessageInput>({
    lastResult: actionData as SubmissionResult | undefined,
    // With one cohort there is nothing to choose.
    defaultValue: { cohortIds: cohorts.length === 1 ? [cohorts[0].id] : [] },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, messageInput),
  });
  const chosen = [fields.cohortIds.initialValue ?? []].flat();
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <PageHeader title="Write to students" trail={[{ to: `/courses/${courseId}/messages`, label: "Messages" }]}>
        Choose who it goes to, preview the count and the e-mail, then send. It goes out by e-mail and is kept on each student's record.
      </PageHeader>
      <Form method="post" className="space-y-4" {...getFormProps(form)}>
        {form.errors ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
        <fieldset aria-describedby={fields.cohortIds.errors ? fields.cohortIds.errorId : undefined}>
          <legend className="text-sm font-medium text-ink-900">Cohorts</legend>
          <div className="mt-1 flex flex-wrap gap-4">
            {cohorts.map((cohort) => (
              <label key={cohort.id} className="flex items-center gap-1.5 py-1 text-sm">
                <input
                  type="checkbox"
                  className="size-5 shrink-0"
                  name={fields.cohortIds.name}
                  value={cohort.id}
                  defaultChecked={chosen.includes(cohort.id)}
                />
                {cohort.name}
              </label>
            ))}
          </div>
          {cohorts.length === 0 ? (
            <p className="text-sm text-ink-700">You are assigned to no cohort: there is no one to write to.</p>
          ) : null}
          {fields.cohortIds.errors ? (
            <p id={fields.cohortIds.errorId} className="mt-1 text-sm font-medium text-outlier">
              {fields.cohortIds.errors.join(" ")}
            </p>
          ) : null}
        </fieldset>
        <div className="grid gap-4 sm:grid-cols-2">
          <SelectField label="Only the students of a lab" field={fields.labId} hint="Optional: the students the lab is set for.">
            <option value="">Any lab</option>
            {labs.map((lab) => (
              <option key={lab.id} value={lab.id}>
                {lab.title}
              </option>
            ))}
          </SelectField>
          <SelectField label="Whose hand-in of that lab is" field={fields.handInState} hint="Optional; needs a lab.">
            <option value="">Any</option>
            {handInStates.map((state) => (
              <option key={state} value={state}>
                {handInStateLabels[state]}
              </option>
            ))}
          </SelectField>
        </div>
        <TextField label="Subject" field={fields.subject} maxLength={SUBJECT_MAX} required />
        <TextAreaField
          label="Message"
          field={fields.body}
          rows={8}
          maxLength={BODY_MAX}
          hint="Plain text; a blank line starts a new paragraph."
          required
        />
        {preview ? (
          <section aria-labelledby="preview-title" className="space-y-3 rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
            <h2 id="preview-title" className="text-lg font-medium">
              Preview
            </h2>
            <p className="text-sm" data-testid="message-count">
              {preview.audienceLabel}: <strong>{studentCount(preview.count)}</strong>
              {preview.names.length ? `, among them ${preview.names.join(", ")}${preview.count > preview.names.length ? "…" : ""}` : ""}.
            </p>
            <p className="text-sm text-ink-700">Subject line: {preview.email.subject}</p>
            <iframe
              title="The e-mail as students will get it"
              srcDoc={preview.email.html}
              sandbox=""
              className="h-96 w-full rounded ring-1 ring-ink-900/10"
            />
            {preview.count > 0 ? (
              <>
                <input type="hidden" name="sendKey" value={preview.sendKey} />
                <input type="hidden" name="expectedCount" value={preview.count} />
              </>
            ) : null}
          </section>
        ) : null}
        <div className="flex flex-wrap gap-3">
          <Button type="submit" name="intent" value="preview" variant={preview ? "secondary" : "primary"} disabled={busy}>
            {preview ? "Preview again" : "Preview"}
          </Button>
          {preview && preview.count > 0 ? (
            <Button type="submit" name="intent" value="send" disabled={busy}>
              {`Send to ${studentCount(preview.count)}`}
            </Button>
          ) : null}
        </div>
      </Form>
    </div>
  );
}

const studentCount = (count: number) => counted(count, "student", "students");

export function meta() {
  return [{ title: "Write to students · Benchpost" }];
}
