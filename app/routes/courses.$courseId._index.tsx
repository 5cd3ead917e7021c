import { Link } from "react-router";
import type { Route } from "./+types/courses.$courseId._index";
import { FailedEmailsPanel } from "~/components/failed-emails-panel";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { kitProblemKindLabels, kitProblemStatusLabels } from "~/lib/kits/kit-problem-states";
import { kitStateLabels, kitStates } from "~/lib/kits/kit-states";
import { anyRole, requireCourseRole } from "~/server/auth/access.server";
import { courseOverview } from "~/server/courses/courses.server";
import { listFailedEmails } from "~/server/email/failed-emails.server";
import { db } from "~/server/db.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  const isInstructor = access.membership.role === "instructor";
  const [overview, failedEmails] = await Promise.all([courseOverview(db, access), isInstructor ? listFailedEmails(access.course.id) : []]);
  return { role: access.membership.role, timeZone: access.course.timeZone, ...overview, failedEmails };
}

export default function CourseOverview({ loaderData }: Route.ComponentProps) {
  const { role, timeZone, counts, kitsByState, myKit, failedEmails, openProblems } = loaderData;
  if (role === "student") {
    return (
      <section>
        <PageHeader title="Overview" />
        <div className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
          <h2 className="font-medium">Your kit</h2>
          {myKit ? (
            <p className="mt-1 text-ink-700">
              Kit {myKit.number} is <strong>{kitStateLabels[myKit.state].toLowerCase()}</strong>.{" "}
              <Link to="my-kit" className="text-ink-600 underline">
                See its parts and report a problem
              </Link>
            </p>
          ) : (
            <p className="mt-1 text-ink-700">No kit has been packed for you yet. You will get an e-mail when it ships.</p>
          )}
        </div>
      </section>
    );
  }
  return (
    <section className="flex flex-col gap-6">
      <PageHeader title="Overview" />
      <FailedEmailsPanel failedEmails={failedEmails} timeZone={timeZone} />
      {openProblems ? <OpenProblems {...openProblems} timeZone={timeZone} /> : null}
      <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
        {[
          ["Students", counts.students],
          ["Teaching assistants", counts.tas],
          ["Instructors", counts.instructors],
          ["Kits", counts.kits],
        ].map(([label, value]) => (
          <div key={label} className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
            <dt className="text-sm text-ink-600">{label}</dt>
            <dd className="text-2xl font-semibold">{value}</dd>
          </div>
        ))}
      </dl>
      <div>
        <h2 className="mb-2 font-medium">Kits by state</h2>
        <ul className="flex flex-wrap gap-2">
          {kitStates.map((state) => (
            <li key={state}>
              <Link to={`kits?state=${state}`} className="inline-block rounded-full bg-paper-100 px-3 py-1 text-sm hover:bg-paper-200">
                {kitStateLabels[state]}: <strong>{kitsByState[state] ?? 0}</strong>
              </Link>
            </li>
          ))}
        </ul>
      </div>
    </section>
  );
}

/** Kit problems students reported that are not resolved yet: the count, and the ones waiting longest. */
function OpenProblems({ open, oldest, timeZone }: NonNullable<Route.ComponentProps["loaderData"]["openProblems"]> & { timeZone: string }) {
  if (open === 0) return null;
  return (
    <section aria-labelledby="open-problems" className="rounded-md bg-red-50 px-4 py-3 text-sm ring-1 ring-outlier/30">
      <h2 id="open-problems" className="font-medium text-outlier">
        {open} open kit problem{open === 1 ? "" : "s"}
      </h2>
      <ul className="mt-1 flex flex-col gap-0.5">
        {oldest.map((problem) => (
          <li key={problem.id}>
            <Link to={`kits/problems/${problem.id}`} className="underline">
              Kit {problem.kitNumber}: {kitProblemKindLabels[problem.kind].toLowerCase()}
            </Link>{" "}
            · {problem.studentName ?? "former student"} · {kitProblemStatusLabels[problem.status]} · reported{" "}
            {formatDateTime(problem.createdAt, timeZone)}
          </li>
        ))}
      </ul>
      <Link to="kits/problems" className="mt-1 inline-block underline">
        See all kit problems
      </Link>
    </section>
  );
}

export function meta() {
  return [{ title: "Course overview · Benchpost" }];
}
