/**
 * The instructor's two forms on the extensions page: a later due time for one student, or for a whole
 * cohort. Each keeps what was typed when refused, with the messages at their fields.
 */
import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { Button } from "~/components/ui/button";
import { SelectField } from "~/components/ui/field";
import { parseSubmission } from "~/lib/forms/submission";
import { extensionInputFor } from "~/lib/labs/extension-input";
import { ExtensionWindowFields } from "./extension-fields";

const targets = {
  "extend-students": {
    heading: "One student",
    blurb: "An accommodation or an illness. Replaces any extension the student has. To extend several, tick them on the Hand-ins page.",
    field: "membershipIds",
    label: "Student",
    choose: "Choose a student",
    submit: "Give this student a later due time",
  },
  "extend-cohort": {
    heading: "A whole cohort",
    blurb: "Kits that shipped late, a bench day lost. A student's own extension still comes first.",
    field: "cohortId",
    label: "Cohort",
    choose: "Choose a cohort",
    submit: "Extend the whole cohort",
  },
} as const;

export function ExtensionForm({
  intent,
  options,
  reply,
  timeZone,
  opensAt,
  busy,
}: {
  intent: keyof typeof targets;
  options: { id: string; label: string }[];
  reply: SubmissionResult | undefined;
  timeZone: string;
  opensAt: string;
  busy: boolean;
}) {
  const target = targets[intent];
  const [form, fields] = useForm({
    id: intent,
    lastResult: reply,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, extensionInputFor({ timeZone, opensAt: new Date(opensAt) })),
  });
  const targetField = fields[target.field];
  return (
    <section aria-labelledby={`${intent}-heading`} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
      <h2 id={`${intent}-heading`} className="mb-1 text-lg font-semibold">
        {target.heading}
      </h2>
      <p className="mb-3 text-sm text-ink-700">{target.blurb}</p>
      <Form method="post" className="flex flex-col gap-4" {...getFormProps(form)}>
        <input type="hidden" name="intent" value={intent} />
        {/* Named by hand, not by `field`: a refused student id sits at `membershipIds[0]`, and shows here too. */}
        <SelectField
          label={target.label}
          name={targetField.name}
          defaultValue={typeof targetField.initialValue === "string" ? targetField.initialValue : ""}
          error={Object.values(targetField.allErrors).flat()}
        >
          <option value="">{target.choose}</option>
          {options.map((option) => (
            <option key={option.id} value={option.id}>
              {option.label}
            </option>
          ))}
        </SelectField>
        <ExtensionWindowFields timeZone={timeZone} fields={fields} />
        <Button type="submit" disabled={busy} className="self-start">
          {target.submit}
        </Button>
      </Form>
    </section>
  );
}
