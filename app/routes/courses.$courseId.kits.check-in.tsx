import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { PartConditionHead, PartConditionRow } from "~/components/kits/check-in-form";
import { data, Form, Link, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.check-in";
import { FormErrors } from "~/components/kits/kit-moves";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { entityId } from "~/lib/forms/ids";
import { parseSubmission } from "~/lib/forms/submission";
import { partConditions, type PartCondition } from "~/lib/kits/kit-states";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { checkInKits, listKits } from "~/server/kits/kits.server";
import { kitsForCheckIn } from "~/server/kits/returns.server";
import { counted, plural } from "~/lib/plural";

/** Kits on one check-in page: a morning's parcels, and a form that stays quick to fill and to send. */
const maxKitsPerCheckIn = 100;

const chosenKits = z.array(entityId).max(maxKitsPerCheckIn, `Check in at most ${maxKitsPerCheckIn} kits at once.`);

const blankAsUnset = (value: unknown) => (value === "" ? undefined : value);

/**
 * One row per part of every kit. No condition is assumed: each part gets one, or its kit's "all parts
 * fine" box is ticked, and a part marked damaged or missing cannot sit under a ticked box.
 */
const bulkCheckIn = z.object({
  kits: z
    .array(
      z
        .object({
          kitId: entityId,
          allFine: z.literal("on").optional(),
          parts: z
            .array(
              z.object({
                partId: entityId,
                condition: z.preprocess(blankAsUnset, z.enum(partConditions).optional()),
                remeasure: z.literal("on").optional(),
              }),
            )
            .default([]),
        })
        .superRefine((kit, context) => {
          kit.parts.forEach((part, index) => {
            const path = ["parts", index, "condition"];
            if (!kit.allFine && !part.condition)
              context.addIssue({ code: "custom", path, message: "Choose this part's condition, or tick all parts fine." });
            if (kit.allFine && part.condition && part.condition !== "fine")
              context.addIssue({ code: "custom", path, message: `Marked ${part.condition}: untick all parts fine for this kit.` });
          });
        }),
    )
    .min(1, "Choose the kits to check in.")
    .max(maxKitsPerCheckIn),
  note: z.string().trim().max(500).optional(),
});

function readChosenKits(request: Request): string[] {
  const chosen = chosenKits.safeParse([...new Set(new URL(request.url).searchParams.getAll("kit"))]);
  if (!chosen.success) throw data(`Kits refused: ${chosen.error.issues.map((issue) => issue.message).join(" ")}`, { status: 400 });
  return chosen.data;
}

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const kitIds = readChosenKits(request);
  if (kitIds.length === 0) {
    // Nothing chosen (or no JavaScript on the kits list): choose here among the kits coming back.
    const { rows } = await listKits(db, access.course.id, { state: "coming_back", page: 1, pageSize: maxKitsPerCheckIn });
    return { courseId: access.course.id, chosen: false as const, comingBack: rows, kits: [], leftOut: 0 };
  }
  const found = await kitsForCheckIn(db, access.course.id, kitIds);
  const kits = found.filter((kit) => kit.state === "coming_back");
  return { courseId: access.course.id, chosen: true as const, comingBack: [], kits, leftOut: kitIds.length - kits.length };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, bulkCheckIn);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { kits, note } = submission.value;
  const { checkedIn } = await checkInKits(db, {
    courseId: access.course.id,
    actorId: access.user.id,
    // The shortcut is read here: every part of a kit ticked "all parts fine" without a condition of its own is fine.
    kits: kits.map((kit) => ({
      kitId: kit.kitId,
      conditions: Object.fromEntries(
        kit.parts.flatMap((part) => {
          const condition: PartCondition | null = part.condition ?? (kit.allFine ? "fine" : null);
          return condition ? [[part.partId, condition] as const] : [];
        }),
      ),
      remeasure: kit.parts.filter((part) => part.remeasure).map((part) => part.partId),
    })),
    note,
  });
  return { checkedIn };
});

// The form's rows are its initial value: choosing other kits (a client-side navigation) starts a new form.
export default function BulkCheckIn(props: Route.ComponentProps) {
  return <CheckInPage key={props.loaderData.kits.map((kit) => kit.id).join()} {...props} />;
}

