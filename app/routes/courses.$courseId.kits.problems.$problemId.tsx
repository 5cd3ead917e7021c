import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.problems.$problemId";
import { FormErrors } from "~/components/kits/kit-moves";
import { ProblemHistory, ProblemStatusBadge, ReplacementParcel } from "~/components/kits/kit-problems";
import { Button } from "~/components/ui/button";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { describePart } from "~/lib/kits/describe-part";
import { isEntityId } from "~/lib/forms/ids";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { kitProblemKindLabels, kitProblemStatuses, kitProblemStatusLabels, nextProblemStatusesByHand } from "~/lib/kits/kit-problem-states";
import { canOpenKit, requireCourseRole, staffRoles, type CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { changeProblemStatus, getKitProblem, listReplacementCandidates, sendReplacement } from "~/server/kits/kit-problems.server";

const noteToStudent = z.string().trim().min(3, "Write the student a few words: they get them by e-mail.").max(1000);

const problemInput = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("status"), to: z.enum(kitProblemStatuses, { error: "Choose the new status." }), note: noteToStudent }),
  z.object({
    intent: z.literal("replacement"),
    replacementPartId: z.uuid({ error: "Choose the part to send." }),
    carrier: z.string().trim().min(1, "Name the carrier.").max(60),
    trackingNumber: z.string().trim().min(3, "Enter the tracking number.").max(60),
    // Made when the page is shown: the same form sent twice is the same replacement.
    requestKey: z.uuid(),
    note: noteToStudent,
  }),
]);

const validate = ({ formData }: { formData: FormData }) => parseSubmission(formData, problemInput);

async function loadProblemFor(access: CourseAccess, problemId: string | undefined) {
  const problem = problemId && isEntityId(problemId) ? await getKitProblem(db, access.course.id, problemId) : null;
  if (!problem) throw data("Not found", { status: 404 });
  // As with the kit: instructors any problem, TAs those of their cohorts' students.
  if (!canOpenKit(access, problem.cohortId)) throw data("Forbidden", { status: 403 });
  return problem;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const problem = await loadProblemFor(access, params.problemId);
  const canChange = access.membership.role === "instructor";
  const canReplace = canChange && problem.status === "received" && ["in_transit", "at_home"].includes(problem.kitState);
  const candidates = canReplace ? await listReplacementCandidates(db, access.course.id, problem) : [];
  return { problem, canChange, canReplace, candidates, requestKey: crypto.randomUUID(), timeZone: access.course.timeZone };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const problem = await loadProblemFor(access, params.problemId);
  const submission = parseSubmission(formData, problemInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  const scope = { courseId: access.course.id, actorId: access.user.id, problemId: problem.id };
  if (input.intent === "status") {
    await changeProblemStatus(db, { ...scope, to: input.to, note: input.note });
    return { intent: input.intent, saved: `Marked ${kitProblemStatusLabels[input.to].toLowerCase()}; the student has been e-mailed.` };
  }
  const { replacementPartId, carrier, trackingNumber, requestKey, note } = input;
  await sendReplacement(db, { ...scope, replacementPartId, carrier, trackingNumber, requestKey, note });
  return { intent: input.intent, saved: "Replacement sent: it is in the kit now, and the student has been e-mailed the tracking number." };
});

export default function KitProblemPage({ loaderData, actionData }: Route.ComponentProps) {
  const { problem, canChange, canReplace, candidates, requestKey, timeZone } = loaderData;
  const next = nextProblemStatusesByHand(problem.status);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title={`${kitProblemKindLabels[problem.kind]}${problem.partLabel ? `: ${problem.partLabel}` : ""}`}
        trail={[
          { to: `/courses/${problem.courseId}/kits`, label: "Kits" },
          { to: `/courses/${problem.courseId}/kits/problems`, label: "Kit problems" },
        ]}
      >
        <ProblemStatusBadge status={problem.status} />{" "}
        <span className="ml-2">
          <Link to={`/courses/${problem.courseId}/kits/${problem.kitId}`} className="underline">
            Kit {problem.kitNumber}
          </Link>{" "}
          · {problem.studentName ?? "former student"} ({problem.cohortName ?? "no cohort"})
        </span>
      </PageHeader>

      {actionData && "saved" in actionData ? <Notice tone="success">{actionData.saved}</Notice> : null}

      <section aria-labelledby="report-heading" className="flex flex-col gap-2 rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
        <h2 id="report-heading" className="font-semibold">
          What the student wrote
        </h2>
        <p>“{problem.note}”</p>
        <ReplacementParcel replacementLabel={problem.replacementLabel} parcel={problem.parcel} />
      </section>

      {canReplace ? (
        <ReplacementForm candidates={candidates} requestKey={requestKey} lastResult={replyFor(actionData, "replacement")} />
      ) : null}
      {canChange && next.length ? <StatusForm next={next} lastResult={replyFor(actionData, "status")} /> : null}

      <section aria-labelledby="problem-history">
        <h2 id="problem-history" className="mb-2 text-lg font-semibold">
          History
        </h2>
        <ProblemHistory updates={problem.updates} timeZone={timeZone} />
      </section>
    </div>
  );
}

function ReplacementForm({
  candidates,
  requestKey,
  lastResult,
}: {
  candidates: Route.ComponentProps["loaderData"]["candidates"];
  requestKey: string;
  lastResult?: SubmissionResult;
}) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "replacement",
    lastResult,
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: validate,
  });
  return (
    <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
      <input type="hidden" name="intent" value="replacement" />
      <input type="hidden" name="requestKey" value={requestKey} />
      <h2 className="font-semibold">Send a replacement</h2>
      <p className="text-sm text-ink-700">
        The part goes into the kit in place of the reported one; a broken or lost sphere, column or accessory is retired.
      </p>
      <FormErrors errors={form.errors} />
      <SelectField label="Part from the shelf" field={fields.replacementPartId} required>
        <option value="">{candidates.length ? "Choose a part…" : "No part of this kind is on the shelf"}</option>
        {candidates.map((part) => {
          const { kind, values } = describePart(part);
          return (
            <option key={part.id} value={part.id}>
              {part.label} — {kind} {values}
            </option>
          );
        })}
      </SelectField>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField label="Carrier" field={fields.carrier} required />
        <TextField label="Tracking number" field={fields.trackingNumber} required />
      </div>
      <TextAreaField label="Note to the student" field={fields.note} rows={2} required />
      <Button type="submit" disabled={navigation.state === "submitting"}>
        Send the replacement and tell the student
      </Button>
    </Form>
  );
}

function StatusForm({ next, lastResult }: { next: readonly (typeof kitProblemStatuses)[number][]; lastResult?: SubmissionResult }) {
  const [form, fields] = useForm({ id: "status", lastResult, shouldValidate: "onBlur", shouldRevalidate: "onInput", onValidate: validate });
  return (
    <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
      <input type="hidden" name="intent" value="status" />
      <h2 className="font-semibold">Change the status</h2>
      <FormErrors errors={form.errors} />
      <TextAreaField label="Note to the student" field={fields.note} rows={2} required />
      {fields.to.errors?.length ? <Notice tone="error">{fields.to.errors.join(" ")}</Notice> : null}
      <div className="flex flex-wrap gap-2">
        {next.map((status) => (
          <Button key={status} type="submit" name="to" value={status} variant="secondary">
            Mark {kitProblemStatusLabels[status].toLowerCase()}
          </Button>
        ))}
      </div>
    </Form>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Kit ${loaderData?.problem.kitNumber ?? ""} problem · Benchpost` }];
}
