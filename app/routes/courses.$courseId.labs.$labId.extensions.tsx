/**
 * A lab's extensions: later due times for some students or a whole cohort, beside the class's own
 * window. Instructors set and remove them here (and for ticked students from the hand-in dashboard,
 * which posts to this action); the TAs of the lab's cohorts read those of their own cohorts.
 */
import { data, Form, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.extensions";
import { LabTime } from "~/components/drop-logs/lab-time";
import { ExtensionWindowFields } from "~/components/labs/extension-fields";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Button } from "~/components/ui/button";
import { SelectField } from "~/components/ui/field";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { fieldErrors, formFailure, formValues } from "~/lib/forms/parse-form";
import { extensionInputFor, extensionInputFromForm } from "~/lib/labs/extension-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { AppError } from "~/lib/app-error";
import { db } from "~/server/db.server";
import { getExtensionsPage, removeExtension, setExtensions, type ExtensionRow } from "~/server/labs/extensions.server";
import { getLab } from "~/server/labs/labs.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadComparisonLab } from "~/server/comparison/class-comparison.server";
import { staffRoles } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  // Instructors, and the TAs of a cohort the lab is set for: the same people as its hand-in dashboard.
  const { access } = await requireLabAccess({ request, context }, params, staffRoles, loadComparisonLab);
  const lab = await getLab(db, access.course.id, params.labId);
  if (!lab) throw data("Not found", { status: 404 });
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

export async function action({ request, context, params }: Route.ActionArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const lab = z.uuid().safeParse(params.labId).success ? await getLab(db, access.course.id, params.labId) : null;
  if (!lab) throw data("Not found", { status: 404 });
  const form = await request.formData();
  const parsed = extensionInputFor({ timeZone: access.course.timeZone, opensAt: lab.opensAt }).safeParse(extensionInputFromForm(form));
  if (!parsed.success) return formFailure(formValues(form), fieldErrors(parsed.error));
  const input = parsed.data;
  try {
    if (input.intent === "remove") {
      await removeExtension(db, { access, lab, extensionId: input.extensionId, request });
      return { done: input.intent, count: 1, dueAt: null as string | null };
    }
    const target = input.intent === "extend-cohort" ? { cohortId: input.cohortId } : { membershipIds: input.membershipIds };
    const outcome = await setExtensions(db, { access, lab, target, window: input, request });
    return { done: input.intent, count: outcome.extended, dueAt: input.dueAt.toISOString() };
  } catch (error) {
    // The action already let only instructors in, so a refusal here is about the input: 400.
    if (!(error instanceof AppError)) throw error;
    return formFailure(formValues(form), { [error.field ?? "form"]: [error.message] });
    throw error;
  }
}

type Errors = Record<string, string[] | undefined>;

/** The messages of a field and of its items (`membershipIds.0`). */
const messagesFor = (errors: Errors, name: string) =>
  Object.entries(errors).flatMap(([key, messages]) => (key === name || key.startsWith(`${name}.`) ? (messages ?? []) : []));

