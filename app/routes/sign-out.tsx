import { Form } from "react-router";
import type { Route } from "./+types/sign-out";
import { Button } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/page-header";
import { requireUser } from "~/server/auth/access.server";
import { redirectSignedOut } from "~/server/auth/session-responses.server";
import { signOut, signOutEverywhere } from "~/server/auth/sign-in.server";

export async function loader({ request, context }: Route.LoaderArgs) {
  const user = await requireUser({ request, context });
  return { name: user.name };
}

export async function action({ request, context }: Route.ActionArgs) {
  const user = await requireUser({ request, context });
  const formData = await request.formData();
  if (formData.get("intent") === "everywhere") await signOutEverywhere(user.id, request);
  else if (user.sessionId) await signOut(user.id, user.sessionId, request);
  return redirectSignedOut("/");
}

export default function SignOut({ loaderData }: Route.ComponentProps) {
  return (
    <section className="mx-auto max-w-md" aria-labelledby="sign-out-title">
      <PageHeader id="sign-out-title" title="Sign out">
        {`Signed in as ${loaderData.name}.`}
      </PageHeader>
      <div className="flex flex-wrap gap-3">
        <Form method="post">
          <Button type="submit" name="intent" value="this-device">
            Sign out on this device
          </Button>
        </Form>
        <Form method="post">
          <Button type="submit" name="intent" value="everywhere" variant="secondary">
            Sign out everywhere
          </Button>
        </Form>
      </div>
      <p className="mt-4 text-sm text-ink-700">
        "Everywhere" ends your sessions on every phone and computer, for example after using a shared one.
      </p>
    </section>
  );
}

export function meta() {
  return [{ title: "Sign out · Benchpost" }];
}
