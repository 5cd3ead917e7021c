import { getFormProps, useForm } from "@conform-to/react";
import { data, Form, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.new";
import { TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { partKindLabels } from "~/lib/kits/part-input";
import { entityId } from "~/lib/forms/ids";
import { formList, parseSubmission } from "~/lib/forms/submission";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { createKit, listAvailableParts } from "~/server/kits/kits.server";

const newKit = z.object({
  number: z.string().trim().min(1, "Give the kit the number written on its box.").max(20),
  partIds: formList(entityId).pipe(z.array(entityId).min(1, "Choose at least a sphere and a column.")),
  note: z.string().trim().max(500).optional(),
});

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return { courseId: access.course.id, parts: await listAvailableParts(db, access.course.id) };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, newKit);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const kit = await createKit(db, { courseId: access.course.id, actorId: access.user.id, ...submission.value });
  return redirect(`/courses/${access.course.id}/kits/${kit.id}`);
});

export default function NewKit({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, newKit),
  });
  const typed = fields.partIds.initialValue;
  const chosen = new Set(Array.isArray(typed) ? typed : typed ? [typed] : []);
  const others = loaderData.parts;
  return (
    <div className="max-w-2xl">
      <PageHeader title="Make up a kit" trail={[{ to: `/courses/${loaderData.courseId}/kits`, label: "Kits" }]} />
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
      <Form method="post" className="mt-4 flex flex-col gap-5" {...getFormProps(form)}>
        <TextField label="Kit number" field={fields.number} required placeholder="K-25" />
        <fieldset aria-describedby={fields.partIds.errors?.length ? fields.partIds.errorId : undefined}>
          <legend className="text-sm font-medium">Parts on the shelf (fluid lots fill a bottle each, so they can go in many kits)</legend>
          {fields.partIds.errors?.length ? (
            <p id={fields.partIds.errorId} className="text-sm text-outlier" role="alert">
              {fields.partIds.errors.join(" ")}
            </p>
          ) : null}
          {others.length === 0 ? <p className="text-ink-600">Every part in service is already in a kit. Add parts first.</p> : null}
          <ul className="mt-2 grid gap-1 sm:grid-cols-2">
            {others.map((part) => (
              <li key={part.id}>
                <label className="flex items-center gap-2 py-1 text-sm">
                  <input
                    type="checkbox"
                    className="size-5 shrink-0"
                    name={fields.partIds.name}
                    value={part.id}
                    defaultChecked={chosen.has(part.id)}
                  />
                  <span>
                    <strong>{part.label}</strong> · {partKindLabels[part.kind]}
                    {part.kind === "sphere" ? ` · ${part.material}, ${part.diameterMm} mm` : ""}
                    {part.kind === "column" ? ` · inner diameter ${part.innerDiameterMm} mm` : ""}
                    {part.kind === "accessory" ? ` · ${part.accessoryType}` : ""}
                    {part.kind === "fluid_lot" ? ` · ${part.fluidName} (a bottle from this lot)` : ""}
                  </span>
                </label>
              </li>
            ))}
          </ul>
        </fieldset>
        <TextField label="Note" field={fields.note} />
        <Button type="submit" disabled={navigation.state === "submitting"}>
          Put the kit on the shelf
        </Button>
      </Form>
    </div>
  );
}

export function meta() {
  return [{ title: "New kit · Benchpost" }];
}
