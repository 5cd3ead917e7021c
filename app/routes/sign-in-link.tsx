import { Form, Link, data } from "react-router";
import type { Route } from "./+types/sign-in-link";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { peekEmailLink } from "~/server/auth/email-links.server";
import { redirectWithNewSession } from "~/server/auth/session-responses.server";
import { signInWithEmailLink } from "~/server/auth/sign-in.server";
import { db } from "~/server/db.server";

// Opening the link changes nothing (mail scanners open links too); the button below signs in.
export async function loader({ params }: Route.LoaderArgs) {
  return { valid: await peekEmailLink(db, params.token, "sign_in") };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const started = await signInWithEmailLink(params.token, request);
  if (!started) return data({ failed: true }, { status: 410 });
  return redirectWithNewSession({ request, context }, "/", started);
}

// The token is in the address: other sites must not see it in a Referer header.
export const headers: Route.HeadersFunction = () => ({ "Referrer-Policy": "strict-origin" });

export default function SignInLink({ loaderData, actionData }: Route.ComponentProps) {
  const valid = loaderData.valid && !actionData?.failed;
  return (
    <section className="mx-auto max-w-md" aria-labelledby="link-title">
      <PageHeader id="link-title" title="Sign in with your e-mailed link" />
      {valid ? (
        <Form method="post" className="space-y-4">
          <p className="text-ink-700">This link signs you in once. Continue on this device?</p>
          <Button type="submit">Sign in</Button>
        </Form>
      ) : (
        <div className="space-y-4">
          <Notice tone="warning">This sign-in link has been used already or is more than 15 minutes old.</Notice>
          <p>
            <Link to="/sign-in" className="underline">
              Ask for a new link
            </Link>
          </p>
        </div>
      )}
    </section>
  );
}

export function meta() {
  return [{ title: "Sign in with a link · Benchpost" }];
}
