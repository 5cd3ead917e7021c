import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/sign-in";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { passwordToCheck } from "~/lib/auth/password-policy";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { storableText } from "~/lib/forms/storable-text";
import { getOptionalUser } from "~/server/auth/access.server";
import { describeWait, redirectWithNewSession, retryAfterHeaders } from "~/server/auth/session-responses.server";
import { requestEmailLink, signInWithPassword } from "~/server/auth/sign-in.server";
import { allowSignUp } from "~/server/config.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams, safeRedirectPath } from "~/server/http.server";

const email = z.email("Enter the e-mail address your course uses, like name@example.org.").max(254);
const passwordSignInSchema = z.object({
  intent: z.literal("password"),
  email,
  password: passwordToCheck.min(1, "Enter your password."),
  redirectTo: z.string().optional(),
});
const linkSignInSchema = z.object({ intent: z.literal("link"), email });
/** `?redirectTo=/courses/…`: where to go once signed in (any other site falls back to the overview). */
const signInSearch = z.object({ redirectTo: storableText.max(2000).optional() });

export async function loader({ request, context }: Route.LoaderArgs) {
  const redirectTo = safeRedirectPath(readSearchParams(request, signInSearch).redirectTo);
  if (await getOptionalUser({ request, context })) throw redirect(redirectTo);
  return { redirectTo, allowSignUp: allowSignUp() };
}

const signInForm = z.discriminatedUnion("intent", [passwordSignInSchema, linkSignInSchema], { error: "Choose how to sign in." });
// A password never travels back into the page.
const hideFields = ["password"];

export const action = formAction(async ({ request, context, formData }: Route.ActionArgs & { formData: FormData }) => {
  const submission = parseSubmission(formData, signInForm);
  if (submission.status !== "success") return data(submission.reply({ hideFields }), { status: 400 });
  const input = submission.value;
  if (input.intent === "link") {
    const result = await requestEmailLink("sign_in", input.email, request);
    if (result.outcome === "limited") {
      const formErrors = [`Too many links were asked for. Try again in ${describeWait(result.retryAfterSeconds)}.`];
      return data(submission.reply({ formErrors }), { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) });
    }
    return { intent: "link" as const, sentTo: input.email };
  }
  const result = await signInWithPassword(input, request);
  if (result.outcome === "limited") {
    const formErrors = [
      `Too many attempts. For your account's safety, wait ${describeWait(result.retryAfterSeconds)} and try again, or sign in with an e-mailed link.`,
    ];
    return data(submission.reply({ formErrors, hideFields }), { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) });
  }
  if (result.outcome === "refused") {
    const formErrors = ["That e-mail address and password do not match. Check both, or sign in with an e-mailed link instead."];
    return data(submission.reply({ formErrors, hideFields }), { status: 401 });
  }
  return redirectWithNewSession({ request, context }, safeRedirectPath(input.redirectTo), result);
});

// Passes Retry-After from a limited attempt on to the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const validate = ({ formData }: { formData: FormData }) => parseSubmission(formData, signInForm);
  const [passwordForm, passwordFields] = useForm({
    id: "password",
    lastResult: replyFor(actionData, "password"),
    shouldValidate: "onBlur",
    onValidate: validate,
  });
  const [linkForm, linkFields] = useForm({
    id: "link",
    lastResult: replyFor(actionData, "link"),
    shouldValidate: "onBlur",
    onValidate: validate,
  });
  const sentTo = actionData && "sentTo" in actionData ? actionData.sentTo : null;
  return (
    <section className="mx-auto max-w-md" aria-labelledby="sign-in-title">
      <PageHeader id="sign-in-title" title="Sign in to Benchpost" />

      <Form
        method="post"
        className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10"
        aria-labelledby="password-title"
        {...getFormProps(passwordForm)}
      >
        <h2 id="password-title" className="font-medium">
          With your password
        </h2>
        {passwordForm.errors?.length ? <Notice tone="error">{passwordForm.errors.join(" ")}</Notice> : null}
        <input type="hidden" name="intent" value="password" />
        <input type="hidden" name="redirectTo" value={loaderData.redirectTo} />
        <TextField label="E-mail address" field={passwordFields.email} type="email" autoComplete="username" required />
        <TextField label="Password" field={passwordFields.password} type="password" autoComplete="current-password" required />
        <div className="flex flex-wrap items-center justify-between gap-3">
          <Button type="submit" disabled={busy}>
            Sign in
          </Button>
          <Link to="/forgot-password" className="text-sm text-ink-700 underline">
            Forgot your password?
          </Link>
        </div>
      </Form>

      <Form
        method="post"
        className="mt-6 space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10"
        aria-labelledby="link-title"
        {...getFormProps(linkForm)}
      >
        <h2 id="link-title" className="font-medium">
          Or with a link sent to your e-mail
        </h2>
        <p className="text-sm text-ink-700">No password needed: we e-mail you a link that signs you in once, within 15 minutes.</p>
        {sentTo ? (
          <Notice tone="success">
            If {sentTo} belongs to a Benchpost account, a sign-in link is on its way. Check your inbox (and spam folder).
          </Notice>
        ) : null}
        {linkForm.errors?.length ? <Notice tone="error">{linkForm.errors.join(" ")}</Notice> : null}
        <input type="hidden" name="intent" value="link" />
        <TextField label="E-mail address" field={linkFields.email} type="email" autoComplete="email" required />
        <Button type="submit" variant="secondary" disabled={busy}>
          E-mail me a sign-in link
        </Button>
      </Form>

      {loaderData.allowSignUp ? (
        <p className="mt-6 text-sm text-ink-700">
          Teaching a course?{" "}
          <Link to="/sign-up" className="underline">
            Create an instructor account
          </Link>
          . Students and teaching assistants join from their invitation e-mail.
        </p>
      ) : null}
    </section>
  );
}

export function meta() {
  return [{ title: "Sign in · Benchpost" }];
}
