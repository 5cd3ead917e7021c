import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset-password";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { PASSWORD_MIN_LENGTH, newPasswordField } from "~/lib/auth/password-policy";
import { parseSubmission } from "~/lib/forms/submission";
import { peekEmailLink } from "~/server/auth/email-links.server";
import { redirectWithNewSession } from "~/server/auth/session-responses.server";
import { resetPasswordWithLink } from "~/server/auth/sign-in.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";

const resetPasswordSchema = z
  .object({ newPassword: newPasswordField, confirmPassword: z.string() })
  .refine((form) => form.newPassword === form.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two passwords are not the same.",
  });

export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await peekEmailLink(db, params.token, "password_reset") };
}

// Passwords never travel back into the page.
const hideFields = ["newPassword", "confirmPassword"];

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const submission = parseSubmission(formData, resetPasswordSchema);
  if (submission.status !== "success") return data(submission.reply({ hideFields }), { status: 400 });
  const started = await resetPasswordWithLink(params.token, submission.value.newPassword, request);
  if (!started) return data({ expired: true }, { status: 410 });
  return redirectWithNewSession({ request, context }, "/account?password=reset", started);
});

// The token is in the address: other sites must not see it in a Referer header.
export const headers: Route.HeadersFunction = () => ({ "Referrer-Policy": "strict-origin" });

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: actionData && "expired" in actionData ? undefined : actionData,
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, resetPasswordSchema),
  });
  if (!loaderData.valid || (actionData && "expired" in actionData)) {
    return (
      <section className="mx-auto max-w-md space-y-4" aria-labelledby="reset-title">
        <PageHeader id="reset-title" title="Choose a new password" />
        <Notice tone="warning">This reset link has been used already or is more than an hour old.</Notice>
        <p>
          <Link to="/forgot-password" className="underline">
            Ask for a new reset link
          </Link>
        </p>
      </section>
    );
  }
  return (
    <section className="mx-auto max-w-md" aria-labelledby="reset-title">
      <PageHeader id="reset-title" title="Choose a new password">
        Saving it signs you out everywhere else.
      </PageHeader>
      <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10" {...getFormProps(form)}>
        <TextField
          label="New password"
          field={fields.newPassword}
          type="password"
          autoComplete="new-password"
          required
          minLength={PASSWORD_MIN_LENGTH}
          hint={`At least ${PASSWORD_MIN_LENGTH} characters; a few unrelated words work well.`}
        />
        <TextField label="The same password again" field={fields.confirmPassword} type="password" autoComplete="new-password" required />
        <Button type="submit" disabled={busy}>
          Save the new password
        </Button>
      </Form>
    </section>
  );
}

export function meta() {
  return [{ title: "Choose a new password · Benchpost" }];
}
