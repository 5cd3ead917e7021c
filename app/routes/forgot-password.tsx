import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/forgot-password";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { describeWait, retryAfterHeaders } from "~/server/auth/session-responses.server";
import { requestEmailLink } from "~/server/auth/sign-in.server";
import { formAction } from "~/server/errors.server";

const forgotPasswordSchema = z.object({ email: z.email("Enter the e-mail address of your account.").max(254) });

export const action = formAction(async ({ request, formData }: Route.ActionArgs & { formData: FormData }) => {
  const submission = parseSubmission(formData, forgotPasswordSchema);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const result = await requestEmailLink("password_reset", submission.value.email, request);
  if (result.outcome === "limited") {
    const formErrors = [`Too many reset links were asked for. Try again in ${describeWait(result.retryAfterSeconds)}.`];
    return data(submission.reply({ formErrors }), { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) });
  }
  return { sentTo: submission.value.email };
});

// Passes Retry-After from a limited request on to the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: actionData && "sentTo" in actionData ? undefined : actionData,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, forgotPasswordSchema),
  });
  return (
    <section className="mx-auto max-w-md" aria-labelledby="forgot-title">
      <PageHeader id="forgot-title" title="Forgot your password?">
        We e-mail you a link to choose a new password. It works once, within an hour.
      </PageHeader>
      {actionData && "sentTo" in actionData ? (
        <Notice tone="success">
          If {actionData.sentTo} belongs to a Benchpost account, a reset link is on its way. Check your inbox (and spam folder).
        </Notice>
      ) : (
        <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10" {...getFormProps(form)}>
          {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
          <TextField label="E-mail address" field={fields.email} type="email" autoComplete="email" required />
          <Button type="submit" disabled={busy}>
            E-mail me a reset link
          </Button>
        </Form>
      )}
      <p className="mt-6 text-sm">
        <Link to="/sign-in" className="underline">
          Back to sign in
        </Link>
      </p>
    </section>
  );
}

export function meta() {
  return [{ title: "Forgot your password? · Benchpost" }];
}