function CheckInPage({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, chosen, comingBack, kits, leftOut } = loaderData;
  const navigation = useNavigation();
  const done = actionData && "checkedIn" in actionData ? actionData.checkedIn : null;
  const [form, fields] = useForm<z.input<typeof bulkCheckIn>>({
    id: "bulk-check-in",
    lastResult: actionData && !("checkedIn" in actionData) ? actionData : undefined,
    defaultValue: { kits: kits.map((kit) => ({ kitId: kit.id, parts: kit.parts.map((part) => ({ partId: part.id })) })) },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, bulkCheckIn),
  });
  const trail = [{ to: `/courses/${courseId}/kits`, label: "Kits" }];
  if (!chosen) {
    return (
      <div className="flex flex-col gap-4">
        <PageHeader title="Check kits in" trail={trail}>
          Choose the kits on the bench. Only kits coming back can be checked in.
        </PageHeader>
        {comingBack.length === 0 ? (
          <p className="text-ink-600">No kit is coming back.</p>
        ) : (
          <Form method="get" className="flex flex-col gap-3">
            <fieldset className="flex flex-col gap-1">
              <legend className="mb-1 font-medium">Kits coming back</legend>
              {comingBack.map((kit) => (
                <label key={kit.id} className="flex items-center gap-2 py-1">
                  <input type="checkbox" name="kit" value={kit.id} className="size-5" />
                  {`Kit ${kit.number}`}
                  <span className="text-sm text-ink-600">{kit.holderName ?? ""}</span>
                </label>
              ))}
            </fieldset>
            <Button type="submit">Check these in</Button>
          </Form>
        )}
      </div>
    );
  }
  const rows = fields.kits.getFieldList();
  return (
    <div className="flex flex-col gap-4">
      <PageHeader title="Check kits in" trail={trail}>
        Record every part's condition. Damaged or missing parts leave their kit, and spheres and columns are retired; tick a part to send it
        for re-measurement. All the kits are checked in together, or none is.
      </PageHeader>
      {done !== null ? (
        <Notice tone="success">
          {counted(done, "kit", "kits")} checked in.{" "}
          <Link to={`/courses/${courseId}/kits?state=checked_in`} className="underline">
            See the kits checked in
          </Link>
        </Notice>
      ) : null}
      {leftOut > 0 && done === null ? (
        <Notice tone="error">
          {leftOut === 1
            ? "1 chosen kit is not coming back (or not in this course) and is left out."
            : `${leftOut} chosen kits are not coming back (or not in this course) and are left out.`}
        </Notice>
      ) : null}
      {kits.length === 0 ? null : (
        <Form method="post" className="flex flex-col gap-4" {...getFormProps(form)}>
          <FormErrors errors={form.errors} />
          {rows.map((row, kitIndex) => {
            const kit = kits[kitIndex];
            if (!kit) return null;
            const kitFields = row.getFieldset();
            const partRows = kitFields.parts.getFieldList();
            return (
              <fieldset key={row.key ?? kitIndex} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
                <legend className="px-1 font-semibold">
                  {`Kit ${kit.number}`}
                  {kit.studentName ? <span className="font-normal text-ink-600"> from {kit.studentName}</span> : null}
                  {kit.returnTrackingNumber ? " " : null}
                  {kit.returnTrackingNumber ? (
                    <span className="ml-2 text-sm font-normal text-ink-600">
                      {kit.returnCarrier} {kit.returnTrackingNumber}
                    </span>
                  ) : null}
                </legend>
                <input {...getInputProps(kitFields.kitId, { type: "hidden" })} />
                <label className="mb-2 flex items-center gap-2 text-sm">
                  <input {...getInputProps(kitFields.allFine, { type: "checkbox" })} className="size-5" />
                  All parts fine (untick it to mark a part damaged or missing)
                </label>
                {kit.parts.length === 0 ? <p className="text-sm text-ink-600">This kit holds no parts.</p> : null}
                <table className="text-sm">
                  <caption className="sr-only">Condition of each part of kit {kit.number}</caption>
                  <PartConditionHead />
                  <tbody>
                    {partRows.map((partRow, partIndex) => (
                      <PartConditionRow
                        key={partRow.key ?? partIndex}
                        label={kit.parts[partIndex]?.label ?? ""}
                        cells={partRow.getFieldset()}
                        kitNumber={kit.number}
                      />
                    ))}
                  </tbody>
                </table>
              </fieldset>
            );
          })}
          <TextField label="Note (kept on every kit's history)" field={fields.note} />
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Check {plural(kits.length, "the kit", `the ${kits.length} kits`)} in
          </Button>
        </Form>
      )}
    </div>
  );
}

export function meta() {
  return [{ title: "Check kits in · Benchpost" }];
}
