import { getFormProps, useForm } from "@conform-to/react";
import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/courses.new";
import { CourseFields } from "~/components/course-fields";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { courseInput } from "~/lib/courses/course-input";
import { parseSubmission } from "~/lib/forms/submission";
import { requireUser, type RequestScope } from "~/server/auth/access.server";
import { createCourse } from "~/server/courses/courses.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";

async function requireCourseCreator(scope: RequestScope) {
  const user = await requireUser(scope);
  if (!user.mayCreateCourses) throw data("Only instructor accounts open new courses.", { status: 403 });
  return user;
}

export async function loader({ request, context }: Route.LoaderArgs) {
  await requireCourseCreator({ request, context });
  return { timeZones: Intl.supportedValuesOf("timeZone") };
}

export const action = formAction(async ({ request, context, formData }: Route.ActionArgs & { formData: FormData }) => {
  const user = await requireCourseCreator({ request, context });
  const submission = parseSubmission(formData, courseInput);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const course = await createCourse(db, { actorId: user.id, input: submission.value });
  return redirect(`/courses/${course.id}/settings?created=1`);
});

export default function NewCourse({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData,
    defaultValue: { timeZone: "Europe/Dublin", partBiasAlpha: "0.05" },
    shouldValidate: "onBlur",
    onValidate: ({ formData }) => parseSubmission(formData, courseInput),
  });
  return (
    <div className="max-w-xl">
      <PageHeader title="Open a new course" trail={[{ to: "/", label: "Overview" }]} />
      {form.errors?.length ? (
        <Notice tone="error">{form.errors.join(" ")}</Notice>
      ) : actionData ? (
        <Notice tone="error">Some fields need another look.</Notice>
      ) : null}
      <Form method="post" className="mt-4 flex flex-col gap-4" {...getFormProps(form)}>
        <CourseFields fields={fields} timeZones={loaderData.timeZones} />
        <Button type="submit" disabled={navigation.state === "submitting"}>
          Open the course
        </Button>
      </Form>
    </div>
  );
}

export function meta() {
  return [{ title: "New course · Benchpost" }];
}
