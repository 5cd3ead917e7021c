import { FormProvider, getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { PartFields } from "~/components/kits/part-fields";
import type { PartOnPage } from "~/components/parts/part-on-page";
import { Button } from "~/components/ui/button";
import { TextAreaField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { parseSubmission } from "~/lib/forms/submission";
import { partRemeasure, storedPartValues, type PartRemeasure, type PartRemeasureInput } from "~/lib/kits/part-form";
import type { PartKind } from "~/lib/kits/part-input";

/** Spare empty calibration rows on the re-measure form, for adding points without JavaScript. */
const spareCalibrationRows = 2;

/** New measurements for the part, opened from its page; the history keeps the old ones. */
export function RemeasureForm({ kind, defaults, lastResult }: { kind: PartKind; defaults: PartOnPage; lastResult?: SubmissionResult }) {
  const navigation = useNavigation();
  const [form, fields] = useForm<PartRemeasureInput, PartRemeasure>({
    id: "remeasure",
    lastResult,
    defaultValue: storedPartValues(defaults, spareCalibrationRows),
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, partRemeasure),
  });
  return (
    <section aria-labelledby="remeasure-heading" className="max-w-2xl">
      <details open={lastResult !== undefined} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
        <summary id="remeasure-heading" className="cursor-pointer text-lg font-semibold">
          Re-measure
        </summary>
        <Form method="post" className="mt-4 flex flex-col gap-4" {...getFormProps(form)}>
          <input type="hidden" name="intent" value="remeasure" />
          {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
          <FormProvider context={form.context}>
            <PartFields kind={kind} fields={fields} />
          </FormProvider>
          <TextAreaField label="What was re-measured, and why (kept in the history)" field={fields.note} rows={2} maxLength={500} />
          <Button type="submit" className="self-start" disabled={navigation.state === "submitting"}>
            Save the new measurements
          </Button>
        </Form>
      </details>
    </section>
  );
}
