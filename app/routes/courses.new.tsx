import { data, Form, redirect, useNavigation } from "react-router";
import type { Route } from "./+types/courses.new";
import { CourseFields } from "~/components/course-fields";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { courseInput } from "~/lib/courses/course-input";
import { fieldErrors, formFailure, formValues } from "~/lib/forms/parse-form";
import { requireUser } from "~/server/auth/access.server";
import { CourseRuleError, createCourse } from "~/server/courses/courses.server";
import { db } from "~/server/db.server";

async function requireCourseCreator(request: Request) {
  const user = await requireUser(request);
  if (!user.mayCreateCourses) throw data("Only instructor accounts open new courses.", { status: 403 });
  return user;
}

export async function loader({ request }: Route.LoaderArgs) {
  await requireCourseCreator(request);
  return { timeZones: Intl.supportedValuesOf("timeZone") };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireCourseCreator(request);
  const form = await request.formData();
  const parsed = courseInput.safeParse(formValues(form));
  if (!parsed.success) return formFailure(formValues(form), fieldErrors(parsed.error));
  try {
    const course = await createCourse(db, { actorId: user.id, input: parsed.data });
    return redirect(`/courses/${course.id}/settings?created=1`);
  } catch (error) {
    if (error instanceof CourseRuleError) return formFailure(formValues(form), { code: [error.message] });
    throw error;
  }
}

export default function NewCourse({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const values = actionData?.values ?? {};
  const errors = actionData?.errors ?? {};
  return (
    <div className="max-w-xl">
      <PageHeader title="Open a new course" trail={[{ to: "/", label: "Overview" }]} />
      {actionData ? <Notice tone="error">Some fields need another look.</Notice> : null}
      <Form method="post" className="mt-4 flex flex-col gap-4">
        <CourseFields values={values} errors={errors} timeZones={loaderData.timeZones} />
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
