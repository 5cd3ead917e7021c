import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { data, Form, Link, useNavigation, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.settings";
import { CourseFields } from "~/components/course-fields";
import { TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { cohortName, courseInput } from "~/lib/courses/course-input";
import { formatDateTime } from "~/lib/format-date";
import { counted } from "~/lib/plural";
import { reminderDaysText, returnSettingsInput, type ReturnSettingsForm } from "~/lib/courses/return-settings-input";
import { formList, parseSubmission, replyFor } from "~/lib/forms/submission";
import { requireCourseRole } from "~/server/auth/access.server";
import { archiveCourse, restoreCourse } from "~/server/courses/archive.server";
import {
  addCohort,
  getCourseWithCohorts,
  moveCohort,
  renameCohort,
  setTaCohorts,
  updateCourse,
  updateReturnSettings,
} from "~/server/courses/courses.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";

const returnsIntent = returnSettingsInput.extend({ intent: z.literal("returns") });

const settingsIntent = z.discriminatedUnion("intent", [
  courseInput.extend({ intent: z.literal("course") }),
  returnsIntent,
  z.object({ intent: z.literal("add-cohort"), name: cohortName }),
  z.object({ intent: z.literal("rename-cohort"), cohortId: z.uuid(), name: cohortName }),
  z.object({ intent: z.literal("move-cohort"), cohortId: z.uuid(), direction: z.enum(["up", "down"]) }),
  z.object({ intent: z.literal("ta-cohorts"), membershipId: z.uuid(), cohortIds: formList(z.uuid()) }),
  z.object({ intent: z.literal("archive"), confirm: z.literal("on", { error: "Tick the box to confirm that the course is finished." }) }),
  z.object({ intent: z.literal("restore") }),
]);

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const details = await getCourseWithCohorts(db, access.course.id);
  if (!details) throw data("Not found", { status: 404 });
  return { ...details, timeZones: Intl.supportedValuesOf("timeZone") };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  // Restoring is the one change an archived course takes.
  const whileArchived = formData.get("intent") === "restore";
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"], { whileArchived });
  const submission = parseSubmission(formData, settingsIntent);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const courseId = access.course.id;
  const actorId = access.user.id;
  const input = submission.value;
  if (input.intent === "course") {
    const { intent: _intent, ...course } = input;
    await updateCourse(db, { courseId, actorId, input: course });
  } else if (input.intent === "returns") {
    const { intent: _intent, ...returns } = input;
    await updateReturnSettings(db, { courseId, actorId, input: returns });
  } else if (input.intent === "add-cohort") await addCohort(db, { courseId, actorId, name: input.name });
  else if (input.intent === "rename-cohort") await renameCohort(db, { courseId, cohortId: input.cohortId, name: input.name });
  else if (input.intent === "move-cohort") await moveCohort(db, { courseId, cohortId: input.cohortId, direction: input.direction });
  else if (input.intent === "archive") await archiveCourse(db, { courseId, actorId, request });
  else if (input.intent === "restore") await restoreCourse(db, { courseId, actorId, request });
  else await setTaCohorts(db, { courseId, actorId, membershipId: input.membershipId, cohortIds: input.cohortIds });
  return { intent: input.intent, saved: true as const };
});

