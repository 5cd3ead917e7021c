import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { accountInput } from "~/components/account/account-input";
import { AccountSection } from "~/components/account/section";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { parseSubmission } from "~/lib/forms/submission";

export function NameForm({
  name,
  lastResult,
  saved,
  busy,
}: {
  name: string;
  lastResult?: SubmissionResult;
  saved: boolean;
  busy: boolean;
}) {
  const [form, fields] = useForm({
    id: "profile",
    lastResult,
    defaultValue: { name },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, accountInput),
  });
  return (
    <AccountSection id="profile-title" title="Name">
      <Form method="post" className="flex flex-col gap-3 sm:flex-row sm:items-end" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="profile" />
        <TextField className="flex-1" label="Your name" field={fields.name} autoComplete="name" required />
        <Button type="submit" disabled={busy}>
          Save
        </Button>
      </Form>
      {saved ? <p className="mt-2 text-sm text-consistent">Saved.</p> : null}
    </AccountSection>
  );
}
