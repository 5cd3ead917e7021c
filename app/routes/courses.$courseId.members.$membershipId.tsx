import { getFormProps, useForm } from "@conform-to/react";
import { Form, Link, data, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.members.$membershipId";
import { RoleAndCohortFields } from "~/components/member-fields";
import { AddressLines } from "~/components/shipping/address-fields";
import { Button } from "~/components/ui/button";
import { TextField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { roleWords } from "~/lib/courses/roles";
import { studentNumber, studentNumberMaxLength } from "~/lib/roster/student-number";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireCourseRole, requireStudentAccess, requireUser } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { changeMemberRole, getMember, listCohorts, removeMember, setStudentNumber } from "~/server/members/members.server";
import { viewAddress } from "~/server/shipping/addresses.server";

const memberAction = z.discriminatedUnion("intent", [
  z.object({
    intent: z.literal("change-role"),
    role: z.enum(["student", "ta", "instructor"], "Choose a role."),
    cohortId: z.union([z.literal(""), z.uuid()]).optional(),
  }),
  z.object({ intent: z.literal("remove") }),
  z.object({ intent: z.literal("student-number"), studentNumber: z.union([z.literal(""), studentNumber]).optional() }),
]);

/** The member page: the member themselves, the course's instructors, and the TAs of the member's cohort. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireUser({ request, context });
  const member = await getMember(params.courseId, params.membershipId);
  if (!member) throw data("Not found", { status: 404 });
  const access = await requireStudentAccess({ request, context }, params.courseId, member);
  const canEdit = access.membership.role === "instructor" && member.userId !== access.user.id;
  // A student's address is for the instructors (never a TA), and each view of it is recorded.
  const address =
    canEdit && member.role === "student"
      ? await viewAddress(db, {
          courseId: access.course.id,
          actorId: access.user.id,
          owner: { membershipId: member.membershipId },
          request,
        })
      : null;
  const showRecord = !access.viewingOwnWork && member.role === "student";
  return { course: access.course, member, canEdit, showRecord, address, cohorts: canEdit ? await listCohorts(access.course.id) : [] };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, memberAction);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  const target = { courseId: access.course.id, actorId: access.user.id, membershipId: params.membershipId };
  if (input.intent === "remove") {
    await removeMember(target, request);
    return redirect(`/courses/${access.course.id}/members?removed=1`);
  }
  if (input.intent === "student-number") {
    await setStudentNumber({ ...target, studentNumber: input.studentNumber || null }, request);
    return { saved: "student-number" };
  }
  await changeMemberRole({ ...target, role: input.role, cohortId: input.cohortId || null }, request);
  return { saved: "change-role" };
});

export default function CourseMember({ loaderData, actionData }: Route.ComponentProps) {
  const { course, member, canEdit, showRecord, address, cohorts } = loaderData;
  const busy = useNavigation().state !== "idle";
  const [roleForm, roleFields] = useForm({
    id: "change-role",
    lastResult: replyFor(actionData, "change-role"),
    defaultValue: { role: member.role, cohortId: member.cohortId ?? "" },
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, memberAction),
  });
  const [removeForm] = useForm({ id: "remove", lastResult: replyFor(actionData, "remove") });
  const [numberForm, numberFields] = useForm({
    id: "student-number",
    lastResult: replyFor(actionData, "student-number"),
    defaultValue: { studentNumber: member.studentNumber ?? "" },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, memberAction),
  });
  const saved = actionData && "saved" in actionData ? actionData.saved : undefined;
  return (
    <div className="mx-auto max-w-2xl space-y-6">
      <PageHeader id="member-title" title={member.name}>
        {`${roleWords[member.role]} in ${course.code} ${course.title}`}
      </PageHeader>
      <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2 rounded-lg bg-white p-5 text-sm shadow-sm ring-1 ring-ink-900/10">
        <dt className="text-ink-600">E-mail</dt>
        <dd className="break-all">{member.email}</dd>
        <dt className="text-ink-600">Cohort</dt>
        <dd>{member.cohortName ?? "—"}</dd>
        {canEdit && member.role === "student" ? (
          <>
            <dt className="text-ink-600">Shipping address</dt>
            <dd>{address ? <AddressLines address={address} /> : "None entered yet."}</dd>
          </>
        ) : null}
        {member.studentNumber ? (
          <>
            <dt className="text-ink-600">Student number</dt>
            <dd>{member.studentNumber}</dd>
          </>
        ) : null}
      </dl>
      {showRecord ? (
        <p className="text-sm">
          <Link to={`/courses/${course.id}/members/${member.membershipId}/record`} className="underline">
            Their record: kits, hand-ins, marks, extensions, e-mails
          </Link>
        </p>
      ) : null}

      {canEdit ? (
        <section aria-labelledby="role-title" className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          <h2 id="role-title" className="mb-3 text-lg font-medium">
            Role and cohort
          </h2>
          {saved === "change-role" ? (
            <div className="mb-3">
              <Notice tone="success">Saved.</Notice>
            </div>
          ) : null}
          {roleForm.errors?.length ? (
            <div className="mb-3">
              <Notice tone="error">{roleForm.errors.join(" ")}</Notice>
            </div>
          ) : null}
          <Form method="post" className="grid gap-3 sm:grid-cols-2 sm:items-end" {...getFormProps(roleForm)}>
            <input type="hidden" name="intent" value="change-role" />
            <RoleAndCohortFields fields={roleFields} cohorts={cohorts} cohortLabel="Cohort (students only)" />
            <div className="sm:col-span-2">
              <Button type="submit" disabled={busy}>
                Save
              </Button>
            </div>
          </Form>
        </section>
      ) : null}
      {canEdit ? (
        <section aria-labelledby="student-number-title" className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          <h2 id="student-number-title" className="mb-3 text-lg font-medium">
            Student number
          </h2>
          {saved === "student-number" ? (
            <div className="mb-3">
              <Notice tone="success">Saved.</Notice>
            </div>
          ) : null}
          {numberForm.errors?.length ? (
            <div className="mb-3">
              <Notice tone="error">{numberForm.errors.join(" ")}</Notice>
            </div>
          ) : null}
          <Form method="post" className="flex flex-wrap items-end gap-3" {...getFormProps(numberForm)}>
            <input type="hidden" name="intent" value="student-number" />
            <TextField
              label="Student number"
              field={numberFields.studentNumber}
              maxLength={studentNumberMaxLength}
              hint="The institution's number for this person, as the mark export shows it. Leave it empty to remove it."
            />
            <Button type="submit" disabled={busy}>
              Save the student number
            </Button>
          </Form>
        </section>
      ) : null}
      {canEdit ? (
        <section aria-labelledby="remove-title" className="rounded-lg bg-white p-5 shadow-sm ring-1 ring-ink-900/10">
          <h2 id="remove-title" className="mb-1 text-lg font-medium">
            Remove from the course
          </h2>
          <p className="mb-3 text-sm text-ink-700">They lose access at once. Everything they handed in, and its marks, is kept.</p>
          {removeForm.errors?.length ? (
            <div className="mb-3">
              <Notice tone="error">{removeForm.errors.join(" ")}</Notice>
            </div>
          ) : null}
          <Form method="post" {...getFormProps(removeForm)}>
            <input type="hidden" name="intent" value="remove" />
            <Button type="submit" disabled={busy}>
              Remove {member.name}
            </Button>
          </Form>
        </section>
      ) : null}
      {canEdit ? (
        <p className="text-sm">
          <Link to={`/courses/${course.id}/members`} className="underline">
            All members
          </Link>
        </p>
      ) : null}
    </div>
  );
}

export function meta({ data }: Route.MetaArgs) {
  return [{ title: data ? `${data.member.name} · ${data.course.code} · Benchpost` : "Member · Benchpost" }];
}