export default function CourseSettings({ loaderData, actionData }: Route.ComponentProps) {
  const { course, cohorts, tas, timeZones } = loaderData;
  const [search] = useSearchParams();
  const navigation = useNavigation();
  const {
    createdAt: _createdAt,
    archivedAt,
    archivedById: _archivedById,
    returnAddress,
    kitReturnBy,
    kitReturnReminderDays,
    ...courseValues
  } = course;
  const [courseForm, courseFields] = useForm({
    id: "course",
    lastResult: replyFor(actionData, "course"),
    defaultValue: {
      ...courseValues,
      localGravity: course.localGravity === null ? "" : String(course.localGravity),
      partBiasAlpha: String(course.partBiasAlpha),
    },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, settingsIntent),
  });
  const [returnsForm, returnsFields] = useForm<ReturnSettingsForm, z.output<typeof returnsIntent>>({
    id: "returns",
    lastResult: replyFor(actionData, "returns"),
    defaultValue: { kitReturnBy: kitReturnBy ?? "", kitReturnReminderDays: reminderDaysText(kitReturnReminderDays), returnAddress },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, returnsIntent),
  });
  const address = returnsFields.returnAddress.getFieldset();
  // A fresh form after each cohort added (a new id, so a new state and new element): the field is empty for the next name.
  const [addForm, addFields] = useForm({ id: `add-cohort-${cohorts.length}`, lastResult: replyFor(actionData, "add-cohort") });
  const renameErrors = replyFor(actionData, "rename-cohort")?.error;
  const [archiveForm, archiveFields] = useForm({ id: "archive", lastResult: replyFor(actionData, "archive") });
  const header = (
    <>
      <PageHeader title="Course settings" />
      {search.get("created") ? <Notice tone="success">The course is open. Add its cohorts below, then import the roster.</Notice> : null}
      {search.get("carried") ? (
        <Notice tone="success">
          The new course is open, its labs as drafts. Check their dates and publish them, then import the roster.
        </Notice>
      ) : null}
      {actionData && "saved" in actionData ? <Notice tone="success">Saved.</Notice> : null}
    </>
  );
  if (archivedAt)
    return (
      <div className="flex flex-col gap-10">
        {header}
        <NextTerm courseId={course.id} />
        <section aria-labelledby="archive-heading" className="max-w-xl">
          <h2 id="archive-heading" className="mb-1 text-lg font-semibold">
            Archived
          </h2>
          <p className="mb-3 text-sm text-ink-700">
            Archived on {formatDateTime(archivedAt, course.timeZone, "medium")}. Restore the course to change anything in it again.
          </p>
          <Form method="post">
            <input type="hidden" name="intent" value="restore" />
            <Button type="submit" variant="secondary" disabled={navigation.state === "submitting"}>
              Restore the course
            </Button>
          </Form>
        </section>
      </div>
    );
  return (
    <div className="flex flex-col gap-10">
      {header}

      <section aria-labelledby="course-heading" className="max-w-xl">
        <h2 id="course-heading" className="mb-3 text-lg font-semibold">
          The course
        </h2>
        <Form method="post" className="flex flex-col gap-4" {...getFormProps(courseForm)}>
          <input type="hidden" name="intent" value="course" />
          {courseForm.errors?.length ? <Notice tone="error">{courseForm.errors.join(" ")}</Notice> : null}
          <CourseFields fields={courseFields} timeZones={timeZones} />
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Save the course
          </Button>
        </Form>
      </section>

      <section aria-labelledby="returns-heading" className="max-w-xl">
        <h2 id="returns-heading" className="mb-1 text-lg font-semibold">
          Kit returns
        </h2>
        <p className="mb-3 text-sm text-ink-700">
          Students see the return-by date and the return address on My kit. A kit still at home after that day is on the overdue list, and
          its student is e-mailed on each reminder day.
        </p>
        <Form method="post" className="flex flex-col gap-4" {...getFormProps(returnsForm)}>
          <input type="hidden" name="intent" value="returns" />
          {returnsForm.errors?.length ? <Notice tone="error">{returnsForm.errors.join(" ")}</Notice> : null}
          <TextField
            label="Return by"
            type="date"
            field={returnsFields.kitReturnBy}
            hint={`The whole day counts, in the course's time zone (${course.timeZone}). Leave it empty for no return date.`}
          />
          <TextField
            label="Reminder days"
            field={returnsFields.kitReturnReminderDays}
            hint="Days after the return-by date on which a student whose kit is still at home is reminded, e.g. 1, 7."
          />
          <fieldset className="flex flex-col gap-3">
            <legend className="mb-1 text-sm font-medium">Return address (the sender on every label, and where kits come back)</legend>
            <TextField label="Name" field={address.name} placeholder="e.g. Fluids Lab, Department of Physics" />
            <TextField label="Address line 1" field={address.line1} />
            <TextField label="Address line 2 (optional)" field={address.line2} />
            <div className="grid gap-3 sm:grid-cols-2">
              <TextField label="Town or city" field={address.city} />
              <TextField label="County, state or region (optional)" field={address.region} />
              <TextField label="Postcode (where the country has one)" field={address.postcode} />
              <TextField label="Country (two-letter code)" field={address.country} placeholder="e.g. IE" />
            </div>
            <TextField label="Phone (optional)" field={address.phone} type="tel" />
          </fieldset>
          <Button type="submit" disabled={navigation.state === "submitting"}>
            Save kit returns
          </Button>
        </Form>
      </section>

      <section aria-labelledby="cohorts-heading" className="max-w-xl">
        <h2 id="cohorts-heading" className="mb-3 text-lg font-semibold">
          Cohorts
        </h2>
        {renameErrors ? <Notice tone="error">{Object.values(renameErrors).flat().join(" ")}</Notice> : null}
        <p className="mb-3 text-sm text-ink-700">Every list of cohorts in the course follows this order.</p>
        <ul className="flex flex-col gap-2">
          {cohorts.map((cohort, index) => (
            <li key={cohort.id} className="flex flex-wrap items-end gap-2">
              <Form method="post" className="flex min-w-0 flex-1 items-end gap-2">
                <input type="hidden" name="intent" value="rename-cohort" />
                <input type="hidden" name="cohortId" value={cohort.id} />
                <div className="min-w-0 flex-1">
                  <TextField
                    label={`Cohort (${counted(cohort.students, "student", "students")})`}
                    name="name"
                    defaultValue={cohort.name}
                    required
                  />
                </div>
                <Button type="submit" variant="secondary">
                  Rename
                </Button>
              </Form>
              <Form method="post" className="flex gap-1">
                <input type="hidden" name="intent" value="move-cohort" />
                <input type="hidden" name="cohortId" value={cohort.id} />
                <Button type="submit" variant="secondary" name="direction" value="up" disabled={index === 0}>
                  Earlier<span className="sr-only"> in the order: {cohort.name}</span>
                </Button>
                <Button type="submit" variant="secondary" name="direction" value="down" disabled={index === cohorts.length - 1}>
                  Later<span className="sr-only"> in the order: {cohort.name}</span>
                </Button>
              </Form>
            </li>
          ))}
        </ul>
        <Form key={addForm.id} method="post" className="mt-4 flex items-end gap-2" {...getFormProps(addForm)}>
          <input type="hidden" name="intent" value="add-cohort" />
          <div className="flex-1">
            <TextField label="New cohort" field={addFields.name} placeholder="e.g. Friday bench" required />
          </div>
          <Button type="submit">Add cohort</Button>
        </Form>
      </section>

      <section aria-labelledby="tas-heading">
        <h2 id="tas-heading" className="mb-1 text-lg font-semibold">
          Teaching assistants and their cohorts
        </h2>
        <p className="mb-3 text-sm text-ink-700">A TA sees and marks only the students of the cohorts ticked here.</p>
        {tas.length === 0 ? <p className="text-ink-600">No TAs yet: invite them from Members.</p> : null}
        <ul className="flex flex-col gap-3">
          {tas.map((ta) => (
            <li key={ta.membershipId} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
              <Form method="post" className="flex flex-wrap items-center gap-4">
                <input type="hidden" name="intent" value="ta-cohorts" />
                <input type="hidden" name="membershipId" value={ta.membershipId} />
                <span className="min-w-48 font-medium">
                  {ta.name}
                  <span className="block text-xs font-normal text-ink-600">{ta.email}</span>
                </span>
                <fieldset className="flex flex-wrap gap-3">
                  <legend className="sr-only">Cohorts {ta.name} marks</legend>
                  {cohorts.map((cohort) => (
                    <label key={cohort.id} className="flex items-center gap-1.5 py-1 text-sm">
                      <input
                        type="checkbox"
                        className="size-5 shrink-0"
                        name="cohortIds"
                        value={cohort.id}
                        defaultChecked={ta.cohortIds.includes(cohort.id)}
                      />
                      {cohort.name}
                    </label>
                  ))}
                </fieldset>
                <Button type="submit" variant="secondary" className="ml-auto">
                  Save<span className="sr-only"> the cohorts of {ta.name}</span>
                </Button>
              </Form>
            </li>
          ))}
        </ul>
      </section>

      <NextTerm courseId={course.id} />

      <section aria-labelledby="archive-heading" className="max-w-xl">
        <h2 id="archive-heading" className="mb-1 text-lg font-semibold">
          Archive the course
        </h2>
        <p className="mb-3 text-sm text-ink-700">
          When the term is over: the course becomes read-only and leaves everyone's course list (it stays under “Archived courses”). Its
          pages and exports still open, reminders stop, and an instructor can restore it.
        </p>
        <Form method="post" className="flex flex-col gap-3" {...getFormProps(archiveForm)}>
          <input type="hidden" name="intent" value="archive" />
          {archiveForm.errors?.length ? <Notice tone="error">{archiveForm.errors.join(" ")}</Notice> : null}
          <label className="flex items-center gap-2 text-sm">
            <input {...getInputProps(archiveFields.confirm, { type: "checkbox" })} className="size-5" />
            The course is finished: make it read-only
          </label>
          {archiveFields.confirm.errors?.length ? (
            <p id={archiveFields.confirm.errorId} className="text-sm text-outlier">
              {archiveFields.confirm.errors.join(" ")}
            </p>
          ) : null}
          <Button type="submit" variant="danger" className="self-start" disabled={navigation.state === "submitting"}>
            Archive the course
          </Button>
        </Form>
      </section>
    </div>
  );
}

function NextTerm({ courseId }: { courseId: string }) {
  return (
    <section aria-labelledby="next-term-heading" className="max-w-xl">
      <h2 id="next-term-heading" className="mb-1 text-lg font-semibold">
        Next term
      </h2>
      <p className="text-sm text-ink-700">
        <Link to={`/courses/${courseId}/carry-over`} className="underline">
          Start next term from this course
        </Link>
        : a new course with these settings, labs, rubrics and kit inventory, and none of the students.
      </p>
    </section>
  );
}

export function meta() {
  return [{ title: "Course settings · Benchpost" }];
}