export default function LabExtensions({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, extensions, cohorts, students } = loaderData;
  const navigation = useNavigation();
  const failed = actionData && "errors" in actionData ? actionData : null;
  const done =
    actionData && "done" in actionData && actionData.done
      ? { done: actionData.done, count: actionData.count ?? 0, dueAt: actionData.dueAt ?? null }
      : null;
  const errorsOf = (intent: string): Errors => (failed?.values.intent === intent ? failed.errors : {});
  const valuesOf = (intent: string) => (failed?.values.intent === intent ? failed.values : {});
  // A form starts blank again once the list shows its write, and keeps what was typed when refused.
  const stamp = `${extensions.length}-${
    extensions
      .map((row) => row.setAt)
      .sort()
      .at(-1) ?? ""
  }`;
  const keyOf = (intent: string) => (failed?.values.intent === intent ? `failed-${JSON.stringify(failed.values)}` : stamp);
  const formMessages = failed
    ? [
        ...messagesFor(failed.errors, "form"),
        ...messagesFor(failed.errors, "intent"),
        ...(failed.values.intent === "remove" ? messagesFor(failed.errors, "extensionId") : []),
      ]
    : [];
  const busy = navigation.state === "submitting";
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
      >
        Extensions: later due times for some students or a whole cohort. A student&apos;s own extension comes first, then their
        cohort&apos;s, then the class&apos;s times. Times in {timeZone}.
      </PageHeader>

      <section aria-labelledby="class-window-heading">
        <h2 id="class-window-heading" className="mb-2 text-lg font-semibold">
          The class&apos;s times
        </h2>
        <dl className="grid gap-4 sm:grid-cols-3">
          <TimeTerm label="Opens" at={lab.opensAt} timeZone={timeZone} />
          <TimeTerm label="Due" at={lab.dueAt} timeZone={timeZone} />
          <TimeTerm label="Late cut-off" at={lab.lateCutoffAt} timeZone={timeZone} />
        </dl>
      </section>

      {done ? <DoneNotice {...done} timeZone={timeZone} /> : null}
      {formMessages.length ? <Notice tone="error">{formMessages.join(" ")}</Notice> : null}
      {failed && !formMessages.length ? <Notice tone="error">Some fields need correcting; see the messages beside them.</Notice> : null}

      <section aria-labelledby="extensions-heading">
        <h2 id="extensions-heading" className="mb-2 text-lg font-semibold">
          Extensions of this lab
        </h2>
        {!instructor ? <p className="mb-2 text-sm text-ink-700">Those of your cohorts. Instructors set and remove extensions.</p> : null}
        {extensions.length === 0 ? (
          <p className="text-sm text-ink-700">None: everyone has the class&apos;s times.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="w-full text-left text-sm">
              <caption className="sr-only">Extensions of {lab.title}</caption>
              <thead>
                <tr className="border-b border-ink-900/20">
                  <th scope="col" className="py-1 pr-3">
                    For
                  </th>
                  <th scope="col" className="py-1 pr-3">
                    Due
                  </th>
                  <th scope="col" className="py-1 pr-3">
                    Late cut-off
                  </th>
                  <th scope="col" className="py-1 pr-3">
                    Reason
                  </th>
                  <th scope="col" className="py-1 pr-3">
                    Set by
                  </th>
                  {instructor ? (
                    <th scope="col" className="py-1">
                      <span className="sr-only">Remove</span>
                    </th>
                  ) : null}
                </tr>
              </thead>
              <tbody>
                {extensions.map((extension) => (
                  <ExtensionTableRow key={extension.id} extension={extension} timeZone={timeZone} removable={instructor} busy={busy} />
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>

      {instructor ? (
        <div className="grid gap-6 lg:grid-cols-2">
          <section aria-labelledby="student-form-heading" className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
            <h2 id="student-form-heading" className="mb-1 text-lg font-semibold">
              One student
            </h2>
            <p className="mb-3 text-sm text-ink-700">
              An accommodation or an illness. Replaces any extension the student has. To extend several, tick them on the Hand-ins page.
            </p>
            <Form method="post" key={keyOf("extend-students")} className="flex flex-col gap-4">
              <input type="hidden" name="intent" value="extend-students" />
              <SelectField
                label="Student"
                name="membershipIds"
                defaultValue={valuesOf("extend-students").membershipIds ?? ""}
                error={messagesFor(errorsOf("extend-students"), "membershipIds")}
              >
                <option value="">Choose a student</option>
                {students.map((student) => (
                  <option key={student.membershipId} value={student.membershipId}>
                    {student.name} ({student.cohortName})
                  </option>
                ))}
              </SelectField>
              <ExtensionWindowFields timeZone={timeZone} values={valuesOf("extend-students")} errors={errorsOf("extend-students")} />
              <Button type="submit" disabled={busy} className="self-start">
                Give this student a later due time
              </Button>
            </Form>
          </section>

          <section aria-labelledby="cohort-form-heading" className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
            <h2 id="cohort-form-heading" className="mb-1 text-lg font-semibold">
              A whole cohort
            </h2>
            <p className="mb-3 text-sm text-ink-700">
              Kits that shipped late, a bench day lost. A student&apos;s own extension still comes first.
            </p>
            <Form method="post" key={keyOf("extend-cohort")} className="flex flex-col gap-4">
              <input type="hidden" name="intent" value="extend-cohort" />
              <SelectField
                label="Cohort"
                name="cohortId"
                defaultValue={valuesOf("extend-cohort").cohortId ?? ""}
                error={messagesFor(errorsOf("extend-cohort"), "cohortId")}
              >
                <option value="">Choose a cohort</option>
                {cohorts.map((cohort) => (
                  <option key={cohort.id} value={cohort.id}>
                    {cohort.name}
                  </option>
                ))}
              </SelectField>
              <ExtensionWindowFields timeZone={timeZone} values={valuesOf("extend-cohort")} errors={errorsOf("extend-cohort")} />
              <Button type="submit" disabled={busy} className="self-start">
                Extend the whole cohort
              </Button>
            </Form>
          </section>
        </div>
      ) : null}
    </div>
  );
}

function TimeTerm({ label, at, timeZone }: { label: string; at: string | null; timeZone: string }) {
  return (
    <div>
      <dt className="text-sm text-ink-600">{label}</dt>
      <dd>{at ? <LabTime at={at} courseTimeZone={timeZone} /> : "None: nothing after the due time"}</dd>
    </div>
  );
}

function ExtensionTableRow({
  extension,
  timeZone,
  removable,
  busy,
}: {
  extension: ExtensionRow;
  timeZone: string;
  removable: boolean;
  busy: boolean;
}) {
  const target = extension.studentName ?? `the ${extension.cohortName} cohort`;
  return (
    <tr className="border-b border-ink-900/10 align-top">
      <th scope="row" className="py-1 pr-3 font-medium">
        {extension.studentName ? (
          <>
            {extension.studentName} <span className="font-normal text-ink-600">({extension.cohortName})</span>
          </>
        ) : (
          <>Whole cohort: {extension.cohortName}</>
        )}
      </th>
      <td className="py-1 pr-3">
        <LabTime at={extension.dueAt} courseTimeZone={timeZone} />
      </td>
      <td className="py-1 pr-3">{extension.lateCutoffAt ? <LabTime at={extension.lateCutoffAt} courseTimeZone={timeZone} /> : "None"}</td>
      <td className="py-1 pr-3">{extension.reason}</td>
      <td className="py-1 pr-3">
        {extension.setBy ?? "—"}, <LabTime at={extension.setAt} courseTimeZone={timeZone} />
      </td>
      {removable ? (
        <td className="py-1">
          <Form method="post">
            <input type="hidden" name="intent" value="remove" />
            <input type="hidden" name="extensionId" value={extension.id} />
            <Button type="submit" variant="danger" disabled={busy} className="py-1">
              Remove<span className="sr-only"> the extension of {target}</span>
            </Button>
          </Form>
        </td>
      ) : null}
    </tr>
  );
}

function DoneNotice({
  done,
  count,
  dueAt,
  timeZone,
}: {
  done: "extend-students" | "extend-cohort" | "remove";
  count: number;
  dueAt: string | null;
  timeZone: string;
}) {
  if (done === "remove")
    return (
      <Notice tone="success">
        The extension is removed: its students are back on their cohort&apos;s or the class&apos;s times, and their hand-ins are judged by
        them.
      </Notice>
    );
  const who = done === "extend-cohort" ? "The cohort is" : count === 1 ? "The student is" : `${count} students are`;
  return (
    <Notice tone="success">
      {who} now due <LabTime at={dueAt!} courseTimeZone={timeZone} />; hand-ins already made are judged by the new time.
    </Notice>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.lab.title ?? "Lab"} · extensions · Benchpost` }];
}
