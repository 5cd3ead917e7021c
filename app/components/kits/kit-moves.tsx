/** The kit's next step: pack it for a student, ship it, or a move that needs only a note. */
import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form, useNavigation } from "react-router";
import { kitInput, simpleMoves } from "~/components/kits/kit-input";
import { Button } from "~/components/ui/button";
import { SelectField, TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { parseSubmission } from "~/lib/forms/submission";
import { kitStateLabels, type KitState } from "~/lib/kits/kit-states";

const validate = ({ formData }: { formData: FormData }) => parseSubmission(formData, kitInput);

export function FormErrors({ errors }: { errors?: string[] }) {
  return errors?.length ? <Notice tone="error">{errors.join(" ")}</Notice> : null;
}

export function PackForm({
  students,
  lastResult,
}: {
  students: { membershipId: string; name: string; email: string; cohortName: string | null }[];
  lastResult?: SubmissionResult;
}) {
  const [form, fields] = useForm({ id: "pack", lastResult, shouldValidate: "onBlur", shouldRevalidate: "onInput", onValidate: validate });
  return (
    <>
      <FormErrors errors={form.errors} />
      <Form method="post" className="flex flex-wrap items-end gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="pack" />
        <div className="min-w-72 flex-1">
          <SelectField label="Pack for" field={fields.holderMembershipId} required>
            <option value="">Choose a student without a kit…</option>
            {students.map((student) => (
              <option key={student.membershipId} value={student.membershipId}>
                {student.name} — {student.cohortName ?? "no cohort"} ({student.email})
              </option>
            ))}
          </SelectField>
        </div>
        <Button type="submit">Mark packed</Button>
      </Form>
    </>
  );
}

export function ShipForm({ today, lastResult }: { today: string; lastResult?: SubmissionResult }) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    id: "ship",
    lastResult,
    defaultValue: { shippedOn: today },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: validate,
  });
  return (
    <>
      <FormErrors errors={form.errors} />
      <Form
        method="post"
        className="grid gap-3 rounded-lg bg-white p-4 ring-1 ring-ink-900/10 sm:grid-cols-4 sm:items-end"
        {...getFormProps(form)}
      >
        <input type="hidden" name="intent" value="ship" />
        <TextField label="Carrier" field={fields.carrier} required />
        <TextField label="Tracking number" field={fields.trackingNumber} required />
        <TextField label="Sent on" field={fields.shippedOn} type="date" required />
        <Button type="submit" disabled={navigation.state === "submitting"}>
          Mark in transit and tell the student
        </Button>
      </Form>
    </>
  );
}

export function SimpleMoves({ next, lastResult }: { next: readonly KitState[]; lastResult?: SubmissionResult }) {
  const [form, fields] = useForm({ id: "move", lastResult, shouldValidate: "onBlur", shouldRevalidate: "onInput", onValidate: validate });
  const moves = simpleMoves.filter((state) => next.includes(state));
  if (!moves.length) return null;
  return (
    <>
      <FormErrors errors={form.errors} />
      <Form method="post" className="flex flex-wrap items-end gap-3" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="move" />
        <TextField label="Note (optional)" field={fields.note} />
        {moves.map((state) => (
          <Button key={state} type="submit" name="to" value={state} variant={state === "retired" ? "danger" : "secondary"}>
            {state === "retired" ? "Retire the kit" : `Mark ${kitStateLabels[state].toLowerCase()}`}
          </Button>
        ))}
      </Form>
    </>
  );
}
