import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/sign-up";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission } from "~/lib/forms/submission";
import { getOptionalUser } from "~/server/auth/access.server";
import { describeWait, retryAfterHeaders } from "~/server/auth/session-responses.server";
import { signUp } from "~/server/auth/sign-in.server";
import { allowSignUp } from "~/server/config.server";
import { formAction } from "~/server/errors.server";

const signUpSchema = z.object({
  name: z.string().trim().min(1, "Enter your name as students should see it.").max(120),
  email: z.email("Enter your e-mail address, like name@example.org.").max(254),
});

function requireSignUpOpen() {
  if (!allowSignUp()) throw data("Not found", { status: 404 });
}

export async function loader({ request, context }: Route.LoaderArgs) {
  requireSignUpOpen();
  if (await getOptionalUser({ request, context })) throw redirect("/");
  return null;
}

export const action = formAction(async ({ request, formData }: Route.ActionArgs & { formData: FormData }) => {
  requireSignUpOpen();
  const submission = parseSubmission(formData, signUpSchema);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const result = await signUp(submission.value, request);
  if (result.outcome === "limited") {
    const formErrors = [`Too many attempts. Try again in ${describeWait(result.retryAfterSeconds)}.`];
    return data(submission.reply({ formErrors }), { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) });
  }
  // The same answer whether or not the address had an account: the e-mailed link signs in to either.
  return { sentTo: submission.value.email };
});

// Passes Retry-After from a limited attempt on to the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function SignUp({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: actionData && "sentTo" in actionData ? undefined : actionData,
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, signUpSchema),
  });
  return (
    <section className="mx-auto max-w-md" aria-labelledby="sign-up-title">
      <PageHeader id="sign-up-title" title="Create an instructor account">
        For instructors who run a course. Students and TAs join from their invitation e-mail.
      </PageHeader>
      {actionData && "sentTo" in actionData ? (
        <Notice tone="success">
          Check your e-mail: a link that signs you in is on its way to {actionData.sentTo} (look in the spam folder too). Once signed in,
          you can choose a password on your account page.
        </Notice>
      ) : (
        <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10" {...getFormProps(form)}>
          {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
          <TextField label="Your name" field={fields.name} autoComplete="name" required />
          <TextField label="E-mail address" field={fields.email} type="email" autoComplete="email" required />
          <p className="text-sm text-ink-700">We e-mail you a link to sign in with; no password is needed to start.</p>
          <Button type="submit" disabled={busy}>
            Create the account
          </Button>
        </Form>
      )}
      <p className="mt-6 text-sm">
        Already have an account?{" "}
        <Link to="/sign-in" className="underline">
          Sign in
        </Link>
      </p>
    </section>
  );
}

export function meta() {
  return [{ title: "Create an instructor account · Benchpost" }];
}
