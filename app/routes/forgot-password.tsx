import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/forgot-password";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseForm } from "~/lib/forms/parse-form";
import { describeWait, retryAfterHeaders } from "~/server/auth/session-responses.server";
import { requestEmailLink } from "~/server/auth/sign-in.server";

const forgotPasswordSchema = z.object({ email: z.email("Enter the e-mail address of your account.").max(254) });

export async function action({ request }: Route.ActionArgs) {
  const form = parseForm(forgotPasswordSchema, await request.formData());
  if (!form.ok) return data({ errors: form.errors, values: form.values }, { status: 400 });
  const result = await requestEmailLink("password_reset", form.data.email, request);
  if (result.outcome === "limited") {
    return data(
      {
        formError: `Too many reset links were asked for. Try again in ${describeWait(result.retryAfterSeconds)}.`,
        values: { email: form.data.email },
      },
      { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) },
    );
  }
  return { sentTo: form.data.email };
}

// Passes Retry-After from a limited request on to the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function ForgotPassword({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
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
        <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          {actionData && "formError" in actionData ? <Notice tone="error">{actionData.formError}</Notice> : null}
          <TextField
            label="E-mail address"
            name="email"
            type="email"
            autoComplete="email"
            required
            defaultValue={actionData?.values?.email}
            error={actionData && "errors" in actionData ? actionData.errors.email : undefined}
          />
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
