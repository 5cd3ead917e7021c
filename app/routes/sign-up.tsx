import { Form, Link, data, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/sign-up";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseForm } from "~/lib/forms/parse-form";
import { getOptionalUser } from "~/server/auth/access.server";
import { describeWait, retryAfterHeaders } from "~/server/auth/session-responses.server";
import { signUp } from "~/server/auth/sign-in.server";
import { allowSignUp } from "~/server/config.server";

const signUpSchema = z.object({
  name: z.string().trim().min(1, "Enter your name as students should see it.").max(120),
  email: z.email("Enter your e-mail address, like name@example.org.").max(254),
});

function requireSignUpOpen() {
  if (!allowSignUp()) throw data("Not found", { status: 404 });
}

export async function loader({ request }: Route.LoaderArgs) {
  requireSignUpOpen();
  if (await getOptionalUser(request)) throw redirect("/");
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  requireSignUpOpen();
  const form = parseForm(signUpSchema, await request.formData());
  if (!form.ok) return data({ errors: form.errors, values: form.values }, { status: 400 });
  const result = await signUp(form.data, request);
  const values = { name: form.data.name, email: form.data.email };
  if (result.outcome === "limited") {
    return data(
      { formError: `Too many attempts. Try again in ${describeWait(result.retryAfterSeconds)}.`, values },
      { status: 429, headers: retryAfterHeaders(result.retryAfterSeconds) },
    );
  }
  // The same answer whether or not the address had an account: the e-mailed link signs in to either.
  return { sentTo: form.data.email };
}

// Passes Retry-After from a limited attempt on to the page.
export const headers: Route.HeadersFunction = ({ actionHeaders }) => actionHeaders;

export default function SignUp({ actionData }: Route.ComponentProps) {
  const busy = useNavigation().state !== "idle";
  const errors = actionData && "errors" in actionData ? actionData.errors : undefined;
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
        <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          {actionData && "formError" in actionData ? <Notice tone="error">{actionData.formError}</Notice> : null}
          <TextField
            label="Your name"
            name="name"
            autoComplete="name"
            required
            defaultValue={actionData?.values?.name}
            error={errors?.name}
          />
          <TextField
            label="E-mail address"
            name="email"
            type="email"
            autoComplete="email"
            required
            defaultValue={actionData?.values?.email}
            error={errors?.email}
          />
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
