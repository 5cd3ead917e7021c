import { getFormProps, useForm, type SubmissionResult } from "@conform-to/react";
import { Form } from "react-router";
import { accountInput } from "~/components/account/account-input";
import { AccountSection } from "~/components/account/section";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { PASSWORD_MIN_LENGTH } from "~/lib/auth/password-policy";
import { parseSubmission } from "~/lib/forms/submission";

/** Change the password, or choose a first one for an account that signs in by e-mailed links. */
export function PasswordForm({ passwordSet, lastResult, busy }: { passwordSet: boolean; lastResult?: SubmissionResult; busy: boolean }) {
  const [form, fields] = useForm({
    id: "password",
    lastResult,
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, accountInput),
  });
  return (
    <AccountSection id="password-title" title={passwordSet ? "Change your password" : "Choose a password"}>
      <Form method="post" className="space-y-3" {...getFormProps(form)}>
        <input type="hidden" name="intent" value="password" />
        {passwordSet ? (
          <TextField label="Current password" field={fields.currentPassword} type="password" autoComplete="current-password" required />
        ) : (
          <p className="text-sm text-ink-700">
            You sign in with e-mailed links. A password lets you sign in without waiting for an e-mail.
          </p>
        )}
        <TextField
          label="New password"
          field={fields.newPassword}
          type="password"
          autoComplete="new-password"
          required
          minLength={PASSWORD_MIN_LENGTH}
          hint="Saving it signs you out on every other device."
        />
        <TextField label="The same password again" field={fields.confirmPassword} type="password" autoComplete="new-password" required />
        <Button type="submit" disabled={busy}>
          Save the password
        </Button>
      </Form>
    </AccountSection>
  );
}
