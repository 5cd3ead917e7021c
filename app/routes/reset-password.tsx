import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/reset-password";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { PASSWORD_MIN_LENGTH, newPasswordField } from "~/lib/auth/password-policy";
import { parseForm } from "~/lib/forms/parse-form";
import { peekEmailLink } from "~/server/auth/email-links.server";
import { redirectWithNewSession } from "~/server/auth/session-responses.server";
import { resetPasswordWithLink } from "~/server/auth/sign-in.server";
import { db } from "~/server/db.server";

const resetPasswordSchema = z
  .object({ newPassword: newPasswordField, confirmPassword: z.string() })
  .refine((form) => form.newPassword === form.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two passwords are not the same.",
  });

export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await peekEmailLink(db, params.token, "password_reset") };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const form = parseForm(resetPasswordSchema, await request.formData());
  if (!form.ok) return data({ errors: form.errors }, { status: 400 });
  const started = await resetPasswordWithLink(params.token, form.data.newPassword, request);
  if (!started) return data({ expired: true }, { status: 410 });
  return redirectWithNewSession({ request, context }, "/account?password=reset", started);
}

// The token is in the address: other sites must not see it in a Referer header.
export const headers: Route.HeadersFunction = () => ({ "Referrer-Policy": "strict-origin" });

export default function ResetPassword({ loaderData, actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const errors = actionData && "errors" in actionData ? actionData.errors : undefined;
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
      <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
        <TextField
          label="New password"
          name="newPassword"
          type="password"
          autoComplete="new-password"
          required
          minLength={PASSWORD_MIN_LENGTH}
          hint={`At least ${PASSWORD_MIN_LENGTH} characters; a few unrelated words work well.`}
          error={errors?.newPassword}
        />
        <TextField
          label="The same password again"
          name="confirmPassword"
          type="password"
          autoComplete="new-password"
          required
          error={errors?.confirmPassword}
        />
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
