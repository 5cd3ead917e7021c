import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/invitations.$token";
import { LabTime } from "~/components/drop-logs/lab-time";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { PASSWORD_MIN_LENGTH, newPasswordField } from "~/lib/auth/password-policy";
import { parseSubmission } from "~/lib/forms/submission";
import { getOptionalUser } from "~/server/auth/access.server";
import { redirectWithNewSession } from "~/server/auth/session-responses.server";
import { formAction } from "~/server/errors.server";
import { acceptInvitation, findInvitation } from "~/server/members/invitations.server";

const acceptInvitationSchema = z
  .object({
    name: z.string().trim().max(120).optional(),
    // Optional: students may sign in by e-mailed link and never choose a password.
    password: z.union([z.literal(""), newPasswordField]).optional(),
    confirmPassword: z.string().optional(),
  })
  .refine((form) => !form.password || form.password === form.confirmPassword, {
    path: ["confirmPassword"],
    message: "The two passwords are not the same.",
  });

const roleWords = { instructor: "an instructor", ta: "a teaching assistant", student: "a student" } as const;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const [invitation, user] = await Promise.all([findInvitation(params.token), getOptionalUser({ request, context })]);
  if (!invitation) throw data("Not found", { status: 404 });
  return {
    invitation: { ...invitation, replacedAt: invitation.replacedAt?.toISOString() ?? null },
    signedInAs: user ? { email: user.email } : null,
  };
}

// Passwords never travel back into the page.
const hideFields = ["password", "confirmPassword"];

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const submission = parseSubmission(formData, acceptInvitationSchema);
  if (submission.status !== "success") return data(submission.reply({ hideFields }), { status: 400 });
  const user = await getOptionalUser({ request, context });
  const { name, password } = submission.value;
  const result = await acceptInvitation(params.token, { name, password: password || null }, user?.id ?? null, request);
  if (result.outcome === "invalid") {
    const formErrors = ["This invitation has been used already or has expired. Ask your instructor for a new one."];
    return data(submission.reply({ formErrors, hideFields }), { status: 410 });
  }
  if (result.outcome === "other-account") {
    const formErrors = [`This invitation is for ${result.invitedEmail}. Sign out first, then open the link again.`];
    return data(submission.reply({ formErrors, hideFields }), { status: 409 });
  }
  return redirectWithNewSession({ request, context }, "/", result);
});

// The token is in the address: other sites must not see it in a Referer header.
export const headers: Route.HeadersFunction = () => ({ "Referrer-Policy": "strict-origin" });

export default function AcceptInvitation({ loaderData, actionData }: Route.ComponentProps) {
  const { invitation, signedInAs } = loaderData;
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: actionData,
    defaultValue: { name: invitation.name ?? "" },
    shouldValidate: "onBlur",
    // Once shown, an error goes as the field is corrected: clearing it on blur would move the button from under a click.
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, acceptInvitationSchema),
  });
  const heading = `Join ${invitation.courseCode} ${invitation.courseTitle}`;
  if (invitation.state !== "open") {
    return (
      <section className="mx-auto max-w-md space-y-4" aria-labelledby="invitation-title">
        <PageHeader id="invitation-title" title={heading} />
        <Notice tone="warning">
          {invitation.state === "replaced" && invitation.replacedAt ? (
            <>
              This invitation was replaced by a newer one, sent to you on{" "}
              <LabTime at={invitation.replacedAt} courseTimeZone={invitation.courseTimeZone} />; use the link in the latest e-mail.
            </>
          ) : invitation.state === "revoked" ? (
            <>
              This invitation was withdrawn by the course&apos;s instructors and no longer opens the course. If you think that is a mistake,
              ask your instructor.
            </>
          ) : (
            <>
              {invitation.state === "accepted" ? "This invitation has been accepted already." : "This invitation has expired."} If you still
              need access, ask your instructor for a new one.
            </>
          )}
        </Notice>
        <p>
          <Link to="/sign-in" className="underline">
            Sign in
          </Link>
        </p>
      </section>
    );
  }
  const wrongAccount = signedInAs && signedInAs.email !== invitation.email;
  return (
    <section className="mx-auto max-w-md" aria-labelledby="invitation-title">
      <PageHeader id="invitation-title" title={heading}>
        {`${invitation.inviterName ?? "Your instructor"} invited ${invitation.email} to join as ${roleWords[invitation.role]}${invitation.cohortName ? `, in ${invitation.cohortName}` : ""}.`}
      </PageHeader>
      {form.errors?.length ? (
        <div className="mb-4">
          <Notice tone="error">{form.errors.join(" ")}</Notice>
        </div>
      ) : null}
      {wrongAccount ? (
        <Notice tone="warning">
          You are signed in as {signedInAs.email}, but this invitation is for {invitation.email}.{" "}
          <Link to="/sign-out" className="underline">
            Sign out
          </Link>{" "}
          first, then open the link again.
        </Notice>
      ) : (
        <Form method="post" className="space-y-4 rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10" {...getFormProps(form)}>
          {invitation.hasAccount ? (
            <p className="text-ink-700">
              You already have a Benchpost account with this address: accepting adds the course to it and signs you in.
            </p>
          ) : (
            <>
              <TextField label="Your name" field={fields.name} autoComplete="name" required />
              <TextField
                label="Choose a password (optional)"
                field={fields.password}
                type="password"
                autoComplete="new-password"
                minLength={PASSWORD_MIN_LENGTH}
                hint="Leave it empty to sign in with a link e-mailed to you each time."
              />
              <TextField label="The same password again" field={fields.confirmPassword} type="password" autoComplete="new-password" />
            </>
          )}
          <Button type="submit" disabled={busy}>
            Accept and join the course
          </Button>
        </Form>
      )}
    </section>
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `Join ${data.invitation.courseCode} · Benchpost` : "Invitation · Benchpost" }];
}
