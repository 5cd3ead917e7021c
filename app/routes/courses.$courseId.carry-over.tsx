import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { TimeZoneField } from "~/components/course-fields";
import { data, Form, redirect, useNavigation } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.carry-over";
import { TextField } from "~/components/ui/field";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { TableHead } from "~/components/ui/table-head";
import { carryOverInput, shiftCalendarDay, shiftLabTimes } from "~/lib/courses/carry-over-input";
import { isTimeZone } from "~/lib/courses/course-input";
import { formatCalendarDay, formatDateTime } from "~/lib/format-date";
import { parseTypedNumber } from "~/lib/forms/typed-number";
import { parseSubmission } from "~/lib/forms/submission";
import { requireCourseRole } from "~/server/auth/access.server";
import { carryOverCourse, carryOverSource } from "~/server/courses/carry-over.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { counted, plural } from "~/lib/plural";

const carryOverForm = carryOverInput.extend({ intent: z.enum(["preview", "carry"]) });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const source = await carryOverSource(db, access.course.id);
  return { course: access.course, source, timeZones: Intl.supportedValuesOf("timeZone") };
}

// Carrying over reads the course and writes only the new one: last term's course may well be archived.
export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"], { whileArchived: true });
  const submission = parseSubmission(formData, carryOverForm);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { intent, ...input } = submission.value;
  if (intent === "preview") return submission.reply();
  const { courseId } = await carryOverCourse(db, { access, input, request });
  return redirect(`/courses/${courseId}/settings?carried=1`);
});

export default function CarryOver({ loaderData, actionData }: Route.ComponentProps) {
  const { course, source, timeZones } = loaderData;
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData,
    defaultValue: { title: course.title, code: course.code, term: "", timeZone: course.timeZone, shiftDays: "182", copyCohorts: "on" },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, carryOverForm),
  });
  const typedShift = parseTypedNumber(fields.shiftDays.value ?? "");
  const shiftDays = typeof typedShift === "number" && Number.isInteger(typedShift) ? typedShift : null;
  const typedZone = fields.timeZone.value?.trim() ?? "";
  const newZone = isTimeZone(typedZone) ? typedZone : course.timeZone;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader title="Start next term from this course" trail={[{ to: `/courses/${course.id}/settings`, label: "Course settings" }]}>
        <p className="mt-2 max-w-2xl text-ink-700">
          A new course with this one's settings, cohorts (if you choose), labs as drafts with their dates moved, rubrics, method settings
          and kit inventory: {counted(source.parts, "part", "parts")} and {counted(source.shelfKits, "kit", "kits")} on the shelf. You
          become its instructor, with this course's other instructors. No students, TAs, invitations, hand-ins or marks come along; kits
          still with students stay here.
        </p>
      </PageHeader>
      <Form method="post" className="flex max-w-xl flex-col gap-4" {...getFormProps(form)}>
        {form.errors?.length ? <Notice tone="error">{form.errors.join(" ")}</Notice> : null}
        <TextField label="Title" field={fields.title} required />
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField label="Course code" field={fields.code} required />
          <TextField label="Term" field={fields.term} required placeholder="2027 Autumn" hint={`This course is ${course.term}.`} />
        </div>
        <TimeZoneField
          field={fields.timeZone}
          timeZones={timeZones}
          hint="The labs keep their local times (23:59 stays 23:59) in this zone."
        />
        <TextField
          label="Move every date by"
          unit="days"
          field={fields.shiftDays}
          inputMode="numeric"
          required
          hint="Whole calendar days; a multiple of 7 keeps each lab on its weekday (26 weeks = 182 days)."
        />
        <label className="flex items-center gap-2 text-sm">
          <input {...getInputProps(fields.copyCohorts, { type: "checkbox" })} className="size-5" />
          Copy {plural(source.cohorts, "the cohort", `the ${source.cohorts} cohorts`)}, and which labs are set for each
        </label>
        {fields.copyCohorts.errors?.length ? <p className="text-sm text-outlier">{fields.copyCohorts.errors.join(" ")}</p> : null}

        <section aria-labelledby="preview-heading" className="mt-2">
          <h2 id="preview-heading" className="mb-2 text-lg font-semibold">
            The new dates
          </h2>
          {shiftDays === null ? (
            <p className="text-ink-700">Enter a whole number of days to see each lab's new dates.</p>
          ) : (
            <DatePreview source={source} shiftDays={shiftDays} oldZone={course.timeZone} newZone={newZone} />
          )}
          <Button type="submit" name="intent" value="preview" variant="secondary" className="mt-3">
            Preview the dates
          </Button>
        </section>

        <Button type="submit" name="intent" value="carry" disabled={navigation.state === "submitting"}>
          Start the new course
        </Button>
      </Form>
    </div>
  );
}

type Source = Route.ComponentProps["loaderData"]["source"];

function DatePreview({ source, shiftDays, oldZone, newZone }: { source: Source; shiftDays: number; oldZone: string; newZone: string }) {
  const time = (at: Date | null, zone: string) => (at ? formatDateTime(at, zone, "long") : "none");
  return (
    <>
      {source.kitReturnBy ? (
        <p className="mb-2 text-sm">
          Kits back by: {formatCalendarDay(source.kitReturnBy)} → {formatCalendarDay(shiftCalendarDay(source.kitReturnBy, shiftDays))}
        </p>
      ) : null}
      {source.labs.length === 0 ? (
        <p className="text-ink-700">This course has no labs.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <caption className="mb-1 text-left text-ink-700">
              Old times in {oldZone}, new times in {newZone}. The new labs are drafts until you publish them.
            </caption>
            <TableHead headers={["Lab", "", "Opens", "Due", "Cut-off"]} />
            <tbody>
              {source.labs.map((lab) => {
                const old = {
                  opensAt: new Date(lab.opensAt),
                  dueAt: new Date(lab.dueAt),
                  lateCutoffAt: lab.lateCutoffAt && new Date(lab.lateCutoffAt),
                };
                const moved = shiftLabTimes(old, shiftDays, oldZone, newZone);
                return [
                  <tr key={`${lab.id}-old`} className="border-t border-ink-900/10">
                    <th scope="row" rowSpan={2} className="px-3 py-2 font-medium">
                      {lab.title}
                    </th>
                    <td className="px-3 py-1 text-ink-600">Now</td>
                    <td className="px-3 py-1">{time(old.opensAt, oldZone)}</td>
                    <td className="px-3 py-1">{time(old.dueAt, oldZone)}</td>
                    <td className="px-3 py-1">{time(old.lateCutoffAt, oldZone)}</td>
                  </tr>,
                  <tr key={`${lab.id}-new`}>
                    <td className="px-3 py-1 text-ink-600">New</td>
                    <td className="px-3 py-1">{time(moved.opensAt, newZone)}</td>
                    <td className="px-3 py-1">{time(moved.dueAt, newZone)}</td>
                    <td className="px-3 py-1">{time(moved.lateCutoffAt, newZone)}</td>
                  </tr>,
                ];
              })}
            </tbody>
          </table>
        </div>
      )}
    </>
  );
}

export function meta() {
  return [{ title: "Start next term · Benchpost" }];
}
