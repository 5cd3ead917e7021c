/**
 * A lab's extensions: later due times for some students or a whole cohort, beside the class's own
 * window. Instructors set and remove them here (and for ticked students from the hand-in dashboard,
 * which posts to this action); the TAs of the lab's cohorts read those of their own cohorts.
 */
import { data, useNavigation } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.extensions";
import { ExtensionForm } from "~/components/labs/extension-forms";
import { ClassTimes, DoneNotice, ExtensionTable } from "~/components/labs/extension-list";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { extensionInputFor } from "~/lib/labs/extension-input";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { getExtensionsPage, removeExtension, setExtensions } from "~/server/labs/extensions.server";
import { getLab } from "~/server/labs/labs.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { staffRoles } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  // Instructors, and the TAs of a cohort the lab is set for: the same people as its hand-in dashboard.
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, getLab);
  const page = await getExtensionsPage(db, access, lab);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    instructor: access.membership.role === "instructor",
    lab: {
      id: lab.id,
      title: lab.title,
      opensAt: lab.opensAt.toISOString(),
      dueAt: lab.dueAt.toISOString(),
      lateCutoffAt: lab.lateCutoffAt?.toISOString() ?? null,
    },
    ...page,
  };
}

// The action lets only instructors in, so a refusal from the rules is about the input: 400.
export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const { access, lab } = await requireLabAccess({ request, context }, params, ["instructor"], getLab);
  const submission = parseSubmission(formData, extensionInputFor({ timeZone: access.course.timeZone, opensAt: lab.opensAt }));
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const input = submission.value;
  if (input.intent === "remove") {
    await removeExtension(db, { access, lab, extensionId: input.extensionId, request });
    return { done: input.intent, count: 1, dueAt: null as string | null };
  }
  const target = input.intent === "extend-cohort" ? { cohortId: input.cohortId } : { membershipIds: input.membershipIds };
  const outcome = await setExtensions(db, { access, lab, target, window: input, request });
  return { done: input.intent, count: outcome.extended, dueAt: input.dueAt.toISOString() };
});

export default function LabExtensions({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, extensions, cohorts, students } = loaderData;
  const navigation = useNavigation();
  const reply = actionData && "initialValue" in actionData ? actionData : undefined;
  const done = actionData && "done" in actionData ? actionData : null;
  // Above the forms: what belongs to none of them (a removal, an unknown intent) and each form's own form-level messages.
  const formMessages = Object.entries(reply?.error ?? {}).flatMap(([name, messages]) =>
    name === "" || name === "intent" || name === "extensionId" ? (messages ?? []) : [],
  );
  // A form starts blank again once the list shows its write, and keeps what was typed when refused.
  const stamp = `${extensions.length}-${
    extensions
      .map((row) => row.setAt)
      .sort()
      .at(-1) ?? ""
  }`;
  const busy = navigation.state === "submitting";
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
      >
        Extensions: later due times for some students or a whole cohort. A student&apos;s own extension comes first, then their
        cohort&apos;s, then the class&apos;s times.
      </PageHeader>

      <ClassTimes lab={lab} timeZone={timeZone} />

      {done ? <DoneNotice done={done.done} count={done.count} dueAt={done.dueAt} timeZone={timeZone} /> : null}
      {formMessages.length ? <Notice tone="error">{formMessages.join(" ")}</Notice> : null}
      {reply?.error && !formMessages.length ? (
        <Notice tone="error">Some fields need correcting; see the messages beside them.</Notice>
      ) : null}

      <section aria-labelledby="extensions-heading">
        <h2 id="extensions-heading" className="mb-2 text-lg font-semibold">
          Extensions of this lab
        </h2>
        {!instructor ? <p className="mb-2 text-sm text-ink-700">Those of your cohorts. Instructors set and remove extensions.</p> : null}
        <ExtensionTable labTitle={lab.title} extensions={extensions} timeZone={timeZone} removable={instructor} busy={busy} />
      </section>

      {instructor ? (
        <div className="grid gap-6 lg:grid-cols-2">
          <ExtensionForm
            key={`students-${stamp}`}
            intent="extend-students"
            options={students.map((student) => ({ id: student.membershipId, label: `${student.name} (${student.cohortName})` }))}
            reply={replyFor(actionData, "extend-students")}
            timeZone={timeZone}
            opensAt={lab.opensAt}
            busy={busy}
          />
          <ExtensionForm
            key={`cohort-${stamp}`}
            intent="extend-cohort"
            options={cohorts.map((cohort) => ({ id: cohort.id, label: cohort.name }))}
            reply={replyFor(actionData, "extend-cohort")}
            timeZone={timeZone}
            opensAt={lab.opensAt}
            busy={busy}
          />
        </div>
      ) : null}
    </div>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.lab.title ?? "Lab"} · extensions · Benchpost` }];
}
