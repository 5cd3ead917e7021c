/**
 * The course overview: for each role, what needs doing, each item linking to the page where it is
 * dealt with. Instructors see the course; TAs their cohorts' marking; students what is due and their kit.
 */
import type { ReactNode } from "react";
import { Link } from "react-router";
import type { Route } from "./+types/courses.$courseId._index";
import { LabTime } from "~/components/drop-logs/lab-time";
import { FailedEmailsPanel } from "~/components/failed-emails-panel";
import { StateMark } from "~/components/marking/state-mark";
import { PageHeader } from "~/components/ui/page-header";
import { tableHeadClass } from "~/components/ui/table-head";
import { formatDateTime } from "~/lib/format-date";
import { markingStudentHref } from "~/lib/marking/links";
import { kitProblemKindLabels, kitProblemStatusLabels } from "~/lib/kits/kit-problem-states";
import { kitStateLabels, kitStates } from "~/lib/kits/kit-states";
import { partKindLabels } from "~/lib/kits/part-input";
import { counted } from "~/lib/plural";
import { anyRole, requireCourseRole } from "~/server/auth/access.server";
import {
  courseOverview,
  instructorOverview,
  RECENT_DEADLINE_DAYS,
  studentOverview,
  taOverview,
  type StudentLabStatus,
} from "~/server/courses/overview.server";
import { db } from "~/server/db.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, anyRole);
  const timeZone = access.course.timeZone;
  if (access.membership.role === "student") {
    const [{ myKit }, due] = await Promise.all([courseOverview(db, access), studentOverview(db, access)]);
    return { view: "student" as const, timeZone, myKit, due };
  }
  if (access.membership.role === "ta") {
    const [overview, marking] = await Promise.all([courseOverview(db, access), taOverview(db, access)]);
    return { view: "ta" as const, timeZone, courseId: access.course.id, ...overview, ...marking };
  }
  return { view: "instructor" as const, timeZone, recentDeadlineDays: RECENT_DEADLINE_DAYS, ...(await instructorOverview(db, access)) };
}

export default function CourseOverview({ loaderData }: Route.ComponentProps) {
  return (
    <section className="flex flex-col gap-6">
      <PageHeader title="Overview" />
      {loaderData.view === "student" ? (
        <StudentView {...loaderData} />
      ) : loaderData.view === "ta" ? (
        <TaView {...loaderData} />
      ) : (
        <InstructorView {...loaderData} />
      )}
    </section>
  );
}

type LoaderData = Route.ComponentProps["loaderData"];
type Of<View extends LoaderData["view"]> = Extract<LoaderData, { view: View }>;

/** One item of an overview: a heading and what it says. */
function Item({ id, title, children }: { id: string; title: ReactNode; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="rounded-lg bg-white p-4 shadow-sm ring-1 ring-ink-900/10">
      <h2 id={id} className="mb-2 font-medium">
        {title}
      </h2>
      {children}
    </section>
  );
}

