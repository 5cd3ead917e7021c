import { roleWords } from "~/lib/courses/roles";
import { ButtonLink } from "~/components/ui/button";
import { Link, useRouteLoaderData } from "react-router";
import type { loader as rootLoader } from "~/root";
import type { ShellViewer } from "~/components/app-shell";

export default function Home() {
  const viewer = useRouteLoaderData<typeof rootLoader>("root")?.viewer ?? null;
  if (!viewer) return <Welcome />;
  const current = viewer.courses.filter((course) => !course.archived);
  const archived = viewer.courses.filter((course) => course.archived);
  return (
    <section aria-labelledby="courses-title">
      <div className="flex flex-wrap items-center justify-between gap-3">
        <h1 id="courses-title" className="text-2xl font-semibold">
          Your courses
        </h1>
        {viewer.mayCreateCourses ? <ButtonLink to="/courses/new">Open a new course</ButtonLink> : null}
      </div>
      {current.length === 0 ? (
        <p className="mt-4 text-ink-700">
          {archived.length === 0
            ? "You do not belong to any course yet. Your instructor's invitation adds you to one."
            : "You have no current course."}
        </p>
      ) : (
        <CourseList courses={current} />
      )}
      {archived.length ? (
        <details className="mt-8">
          <summary className="cursor-pointer font-medium">Archived courses ({archived.length})</summary>
          <p className="mt-2 text-sm text-ink-700">Finished courses: read-only, with their pages and exports.</p>
          <CourseList courses={archived} />
        </details>
      ) : null}
    </section>
  );
}

function CourseList({ courses }: { courses: ShellViewer["courses"] }) {
  return (
    <ul className="mt-4 grid gap-3 sm:grid-cols-2">
      {courses.map((course) => (
        <li key={course.id}>
          <Link to={`/courses/${course.id}`} className="block rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10 hover:ring-ink-500">
            <span className="text-sm text-ink-600">
              {course.code} · {course.term}
            </span>
            <span className="mt-1 block font-medium">{course.title}</span>
            <span className="mt-2 inline-block rounded bg-paper-100 px-2 py-0.5 text-xs">{roleWords[course.role]}</span>
          </Link>
        </li>
      ))}
    </ul>
  );
}

function Welcome() {
  return (
    <section className="mx-auto max-w-2xl py-10" aria-labelledby="welcome-title">
      <h1 id="welcome-title" className="text-3xl font-semibold tracking-tight">
        Lab courses done at home, run from one place
      </h1>
      <p className="mt-4 text-lg text-ink-700">
        Instructors post measured kits to their students and publish labs. Students time repeated drops of a sphere through a fluid and hand
        in their drop logs from home. Benchpost recomputes every result on the server, compares each hand-in with the rest of the class, and
        lets teaching assistants mark them in bulk.
      </p>
      <p className="mt-8">
        <Link to="/sign-in" className="rounded bg-ink-800 px-5 py-2.5 text-paper-50">
          Sign in
        </Link>
      </p>
    </section>
  );
}

export function meta() {
  return [{ title: "Benchpost" }, { name: "description", content: "Administration of at-home laboratory courses." }];
}
