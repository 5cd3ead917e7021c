import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.my-kit";
import { KitStateBadge } from "~/components/kit-state-badge";
import { KitProblemList } from "~/components/kits/kit-problems";
import { SafetyCautions } from "~/components/safety-cautions";
import { parcelInput } from "~/components/kits/kit-input";
import { SelectField, TextAreaField, TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { describePart } from "~/lib/kits/describe-part";
import { AppError } from "~/lib/app-error";
import { calendarDayIn, formatCalendarDay } from "~/lib/format-date";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireCourseRole, type RequestScope } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { listKitProblems, reportKitProblem } from "~/server/kits/kit-problems.server";
import { confirmArrival, findKitOfMember, getKit } from "~/server/kits/kits.server";
import { addressLines, returnSettingsOf, sendKitBack } from "~/server/kits/returns.server";

const myKitAction = z.discriminatedUnion("intent", [
  z.object({ intent: z.literal("arrived"), complete: z.enum(["yes", "no"]), note: z.string().trim().max(1000).optional() }),
  z.object({
    intent: z.literal("report"),
    partId: z.preprocess((value) => value || null, z.uuid().nullable()),
    problem: z.enum(["missing", "damaged"], { error: "Say whether the part is missing or damaged." }),
    note: z.string().trim().min(3, "Describe what is wrong in a few words.").max(1000),
  }),
  z.object({ intent: z.literal("send-back"), ...parcelInput }),
]);

async function loadMyKit(scope: RequestScope, courseId: string | undefined) {
  const access = await requireCourseRole(scope, courseId, ["student"]);
  const held = await findKitOfMember(db, access.membership.id);
  return { access, kit: held ? await getKit(db, access.course.id, held.id) : null };
}

export async function loader({ request, params, context }: Route.LoaderArgs) {
  const { access, kit } = await loadMyKit({ request, context }, params.courseId);
  // Their own reports only: a problem is the student's who reported it, whichever kit it was on.
  const problems = await listKitProblems(db, access.course.id, { membershipId: access.membership.id });
  const timeZone = access.course.timeZone;
  if (!kit) return { kit: null, problems, timeZone, returnBy: null, returnAddress: [], today: "" };
  const settings = await returnSettingsOf(db, access.course.id);
  // A kit asked back early has its own date.
  const returnBy = kit.returnBy ?? settings.kitReturnBy;
  // The student sees their kit's parts and its journey, not the staff's notes on it.
  const { events: _events, holder: _holder, ...mine } = kit;
  return {
    kit: mine,
    problems,
    timeZone,
    returnBy: returnBy ? formatCalendarDay(returnBy) : null,
    returnAddress: addressLines(settings.returnAddress),
    today: calendarDayIn(new Date(), timeZone),
  };
}

export const action = formAction(async ({ request, params, context, formData }: Route.ActionArgs & { formData: FormData }) => {
  const { access, kit } = await loadMyKit({ request, context }, params.courseId);
  if (!kit) throw data("You hold no kit in this course.", { status: 404 });
  const submission = parseSubmission(formData, myKitAction);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  const scope = { courseId: access.course.id, actorId: access.user.id, kitId: kit.id };
  if (input.intent === "send-back") {
    const { intent: _intent, ...shipping } = input;
    await sendKitBack(db, { ...scope, shipping });
    return { intent: input.intent, saved: "Thank you: your kit is marked as on its way back." };
  }
  if (input.intent === "arrived") {
    await confirmArrival(db, { ...scope, complete: input.complete === "yes", note: input.note });
    return { intent: input.intent, saved: "Thank you: your kit is marked as at home." };
  }
  if (input.partId && !kit.parts.some(({ part }) => part.id === input.partId))
    throw new AppError({ code: "kit_refused", message: "That part is not in your kit.", field: "partId" });
  await reportKitProblem(db, { ...scope, partId: input.partId, problem: input.problem, note: input.note });
  return { intent: input.intent, saved: "Reported. Your instructor has been told; you will see each step below and by e-mail." };
});

const addressLink = (
  <Link to="../my-address" relative="path" className="text-sm underline">
    My shipping address
  </Link>
);