function InstructorView(props: Of<"instructor">) {
  const { timeZone, recentDeadlineDays, counts, deadlines, tas, comparisonFlags, flaggedParts, failedEmails, invitations } = props;
  return (
    <>
      <p className="text-sm text-ink-700">
        {counted(counts.students, "student", "students")} · {counted(counts.tas, "teaching assistant", "teaching assistants")} ·{" "}
        {counted(counts.instructors, "instructor", "instructors")} · {counted(counts.kits, "kit", "kits")}
      </p>
      <FailedEmailsPanel failedEmails={failedEmails} timeZone={timeZone} />
      <Item id="deadlines" title="Deadlines">
        {deadlines.length === 0 ? (
          <p className="text-sm text-ink-700">No published lab is due, or was due in the last {recentDeadlineDays} days.</p>
        ) : (
          <ul className="flex flex-col gap-4">
            {deadlines.map((lab) => (
              <li key={lab.labId}>
                <p>
                  <Link to={`labs/${lab.labId}/dashboard`} className="font-medium underline">
                    {lab.title}
                  </Link>{" "}
                  <span className="text-sm text-ink-700">
                    · due {formatDateTime(lab.dueAt, timeZone, "short")}
                    {lab.lateCutoffAt ? ` · late hand-ins until ${formatDateTime(lab.lateCutoffAt, timeZone, "short")}` : ""}
                  </span>
                </p>
                <div className="mt-1 overflow-x-auto">
                  <table className="min-w-full text-left text-sm">
                    <caption className="sr-only">Hand-ins of {lab.title} by cohort</caption>
                    <thead className={tableHeadClass}>
                      <tr>
                        <th scope="col" className="px-2 py-1 font-medium">
                          Cohort
                        </th>
                        <th scope="col" className="px-2 py-1 font-medium">
                          Handed in
                        </th>
                        <th scope="col" className="px-2 py-1 font-medium">
                          <StateMark state="after-due" explain />
                        </th>
                        <th scope="col" className="px-2 py-1 font-medium">
                          <StateMark state="absent" explain />
                        </th>
                        <th scope="col" className="px-2 py-1 font-medium">
                          With an extension
                        </th>
                      </tr>
                    </thead>
                    <tbody className="divide-y divide-ink-900/5">
                      {lab.cohorts.map((cohort) => (
                        <tr key={cohort.cohortId}>
                          <th scope="row" className="px-2 py-1 font-normal">
                            {cohort.cohortName}
                          </th>
                          <td className="px-2 py-1">
                            {cohort.handedIn} / {cohort.students}
                          </td>
                          <td className="px-2 py-1">{cohort.late}</td>
                          <td className="px-2 py-1">{cohort.missing}</td>
                          <td className="px-2 py-1">{cohort.extended}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              </li>
            ))}
          </ul>
        )}
      </Item>
      <Item id="marking" title="Marking by teaching assistant">
        {tas.length === 0 ? (
          <p className="text-sm text-ink-700">This course has no teaching assistants.</p>
        ) : (
          <ul className="flex flex-col gap-2 text-sm">
            {tas.map((ta) => (
              <li key={ta.membershipId}>
                <Link to={`members/${ta.membershipId}`} className="font-medium underline">
                  {ta.name}
                </Link>
                : {ta.cohortCount === 0 ? "no cohort assigned" : `${ta.toMark} to mark`} ·{" "}
                {ta.marked === 0 ? "nothing marked yet" : `${ta.marked} marked`}
                {ta.labs.length ? (
                  <ul className="ml-4 list-disc">
                    {ta.labs.map((lab) => (
                      <li key={lab.labId}>
                        <Link to={`labs/${lab.labId}/marking?status=waiting`} className="underline">
                          {lab.title}
                        </Link>
                        : {lab.toMark} to mark
                      </li>
                    ))}
                  </ul>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </Item>
      <Item id="flagged" title="Flagged results">
        {comparisonFlags.length === 0 && flaggedParts.length === 0 ? (
          <p className="text-sm text-ink-700">Nothing is flagged by the class comparison or by the part-bias check.</p>
        ) : (
          <ul className="flex flex-col gap-1 text-sm">
            {comparisonFlags.map((lab) => (
              <li key={lab.labId}>
                <Link to={`labs/${lab.labId}/comparison`} className="underline">
                  {lab.title}
                </Link>
                :{" "}
                {[
                  lab.outliers ? counted(lab.outliers, "outlier", "outliers") : null,
                  lab.suspects ? counted(lab.suspects, "suspect", "suspects") : null,
                ]
                  .filter(Boolean)
                  .join(", ")}{" "}
                in the class comparison
              </li>
            ))}
            {flaggedParts.map((part) => (
              <li key={part.partId}>
                <Link to={`parts/${part.partId}`} className="underline">
                  {partKindLabels[part.kind]} {part.label}
                </Link>
                : flagged by the part-bias check{part.labs.length ? ` in ${part.labs.join(", ")}` : ""}
              </li>
            ))}
          </ul>
        )}
        <p className="mt-2 text-xs text-ink-700">Class comparison labels as of its last run, which follows each hand-in within seconds.</p>
      </Item>
      <KitsItem {...props} />
      {invitations.open > 0 ? (
        <Item id="invitations" title="Invitations">
          <p className="text-sm">
            <Link to="members" className="underline">
              {counted(invitations.open, "invitation", "invitations")} not accepted yet
            </Link>{" "}
            ({counted(invitations.students, "student", "students")}).
          </p>
        </Item>
      ) : null}
    </>
  );
}

/** Open kit problems, kits on their way to students and kits overdue, then every kit by state. */
function KitsItem({ timeZone, openProblems, kitsByState, ...rest }: Of<"instructor"> | Of<"ta">) {
  const notDelivered = (kitsByState.packed ?? 0) + (kitsByState.in_transit ?? 0);
  const overdue = "overdueKits" in rest ? rest.overdueKits : 0;
  return (
    <Item id="kits" title="Kits">
      <ul className="flex flex-col gap-1 text-sm">
        {openProblems && openProblems.open > 0 ? (
          <li>
            <Link to="kits/problems" className="font-medium text-outlier underline">
              {counted(openProblems.open, "open kit problem", "open kit problems")}
            </Link>
            <ul className="ml-4 list-disc">
              {openProblems.oldest.map((problem) => (
                <li key={problem.id}>
                  <Link to={`kits/problems/${problem.id}`} className="underline">
                    Kit {problem.kitNumber}: {kitProblemKindLabels[problem.kind].toLowerCase()}
                  </Link>{" "}
                  · {problem.studentName ?? "former student"} · {kitProblemStatusLabels[problem.status]} · reported{" "}
                  {formatDateTime(problem.createdAt, timeZone)}
                </li>
              ))}
            </ul>
          </li>
        ) : null}
        {notDelivered > 0 ? (
          <li>
            {counted(notDelivered, "kit", "kits")} not delivered yet:{" "}
            <Link to="kits?state=packed" className="underline">
              {kitsByState.packed ?? 0} packed
            </Link>
            ,{" "}
            <Link to="kits?state=in_transit" className="underline">
              {kitsByState.in_transit ?? 0} in transit
            </Link>
          </li>
        ) : null}
        {overdue > 0 ? (
          <li>
            <Link to="kits/overdue" className="underline">
              {counted(overdue, "kit", "kits")} not back after the return-by date
            </Link>
          </li>
        ) : null}
      </ul>
      <ul className="mt-2 flex flex-wrap gap-2">
        {kitStates.map((state) => (
          <li key={state}>
            <Link to={`kits?state=${state}`} className="inline-block rounded-full bg-paper-100 px-3 py-1 text-sm hover:bg-paper-200">
              {kitStateLabels[state]}: <strong>{kitsByState[state] ?? 0}</strong>
            </Link>
          </li>
        ))}
      </ul>
    </Item>
  );
}

function TaView(props: Of<"ta">) {
  const { timeZone, courseId, nextToMark, progress } = props;
  return (
    <>
      <Item id="next-to-mark" title="Next to mark">
        {nextToMark.length === 0 ? (
          <p className="text-sm text-ink-700">Nothing is waiting to be marked in your cohorts.</p>
        ) : (
          <ol className="flex flex-col gap-1 text-sm">
            {nextToMark.map((handIn) => (
              <li key={`${handIn.labId}:${handIn.membershipId}`}>
                <Link to={markingStudentHref(courseId, handIn.labId, handIn.membershipId)} className="underline">
                  {handIn.studentName}, {handIn.labTitle}
                </Link>{" "}
                · version {handIn.version}, handed in {formatDateTime(handIn.submittedAt, timeZone, "short")}
                {handIn.reopened ? " · mark reopened" : ""}
              </li>
            ))}
          </ol>
        )}
        <p className="mt-2 text-xs text-ink-700">
          Oldest hand-in first. On a student's marking view, Alt+N goes to the next one still to mark.
        </p>
      </Item>
      <Item id="progress" title="Your progress">
        {progress.length === 0 ? (
          <p className="text-sm text-ink-700">No lab is set for your cohorts yet.</p>
        ) : (
          <div className="overflow-x-auto">
            <table className="min-w-full text-left text-sm">
              <caption className="sr-only">Marking in your cohorts, by lab</caption>
              <thead className={tableHeadClass}>
                <tr>
                  <th scope="col" className="px-2 py-1 font-medium">
                    Lab
                  </th>
                  <th scope="col" className="px-2 py-1 font-medium">
                    Handed in
                  </th>
                  <th scope="col" className="px-2 py-1 font-medium">
                    To mark
                  </th>
                  <th scope="col" className="px-2 py-1 font-medium">
                    Marked by you
                  </th>
                </tr>
              </thead>
              <tbody className="divide-y divide-ink-900/5">
                {progress.map((lab) => (
                  <tr key={lab.labId}>
                    <th scope="row" className="px-2 py-1 font-normal">
                      <Link to={`labs/${lab.labId}/marking${lab.toMark ? "?status=unmarked" : ""}`} className="underline">
                        {lab.title}
                      </Link>
                    </th>
                    <td className="px-2 py-1">{lab.handedIn}</td>
                    <td className="px-2 py-1">{lab.toMark}</td>
                    <td className="px-2 py-1">{lab.markedByYou}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </Item>
      <KitsItem {...props} />
    </>
  );
}

const statusText: Record<StudentLabStatus, string> = {
  "not-handed-in": "Not handed in",
  "handed-in": "Handed in",
  marked: "Marked; your mark shows once it is released",
  released: "Mark released",
};

function StudentView({ timeZone, myKit, due }: Of<"student">) {
  return (
    <>
      <Item id="due" title="Your labs">
        {due.length === 0 ? (
          <p className="text-ink-700">No lab is set for your cohort yet.</p>
        ) : (
          <ul className="flex flex-col divide-y divide-ink-900/10">
            {due.map((lab) => (
              <li key={lab.labId} className="flex flex-col gap-1 py-3 first:pt-0 last:pb-0">
                <Link to={`labs/${lab.labId}`} className="font-medium underline">
                  {lab.title}
                </Link>
                <span className="text-sm">
                  Due <LabTime at={lab.dueAt} courseTimeZone={timeZone} />
                  {lab.extended ? <strong className="block">Your extension</strong> : null}
                </span>
                {lab.lateCutoffAt ? (
                  <span className="text-sm text-ink-700">
                    Late hand-ins until <LabTime at={lab.lateCutoffAt} courseTimeZone={timeZone} />
                  </span>
                ) : null}
                <span className="text-sm">
                  <strong>{statusText[lab.status]}</strong>
                  {lab.version !== null ? (
                    <>
                      {" "}
                      · version {lab.version}
                      {lab.late ? ", late" : ""} ·{" "}
                      <Link to={`labs/${lab.labId}#receipt`} className="underline">
                        Receipt
                      </Link>
                    </>
                  ) : null}
                </span>
              </li>
            ))}
          </ul>
        )}
      </Item>
      <Item id="your-kit" title="Your kit">
        {myKit ? (
          <p className="text-ink-700">
            Kit {myKit.number} is <strong>{kitStateLabels[myKit.state].toLowerCase()}</strong>.{" "}
            <Link to="my-kit" className="text-ink-600 underline">
              See its parts and report a problem
            </Link>
          </p>
        ) : (
          <p className="text-ink-700">No kit has been packed for you yet. You will get an e-mail when it ships.</p>
        )}
      </Item>
    </>
  );
}

export function meta() {
  return [{ title: "Course overview · Benchpost" }];
}
