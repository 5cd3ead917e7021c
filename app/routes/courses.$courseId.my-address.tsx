import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.my-address";
import { AddressFields } from "~/components/shipping/address-fields";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { addressFields, countryOptions, postalAddressSchema, type PostalAddressInput } from "~/lib/shipping/address-schema";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { formAction } from "~/server/errors.server";
import { deleteAddress, saveAddress, viewAddress } from "~/server/shipping/addresses.server";

const deleteInput = z.object({
  intent: z.literal("delete"),
  confirm: z.literal("yes", "Tick the box to say you mean it."),
});

/** The student's own address, and no one else's: a TA or an instructor has no address page of their own here. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  const owner = { membershipId: access.membership.id };
  const address = await viewAddress(db, { courseId: access.course.id, actorId: access.user.id, owner, request });
  return { courseId: access.course.id, timeZone: access.course.timeZone, address, countries: countryOptions() };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["student"]);
  const scope = { courseId: access.course.id, actorId: access.user.id, owner: { membershipId: access.membership.id }, request };
  if (formData.get("intent") === "delete") {
    const submission = parseSubmission(formData, deleteInput);
    if (submission.status !== "success") return data(submission.reply(), { status: 400 });
    const deleted = await deleteAddress(db, scope);
    return { intent: "delete" as const, done: deleted ? "Your address is deleted." : "There was no address to delete." };
  }
  const submission = parseSubmission(formData, postalAddressSchema);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  await saveAddress(db, { ...scope, address: submission.value });
  return { intent: "save" as const, done: "Saved. Your kit goes to this address." };
});

export default function MyAddress({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, address, countries } = loaderData;
  const busy = useNavigation().state !== "idle";
  const done = actionData && "done" in actionData ? actionData.done : null;
  const [form, fields] = useForm<PostalAddressInput, PostalAddress>({
    id: "save",
    lastResult: replyFor(actionData, "save"),
    defaultValue: Object.fromEntries(addressFields.map((field) => [field, address?.[field] ?? ""])),
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, postalAddressSchema),
  });
  const [deleteForm, deleteFields] = useForm({
    id: "delete",
    lastResult: replyFor(actionData, "delete"),
    onValidate: ({ formData }) => parseSubmission(formData, deleteInput),
  });
  return (
    <div className="mx-auto flex max-w-2xl flex-col gap-6">
      <PageHeader title="My shipping address" trail={[{ to: `/courses/${courseId}/my-kit`, label: "My kit" }]}>
        Where your kit is posted. Only you and the course's instructors see it; each time they do, it is recorded.
      </PageHeader>
      {done ? <Notice tone="success">{done}</Notice> : null}

      <Form method="post" className="flex flex-col gap-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="save" />
        {address ? <p className="text-sm text-ink-700">Last changed {formatDateTime(address.updatedAt, timeZone)}.</p> : null}
        {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
        <AddressFields fields={fields} countries={countries} />
        <Button type="submit" disabled={busy} className="self-start">
          {address ? "Save the changes" : "Save my address"}
        </Button>
      </Form>

      {address ? (
        <section aria-labelledby="keep-title" className="flex flex-col gap-3 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          <h2 id="keep-title" className="text-lg font-medium">
            Your copy, or none at all
          </h2>
          <p className="text-sm">
            <a href={`/courses/${courseId}/my-address.json`} download className="underline">
              Download my address (JSON)
            </a>
          </p>
          <Form method="post" className="flex flex-col gap-2" {...getFormProps(deleteForm)}>
            <input type="hidden" name="intent" value="delete" />
            <label className="flex items-center gap-2 text-sm">
              <input {...getInputProps(deleteFields.confirm, { type: "checkbox", value: "yes" })} />
              Delete my address. A kit cannot be posted to me until I enter one again.
            </label>
            {deleteFields.confirm.errors?.length ? (
              <p id={deleteFields.confirm.errorId} className="text-sm text-outlier">
                {deleteFields.confirm.errors.join(" ")}
              </p>
            ) : null}
            <Button type="submit" variant="danger" disabled={busy} className="self-start">
              Delete my address
            </Button>
          </Form>
        </section>
      ) : null}
    </div>
  );
}

export function meta() {
  return [{ title: "My shipping address · Benchpost" }];
}
