import { RoleAndCohortFields } from "~/components/member-fields";
import { roleWords } from "~/lib/courses/roles";
import { Form, Link, data, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.members";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseForm } from "~/lib/forms/parse-form";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { createInvitations } from "~/server/members/invitations.server";
import { listCohorts, listMembers, listOpenInvitations } from "~/server/members/members.server";

const inviteSchema = z.object({
  intent: z.literal("invite"),
  email: z.email("Enter the person's e-mail address.").max(254),
  name: z.string().trim().max(120).optional(),
  role: z.enum(["student", "ta", "instructor"], "Choose a role."),
  cohortId: z.union([z.literal(""), z.uuid()]).optional(),
});

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const [members, invitations, cohorts] = await Promise.all([
    listMembers(access.course.id),
    listOpenInvitations(access.course.id),
    listCohorts(access.course.id),
  ]);
  return { course: access.course, members, invitations, cohorts };
}

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const form = parseForm(inviteSchema, await request.formData());
  if (!form.ok) return data({ errors: form.errors, values: form.values }, { status: 400 });
  const { email, name, role, cohortId } = form.data;
  const result = await db.transaction((tx) =>
    createInvitations(
      tx,
      { id: access.user.id, name: access.user.name },
      access.course.id,
      [{ email, name, role, cohortId: cohortId || null }],
      request,
    ),
  );
  if (result.skipped.length > 0) {
    const reason =
      result.skipped[0].reason === "already a member"
        ? "This person is a member of the course already."
        : "Choose one of this course's cohorts.";
    const field = result.skipped[0].reason === "already a member" ? "email" : "cohortId";
    return data({ errors: { [field]: reason }, values: { email, name: name ?? "", role, cohortId: cohortId ?? "" } }, { status: 400 });
  }
  return { invited: email };
}

export default function CourseMembers({ loaderData, actionData }: Route.ComponentProps) {
  const { course, members, invitations, cohorts } = loaderData;
  const busy = useNavigation().state !== "idle";
  const errors = actionData && "errors" in actionData ? (actionData.errors as Record<string, string | undefined>) : {};
  const values = actionData && "values" in actionData ? actionData.values : {};
  return (
    <div className="space-y-8">
      <PageHeader id="members-title" title="Members">
        {`${course.code} ${course.title} · ${course.term}`}
      </PageHeader>

      <section aria-labelledby="invite-title" className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
        <h2 id="invite-title" className="mb-3 text-lg font-medium">
          Invite someone
        </h2>
        {actionData && "invited" in actionData ? (
          <div className="mb-3">
            <Notice tone="success">Invitation e-mailed to {actionData.invited}. The link works once, for 14 days.</Notice>
          </div>
        ) : null}
        <Form method="post" className="grid gap-3 sm:grid-cols-2 lg:grid-cols-4 lg:items-end">
          <input type="hidden" name="intent" value="invite" />
          <TextField label="E-mail address" name="email" type="email" required defaultValue={values.email} error={errors.email} />
          <TextField label="Name (optional)" name="name" defaultValue={values.name} error={errors.name} />
          <RoleAndCohortFields
            role={values.role ?? "student"}
            cohortId={values.cohortId ?? ""}
            cohorts={cohorts}
            errors={errors}
            cohortLabel="Cohort (students: their cohort; TAs: the cohort they mark)"
          />
          <div className="sm:col-span-2 lg:col-span-4">
            <Button type="submit" disabled={busy}>
              Send the invitation
            </Button>
          </div>
        </Form>
      </section>

      <section aria-labelledby="roster-title">
        <h2 id="roster-title" className="mb-3 text-lg font-medium">
          {members.length} {members.length === 1 ? "member" : "members"}
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

      {invitations.length > 0 ? (
        <section aria-labelledby="pending-title">
          <h2 id="pending-title" className="mb-3 text-lg font-medium">
            Invitations not yet accepted
          </h2>
          <ul className="divide-y divide-ink-900/10 rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
            {invitations.map((invitation) => (
              <li key={invitation.id} className="px-3 py-2 text-sm">
                {invitation.name ? `${invitation.name} · ` : ""}
                {invitation.email} · {roleWords[invitation.role]}
                {invitation.cohortName ? ` · ${invitation.cohortName}` : ""} · until{" "}
                {new Date(invitation.expiresAt).toISOString().slice(0, 10)}
              </li>
            ))}
          </ul>
        </section>
      ) : null}
    </div>
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `Members · ${data.course.code} · Benchpost` : "Members · Benchpost" }];
}
