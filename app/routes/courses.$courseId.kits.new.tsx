import { data, Form, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.new";
import { TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { partKindLabels } from "~/lib/kits/part-input";
import { fieldErrors, formFailure, formValues } from "~/lib/forms/parse-form";
import { requireCourseRole } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { createKit, listAvailableParts } from "~/server/kits/kits.server";

const newKit = z.object({
  number: z.string().trim().min(1, "Give the kit the number written on its box.").max(20),
  partIds: z.array(z.uuid()).min(1, "Choose at least a sphere and a column."),
  note: z.string().trim().max(500).optional(),
});

export async function loader({ request, params }: Route.LoaderArgs) {
  const access = await requireCourseRole(request, params.courseId, ["instructor"]);
  return { courseId: access.course.id, parts: await listAvailableParts(db, access.course.id) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const access = await requireCourseRole(request, params.courseId, ["instructor"]);
  const form = await request.formData();
  const values = formValues(form);
  const partIds = form.getAll("partIds").map(String);
  const parsed = newKit.safeParse({ ...values, partIds });
  if (!parsed.success) return formFailure(values, fieldErrors(parsed.error), { partIds });
  try {
    const kit = await createKit(db, { courseId: access.course.id, actorId: access.user.id, ...parsed.data });
    return redirect(`/courses/${access.course.id}/kits/${kit.id}`);
  } catch (error) {
    if (!(error instanceof AppError)) throw error;
    return formFailure(values, { form: [error.message] }, { partIds });
    throw error;
  }
}

export default function NewKit({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const errors = actionData?.errors ?? {};
  const chosen = new Set(actionData?.partIds ?? []);
  const others = loaderData.parts;
  return (
    <div className="max-w-2xl">
      <PageHeader title="Make up a kit" trail={[{ to: `/courses/${loaderData.courseId}/kits`, label: "Kits" }]} />
      {errors.form ? <Notice tone="error">{errors.form.join(" ")}</Notice> : null}
      <Form method="post" className="mt-4 flex flex-col gap-5">
        <TextField label="Kit number" name="number" required defaultValue={actionData?.values.number ?? ""} error={errors.number} placeholder="K-25" />
        <fieldset>
          <legend className="text-sm font-medium">Parts on the shelf (fluid lots fill a bottle each, so they can go in many kits)</legend>
          {errors.partIds ? (
            <p className="text-sm text-outlier" role="alert">
              {errors.partIds.join(" ")}
            </p>
          ) : null}
          {others.length === 0 ? <p className="text-ink-600">Every part in service is already in a kit. Add parts first.</p> : null}
          <ul className="mt-2 grid gap-1 sm:grid-cols-2">
            {others.map((part) => (
              <li key={part.id}>
                <label className="flex items-center gap-2 py-1 text-sm">
                  <input type="checkbox" className="size-5 shrink-0" name="partIds" value={part.id} defaultChecked={chosen.has(part.id)} />
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
        <TextField label="Note" name="note" defaultValue={actionData?.values.note ?? ""} />
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
