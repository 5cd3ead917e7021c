import { getFormProps, useForm } from "@conform-to/react";
import type { ReactNode } from "react";
import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.members";
import { RoleAndCohortFields } from "~/components/member-fields";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { AppError } from "~/lib/app-error";
import { roleWords } from "~/lib/courses/roles";
import { formatDateTime } from "~/lib/format-date";
import { entityId } from "~/lib/forms/ids";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireCourseRole } from "~/server/auth/access.server";
import { normaliseEmail } from "~/server/auth/sign-in.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { createInvitations, resendInvitation, revokeInvitation } from "~/server/members/invitations.server";
import { listCohorts, listMembers, listOpenInvitations } from "~/server/members/members.server";
import { counted, plural } from "~/lib/plural";

const person = z.object({
  email: z.email("Enter the person's e-mail address.").max(254),
  name: z.string().trim().max(120).optional(),
  role: z.enum(["student", "ta", "instructor"], "Choose a role."),
  cohortId: z.union([z.literal(""), z.uuid()]).optional(),
});
const inviteSchema = z.object({ intent: z.literal("invite"), people: z.array(person).min(1, "Add the person to invite.") });
const membersAction = z.discriminatedUnion("intent", [
  inviteSchema,
  z.object({ intent: z.literal("resend-invitation"), invitationId: entityId }),
  z.object({ intent: z.literal("revoke-invitation"), invitationId: entityId }),
]);
const newPerson = { email: "", name: "", role: "student", cohortId: "" };
const skippedWords = {
  "already a member": { field: "email", message: "This person is a member of the course already." },
  "unknown cohort": { field: "cohortId", message: "Choose one of this course's cohorts." },
} as const;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const [members, invitations, cohorts] = await Promise.all([
    listMembers(access.course.id),
    listOpenInvitations(access.course.id),
    listCohorts(access.course.id),
  ]);
  return { course: access.course, members, invitations, cohorts };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, membersAction);
  // A row added or removed without JavaScript comes back as the form to go on with, not as a refusal.
  if (submission.status !== "success") return data(submission.reply(), { status: submission.status === "error" ? 400 : 200 });
  const input = submission.value;
  const inviter = { id: access.user.id, name: access.user.name };
  if (input.intent === "resend-invitation") {
    const { email } = await resendInvitation(db, { courseId: access.course.id, inviter, invitationId: input.invitationId }, request);
    return { resent: email };
  }
  if (input.intent === "revoke-invitation") {
    const { email } = await revokeInvitation(
      db,
      { courseId: access.course.id, actorId: access.user.id, invitationId: input.invitationId },
      request,
    );
    return { revoked: email };
  }
  const { people } = input;
  await db.transaction(async (tx) => {
    const rows = people.map((row) => ({ ...row, cohortId: row.cohortId || null }));
    const { skipped } = await createInvitations(tx, inviter, access.course.id, rows, request);
    // All or none: a row refused rolls the others back, so that sending again invites nobody twice.
    if (skipped.length > 0) {
      const issues = skipped.map(({ email, reason }) => {
        const index = people.findIndex((row) => normaliseEmail(row.email) === email);
        return { path: ["people", index, skippedWords[reason].field], message: skippedWords[reason].message };
      });
      throw new AppError({ code: "invitation_refused", message: "No invitation was sent: see the marked rows.", issues });
    }
  });
  return { invited: people.map((row) => row.email) };
});