export default function MyKit({ loaderData, actionData }: Route.ComponentProps) {
  const { kit, problems, timeZone, returnBy, returnAddress, today } = loaderData;
  const navigation = useNavigation();
  const validate = ({ formData }: { formData: FormData }) => parseSubmission(formData, myKitAction);
  const [arrivedForm, arrivedFields] = useForm({
    id: "arrived",
    lastResult: replyFor(actionData, "arrived"),
    defaultValue: { complete: "yes" },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: validate,
  });
  const [reportForm, reportFields] = useForm({
    id: "report",
    lastResult: replyFor(actionData, "report"),
    defaultValue: { partId: "", problem: "damaged" },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: validate,
  });
  const [backForm, backFields] = useForm({
    id: "send-back",
    lastResult: replyFor(actionData, "send-back"),
    defaultValue: { shippedOn: today },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: validate,
  });
  if (!kit) {
    return (
      <div className="flex flex-col gap-4">
        <PageHeader title="My kit" actions={addressLink} />
        <p>No kit has been packed for you yet. You will get an e-mail with its tracking number when it ships.</p>
        <KitProblemList problems={problems} timeZone={timeZone} heading="Your reports" />
        <SafetyCautions />
      </div>
    );
  }
  const parts = kit.parts.map(({ part }) => part);
  return (
    <div className="flex flex-col gap-6">
      <PageHeader title={`My kit: ${kit.number}`} actions={addressLink}>
        <KitStateBadge state={kit.state} />
        {kit.trackingNumber ? (
          <span className="ml-2 text-sm">
            Sent {kit.shippedOn && formatCalendarDay(kit.shippedOn)} with {kit.carrier}, tracking number {kit.trackingNumber}
          </span>
        ) : null}
        {kit.returnTrackingNumber ? (
          <span className="ml-2 text-sm">
            · Sent back {kit.returnShippedOn && formatCalendarDay(kit.returnShippedOn)} with {kit.returnCarrier}, tracking number{" "}
            {kit.returnTrackingNumber}
          </span>
        ) : null}
      </PageHeader>
      {actionData && "saved" in actionData ? <Notice tone="success">{actionData.saved}</Notice> : null}
      {/* A refused return of a kit that is no longer at home: its form is gone, so the reason is told here. */}
      {kit.state !== "at_home" && backForm.errors?.length ? <Notice tone="error">{backForm.errors.join(" ")}</Notice> : null}

      {kit.state === "in_transit" ? (
        <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(arrivedForm)}>
          <input type="hidden" name="intent" value="arrived" />
          <h2 className="font-semibold">Has your kit arrived?</h2>
          {arrivedForm.errors?.length ? <Notice tone="error">{arrivedForm.errors.join(" ")}</Notice> : null}
          <fieldset className="flex flex-col gap-1 text-sm">
            <legend className="sr-only">Was it complete?</legend>
            <label className="flex items-center gap-2">
              <input {...getInputProps(arrivedFields.complete, { type: "radio", value: "yes" })} /> Yes, and everything on the list below is
              there
            </label>
            <label className="flex items-center gap-2">
              <input {...getInputProps(arrivedFields.complete, { type: "radio", value: "no" })} /> Yes, but something is missing or broken
            </label>
          </fieldset>
          <TextAreaField label="Anything to add (optional)" field={arrivedFields.note} rows={2} />
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Confirm arrival
          </Button>
        </Form>
      ) : null}

      {returnBy && ["in_transit", "at_home"].includes(kit.state) ? (
        <p className="rounded-lg bg-paper-100 p-3 text-sm">
          Please send your kit back by <strong>{returnBy}</strong>.
        </p>
      ) : null}

      {kit.state === "at_home" ? (
        <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(backForm)}>
          <input type="hidden" name="intent" value="send-back" />
          <h2 className="font-semibold">Sending your kit back</h2>
          {returnAddress.length ? (
            <p className="text-sm">
              Pack every part as it came and send the parcel to:
              {returnAddress.map((line) => (
                <span key={line} className="block font-medium">
                  {line}
                </span>
              ))}
            </p>
          ) : (
            <p className="text-sm">Your instructor will tell you where to send it.</p>
          )}
          <p className="text-sm text-ink-700">Once it has left, give the carrier's details so that the course can follow it.</p>
          {backForm.errors?.length ? <Notice tone="error">{backForm.errors.join(" ")}</Notice> : null}
          <div className="grid gap-3 sm:grid-cols-3">
            <TextField label="Carrier" field={backFields.carrier} required />
            <TextField label="Tracking number" field={backFields.trackingNumber} required />
            <TextField label="Sent on" field={backFields.shippedOn} type="date" required />
          </div>
          <Button type="submit" disabled={navigation.state === "submitting"}>
            My kit is on its way back
          </Button>
        </Form>
      ) : null}

      <section aria-labelledby="my-parts">
        <h2 id="my-parts" className="mb-2 text-lg font-semibold">
          What is in it
        </h2>
        <p className="mb-2 text-sm text-ink-700">These are the measurements Benchpost uses for your results unless you enter your own.</p>
        <ul className="divide-y divide-ink-900/5 rounded-lg bg-white ring-1 ring-ink-900/10">
          {parts.map((part) => {
            const { kind, values } = describePart(part);
            return (
              <li key={part.id} className="flex flex-wrap gap-x-3 px-3 py-2 text-sm">
                <strong className="min-w-20">{part.label}</strong>
                <span className="min-w-24 text-ink-600">{kind}</span>
                <span>{values}</span>
              </li>
            );
          })}
        </ul>
      </section>

      {["in_transit", "at_home"].includes(kit.state) ? (
        <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(reportForm)}>
          <input type="hidden" name="intent" value="report" />
          <h2 className="font-semibold">Report a missing or damaged part</h2>
          {reportForm.errors?.length ? <Notice tone="error">{reportForm.errors.join(" ")}</Notice> : null}
          <SelectField label="Which part" field={reportFields.partId}>
            <option value="">Not sure / the whole kit</option>
            {parts.map((part) => (
              <option key={part.id} value={part.id}>
                {part.label} ({describePart(part).kind})
              </option>
            ))}
          </SelectField>
          <SelectField label="What happened" field={reportFields.problem}>
            <option value="damaged">It is damaged</option>
            <option value="missing">It is missing</option>
          </SelectField>
          <TextAreaField label="Describe it" field={reportFields.note} rows={3} required />
          <Button type="submit" variant="secondary">
            Send the report
          </Button>
        </Form>
      ) : null}

      <KitProblemList problems={problems} timeZone={timeZone} heading="Your reports" />

      <SafetyCautions />
    </div>
  );
}

export function meta() {
  return [{ title: "My kit · Benchpost" }];
}
