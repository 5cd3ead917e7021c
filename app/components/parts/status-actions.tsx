import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { Button } from "~/components/ui/button";
import { TextAreaField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { parseSubmission } from "~/lib/forms/submission";
import { partStatusLabels } from "~/lib/kits/part-display";
import { partStatusChange } from "~/lib/kits/part-form";

/** The instructor's status buttons: send for re-measurement, return to service, retire. */
export function StatusActions({ status, lastResult }: { status: keyof typeof partStatusLabels; lastResult?: SubmissionResult }) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "status",
    lastResult,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, partStatusChange),
  });
  const actions = [
    { to: "remeasure", label: "Send for re-measurement", show: status === "in_service" },
    { to: "in_service", label: "Return to service", show: status !== "in_service" },
    { to: "retired", label: "Retire the part", show: status !== "retired" },
  ] as const;
  return (
    <Form method="post" className="flex flex-col gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
      <h2 className="text-lg font-semibold">Status</h2>
      <p className="text-sm text-ink-700">
        Now: {partStatusLabels[status]}. A part that needs re-measuring or is retired cannot be packed into a kit; saving new measurements
        returns it to service.
      </p>
      <input type="hidden" name="intent" value="status" />
      {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
      <TextAreaField label="Why (kept in the history)" field={fields.note} rows={2} maxLength={500} />
      <div className="flex flex-wrap gap-2">
        {actions
          .filter((action) => action.show)
          .map((action) => (
            <Button
              key={action.to}
              type="submit"
              name="status"
              value={action.to}
              variant={action.to === "retired" ? "danger" : "secondary"}
              disabled={navigation.state === "submitting"}
            >
              {action.label}
            </Button>
          ))}
      </div>
    </Form>
  );
}
