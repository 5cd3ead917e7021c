import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { data, Form, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.edit";
import { LabFields } from "~/components/labs/lab-form";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { labInputFor, storedLabFormValues } from "~/lib/labs/lab-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { closeLab, getLab, getLabFormOptions, updateLab } from "~/server/labs/labs.server";
import { isEntityId } from "~/lib/forms/ids";

const labIntent = z.enum(["save", "publish", "close"], { error: "Choose save, publish or close." });

const statusNames = { draft: "Draft: students do not see it", published: "Published", closed: "Closed: no more hand-ins" } as const;

async function loadOwnLab(courseId: string, labId: string) {
  const lab = isEntityId(labId) ? await getLab(db, courseId, labId) : null;
  if (!lab) throw data("Not found", { status: 404 });
  return lab;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const [lab, options] = await Promise.all([loadOwnLab(access.course.id, params.labId), getLabFormOptions(db, access.course.id)]);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    lab: { id: lab.id, title: lab.title, status: lab.status },
    values: storedLabFormValues(lab, access.course.timeZone),
    ...options,
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const lab = await loadOwnLab(access.course.id, params.labId);
  const intent = labIntent.safeParse(formData.get("intent"));
  if (!intent.success) throw new AppError({ code: "invalid_value", message: intent.error.issues[0].message });
  if (intent.data === "close") {
    await closeLab(db, { access, labId: lab.id, request });
    return { done: "closed" as const };
  }
  const submission = parseSubmission(formData, labInputFor(access.course.timeZone));
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const saved = await updateLab(db, { access, labId: lab.id, input: submission.value, intent: intent.data, request });
  return { done: intent.data === "publish" ? ("published" as const) : ("saved" as const), status: saved.status };
});

const doneMessages = {
  saved: "Saved.",
  published: "Published: students of the chosen cohorts see the lab, and the reminders are scheduled.",
  closed: "Closed: the lab takes no more hand-ins.",
} as const;

export default function EditLab({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, lab } = loaderData;
  const [search] = useSearchParams();
  // A refused close is told above the page; any other refusal belongs to the settings form.
  const closeReply = replyFor(actionData, "close");
  const reply = closeReply || !actionData || "done" in actionData ? undefined : actionData;
  const closeErrors = Object.values(closeReply?.error ?? {}).flatMap((messages) => messages ?? []);
  return (
    <div className="flex max-w-4xl flex-col gap-6">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor />}
      >
        {statusNames[lab.status]}
      </PageHeader>
      {search.get("saved") === "created" && !actionData ? (
        <Notice tone="success">The draft is saved. Check it, then publish it to its cohorts.</Notice>
      ) : null}
      {actionData && "done" in actionData ? <Notice tone="success">{doneMessages[actionData.done]}</Notice> : null}
      {closeErrors.length ? <Notice tone="error">{closeErrors.join(" ")}</Notice> : null}
      {/* Keyed on the stored values so that a successful save shows what was stored. */}
      <LabSettingsForm key={JSON.stringify(loaderData.values)} loaderData={loaderData} reply={reply} />
      {lab.status === "published" ? (
        <Form method="post" className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
          <p className="mb-2 text-sm">Closing stops hand-ins at once, late ones too, and cancels the reminders still to go.</p>
          <Button type="submit" name="intent" value="close" variant="danger">
            Close the lab
          </Button>
        </Form>
      ) : null}
    </div>
  );
}

function LabSettingsForm({ loaderData, reply }: { loaderData: Route.ComponentProps["loaderData"]; reply: SubmissionResult | undefined }) {
  const { timeZone, lab, cohorts, parts } = loaderData;
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: reply,
    defaultValue: loaderData.values,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, labInputFor(timeZone)),
  });
  return (
    <Form method="post" className="flex flex-col gap-6" {...getFormProps(form)}>
      {form.errors?.length ? (
        <Notice tone="error">{form.errors.join(" ")}</Notice>
      ) : reply?.error ? (
        <Notice tone="error">Some fields need correcting; see the messages beside them.</Notice>
      ) : null}
      <LabFields fields={fields} timeZone={timeZone} cohorts={cohorts} parts={parts} />
      <div className="flex flex-wrap gap-3">
        <Button
          type="submit"
          name="intent"
          value="save"
          variant={lab.status === "draft" ? "secondary" : "primary"}
          disabled={navigation.state === "submitting"}
        >
          Save
        </Button>
        {lab.status !== "published" ? (
          <Button type="submit" name="intent" value="publish" disabled={navigation.state === "submitting"}>
            {lab.status === "closed" ? "Save and publish again" : "Save and publish"}
          </Button>
        ) : null}
      </div>
    </Form>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData ? `Edit ${loaderData.lab.title}` : "Lab"} · Benchpost` }];
}