export default function CourseMembers({ loaderData, actionData }: Route.ComponentProps) {
  const { course, members, invitations, cohorts } = loaderData;
  const busy = useNavigation().state !== "idle";
  const [form, fields] = useForm({
    lastResult: replyFor(actionData, "invite"),
    defaultValue: { people: [newPerson] },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, inviteSchema),
  });
  const people = fields.people.getFieldList();
  const invited = actionData && "invited" in actionData ? actionData.invited : undefined;
  const resent = actionData && "resent" in actionData ? actionData.resent : undefined;
  const revoked = actionData && "revoked" in actionData ? actionData.revoked : undefined;
  const invitationReply = replyFor(actionData, "resend-invitation") ?? replyFor(actionData, "revoke-invitation");
  return (
    <div className="space-y-8">
      <PageHeader
        id="members-title"
        title="Members"
        actions={
          <Link to={`/courses/${course.id}/addresses/import`} className="text-sm underline">
            Import shipping addresses
          </Link>
        }
      >
        {`${course.code} ${course.title} · ${course.term}`}
      </PageHeader>

      <section aria-labelledby="invite-title" className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
        <h2 id="invite-title" className="mb-3 text-lg font-medium">
          Invite someone
        </h2>
        {invited ? (
          <div className="mb-3">
            <Notice tone="success">
              {invited.length === 1
                ? `Invitation e-mailed to ${invited[0]}. The link works once, for 14 days.`
                : `Invitations e-mailed to ${invited.join(", ")}. Each link works once, for 14 days.`}
            </Notice>
          </div>
        ) : null}
        <Form method="post" className="flex flex-col gap-4" {...getFormProps(form)}>
          <input type="hidden" name="intent" value="invite" />
          {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
          {people.map((row, index) => {
            const rowFields = row.getFieldset();
            return (
              <fieldset key={row.key ?? index} className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4 lg:items-end">
                <legend className="sr-only">Person {index + 1}</legend>
                <TextField label="E-mail address" field={rowFields.email} type="email" required />
                <TextField label="Name (optional)" field={rowFields.name} />
                <RoleAndCohortFields
                  fields={rowFields}
                  cohorts={cohorts}
                  cohortLabel="Cohort (students: their cohort; TAs: the cohort they mark)"
                />
              </fieldset>
            );
          })}
          {fields.people.errors?.length ? <Notice tone="error">{fields.people.errors.join(" ")}</Notice> : null}
          {/* Sending comes first: Enter in a field presses the form's first button. */}
          <div className="flex flex-wrap gap-3">
            <Button type="submit" disabled={busy}>
              Send {plural(people.length, "the invitation", `the ${people.length} invitations`)}
            </Button>
            <Button variant="secondary" {...form.insert.getButtonProps({ name: fields.people.name, defaultValue: newPerson })}>
              Add another person
            </Button>
            {people.length > 1 ? (
              <Button variant="secondary" {...form.remove.getButtonProps({ name: fields.people.name, index: people.length - 1 })}>
                Remove the last person
              </Button>
            ) : null}
          </div>
        </Form>
      </section>

      <section aria-labelledby="roster-title">
        <h2 id="roster-title" className="mb-3 text-lg font-medium">
          {counted(members.length, "member", "members")}
        </h2>
        <div
          role="region"
          aria-label="Members of the course"
          tabIndex={0}
          className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-ink-700"
        >
          <table className="w-full text-left text-sm">
            <caption className="sr-only">Members of the course</caption>
            <thead className="bg-paper-100 text-ink-700">
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">
                  Name
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  E-mail
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Role
                </th>
                <th scope="col" className="px-3 py-2 font-medium">
                  Cohort
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink-900/10">
              {members.map((member) => (
                <tr key={member.membershipId}>
                  <td className="min-w-40 px-3 py-2">
                    <Link to={member.membershipId} className="underline">
                      {member.name}
                    </Link>
                  </td>
                  <td className="px-3 py-2 whitespace-nowrap">{member.email}</td>
                  <td className="px-3 py-2">{roleWords[member.role]}</td>
                  <td className="px-3 py-2">
                    {member.role === "ta" ? member.taCohortNames.join(", ") || "none assigned" : (member.cohortName ?? "—")}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      </section>

      {invitations.length > 0 || resent || revoked || invitationReply ? (
        <section aria-labelledby="pending-title">
          <h2 id="pending-title" className="mb-3 text-lg font-medium">
            Invitations not yet accepted
          </h2>
          {resent ? (
            <div className="mb-3">
              <Notice tone="success">{`Invitation sent again to ${resent}, with a new link; the old link no longer works.`}</Notice>
            </div>
          ) : null}
          {revoked ? (
            <div className="mb-3">
              <Notice tone="success">{`Invitation to ${revoked} withdrawn: its link no longer opens the course.`}</Notice>
            </div>
          ) : null}
          {invitationReply?.error?.[""]?.length ? (
            <div className="mb-3">
              <Notice tone="error">{invitationReply.error[""].join(" ")}</Notice>
            </div>
          ) : null}
          <ul className="divide-y divide-ink-900/10 rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
            {invitations.map((invitation) => (
              <li key={invitation.id} className="flex flex-wrap items-center justify-between gap-2 px-3 py-2 text-sm">
                <span>
                  {invitation.name ? `${invitation.name} · ` : ""}
                  {invitation.email} · {roleWords[invitation.role]}
                  {invitation.cohortName ? ` · ${invitation.cohortName}` : ""}
                  {invitation.studentNumber ? ` · ${invitation.studentNumber}` : ""} · until{" "}
                  {formatDateTime(invitation.expiresAt, course.timeZone)}
                </span>
                <span className="flex gap-2">
                  <InvitationButton intent="resend-invitation" invitationId={invitation.id} busy={busy}>
                    Send again<span className="sr-only"> to {invitation.email}</span>
                  </InvitationButton>
                  <InvitationButton intent="revoke-invitation" invitationId={invitation.id} busy={busy}>
                    Withdraw<span className="sr-only"> the invitation to {invitation.email}</span>
                  </InvitationButton>
                </span>
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}

/** One invitation's action: a form of its own, so that it works without JavaScript. */
function InvitationButton({
  intent,
  invitationId,
  busy,
  children,
}: {
  intent: "resend-invitation" | "revoke-invitation";
  invitationId: string;
  busy: boolean;
  children: ReactNode;
}) {
  return (
    <Form method="post">
      <input type="hidden" name="intent" value={intent} />
      <input type="hidden" name="invitationId" value={invitationId} />
      <Button type="submit" variant="secondary" disabled={busy}>
        {children}
      </Button>
    </Form>
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `Members · ${data.course.code} · Benchpost` : "Members · Benchpost" }];
}
