import { useEffect, useState } from "react";
import { data, Link, useFetcher } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.dashboard";
import type { action as extensionsAction } from "./courses.$courseId.labs.$labId.extensions";
import { LabTime } from "~/components/drop-logs/lab-time";
import { ExtensionWindowFields } from "~/components/labs/extension-fields";
import { ExtendedTo } from "~/components/labs/extended-to";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { handInHref } from "~/lib/comparison/links";
import { experimentKindNames } from "~/lib/labs/lab-input";
import { db } from "~/server/db.server";
import { getLabDashboard, type DashboardStudent } from "~/server/labs/lab-dashboard.server";
import { getLab } from "~/server/labs/labs.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadComparisonLab } from "~/server/comparison/class-comparison.server";
import { staffRoles } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  // Instructors, and the TAs of a cohort the lab is set for: the same people as its class comparison.
  const { access } = await requireLabAccess({ request, context }, params, staffRoles, loadComparisonLab);
  const lab = await getLab(db, access.course.id, params.labId);
  if (!lab) throw data("Not found", { status: 404 });
  const dashboard = await getLabDashboard(db, access, lab);
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    instructor: access.membership.role === "instructor",
    lab: {
      id: lab.id,
      title: lab.title,
      kind: lab.kind,
      status: lab.status,
      opensAt: lab.opensAt.toISOString(),
      dueAt: lab.dueAt.toISOString(),
      lateCutoffAt: lab.lateCutoffAt?.toISOString() ?? null,
      requiredDrops: lab.requiredDrops,
    },
    ...dashboard,
  };
}

export default function LabDashboard({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, cohorts, students, sentReminders, scheduledReminders } = loaderData;
  // The students ticked for a later due time (instructors only).
  const [selected, setSelected] = useState<ReadonlySet<string>>(new Set());
  const toggle = (membershipId: string) =>
    setSelected((current) => {
      const next = new Set(current);
      if (!next.delete(membershipId)) next.add(membershipId);
      return next;
    });
  const allSelected = students.length > 0 && selected.size === students.length;
  return (
    <div className="flex flex-col gap-8">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
      >
        {experimentKindNames[lab.kind]} · {lab.status === "draft" ? "draft, not published" : lab.status} · {lab.requiredDrops} drops
      </PageHeader>

      <dl className="grid gap-4 sm:grid-cols-3">
        <TimeTerm label="Opens" at={lab.opensAt} timeZone={timeZone} />
        <TimeTerm label="Due" at={lab.dueAt} timeZone={timeZone} />
        {lab.lateCutoffAt ? (
          <TimeTerm label="Late cut-off" at={lab.lateCutoffAt} timeZone={timeZone} />
        ) : (
          <div>
            <dt className="text-sm text-ink-600">Late cut-off</dt>
            <dd>None: nothing after the due time</dd>
          </div>
        )}
      </dl>

      <section aria-labelledby="progress-heading">
        <h2 id="progress-heading" className="mb-2 text-lg font-semibold">
          Hand-ins by cohort
        </h2>
        {cohorts.length === 0 ? <p className="text-ink-700">No students in the cohorts you see.</p> : null}
        <table className="w-full max-w-2xl text-left text-sm">
          <thead>
            <tr className="border-b border-ink-900/20">
              <th scope="col" className="py-1">
                Cohort
              </th>
              <th scope="col" className="py-1 text-right">
                Students
              </th>
              <th scope="col" className="py-1 text-right">
                On time
              </th>
              <th scope="col" className="py-1 text-right">
                Late
              </th>
              <th scope="col" className="py-1 text-right">
                Not due yet
              </th>
              <th scope="col" className="py-1 text-right">
                Missing
              </th>
            </tr>
          </thead>
          <tbody>
            {cohorts.map((cohort) => (
              <tr key={cohort.cohortId} className="border-b border-ink-900/10">
                <th scope="row" className="py-1 font-medium">
                  {cohort.name}
                </th>
                <td className="py-1 text-right tabular-nums">{cohort.students}</td>
                <td className="py-1 text-right tabular-nums">{cohort.onTime}</td>
                <td className="py-1 text-right tabular-nums">{cohort.late}</td>
                <td className="py-1 text-right tabular-nums">{cohort.notDue}</td>
                <td className="py-1 text-right tabular-nums">{cohort.missing}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="mt-1 text-xs text-ink-700">
          Each student counts against their own due time: an extension&apos;s, else the lab&apos;s. Missing: nothing handed in by then.
        </p>
      </section>

      <section aria-labelledby="students-heading">
        <h2 id="students-heading" className="mb-2 text-lg font-semibold">
          Students and their counted version
        </h2>
        <div className="overflow-x-auto">
          <table className="w-full text-left text-sm">
            <thead>
              <tr className="border-b border-ink-900/20">
                {instructor ? (
                  <th scope="col" className="py-1 pr-2">
                    <input
                      type="checkbox"
                      aria-label="Select every student"
                      checked={allSelected}
                      onChange={() => setSelected(allSelected ? new Set() : new Set(students.map((student) => student.membershipId)))}
                    />
                  </th>
                ) : null}
                <th scope="col" className="py-1 pr-3">
                  Student
                </th>
                <th scope="col" className="py-1 pr-3">
                  Cohort
                </th>
                <th scope="col" className="py-1 pr-3">
                  Handed in
                </th>
                <th scope="col" className="py-1 pr-3">
                  Key result
                </th>
                <th scope="col" className="py-1 pr-3 text-right">
                  Warnings
                </th>
                <th scope="col" className="py-1">
                  Drop log
                </th>
              </tr>
            </thead>
            <tbody>
              {students.map((student) => (
                <StudentRow
                  key={student.membershipId}
                  student={student}
                  kind={lab.kind}
                  timeZone={timeZone}
                  courseId={courseId}
                  labId={lab.id}
                  selection={
                    instructor ? { checked: selected.has(student.membershipId), toggle: () => toggle(student.membershipId) } : null
                  }
                />
              ))}
            </tbody>
          </table>
        </div>
      </section>

      {instructor ? (
        <ExtendSelected courseId={courseId} labId={lab.id} timeZone={timeZone} selected={selected} onDone={() => setSelected(new Set())} />
      ) : null}

      <section aria-labelledby="reminders-heading">
        <h2 id="reminders-heading" className="mb-2 text-lg font-semibold">
          Deadline reminders
        </h2>
        {scheduledReminders.length ? (
          <ul className="mb-3 text-sm">
            {scheduledReminders.map((job) => (
              <li key={`${job.offsetHours}-${job.dueAt}`}>
                {job.extension ? (
                  <>
                    {job.offsetHours} h before the extended due time <LabTime at={job.dueAt} courseTimeZone={timeZone} />, to the students
                    extended to it who have not handed in by then:{" "}
                  </>
                ) : (
                  <>{job.offsetHours} h before the due time, to whoever it is still due for and has not handed in by then: </>
                )}
                <LabTime at={job.startAfter} courseTimeZone={timeZone} />
              </li>
            ))}
          </ul>
        ) : (
          <p className="mb-3 text-sm text-ink-700">No reminders are waiting to go out.</p>
        )}
        {sentReminders.length === 0 ? (
          <p className="text-sm text-ink-700">None sent yet.</p>
        ) : (
          <table className="w-full max-w-3xl text-left text-sm">
            <thead>
              <tr className="border-b border-ink-900/20">
                <th scope="col" className="py-1 pr-3">
                  To
                </th>
                <th scope="col" className="py-1 pr-3">
                  Reminder
                </th>
                <th scope="col" className="py-1 pr-3">
                  Sent
                </th>
                <th scope="col" className="py-1">
                  E-mail
                </th>
              </tr>
            </thead>
            <tbody>
              {sentReminders.map((reminder) => (
                <tr key={`${reminder.membershipId}-${reminder.dueAt}-${reminder.offsetHours}`} className="border-b border-ink-900/10">
                  <td className="py-1 pr-3">
                    {reminder.studentName} <span className="text-ink-600">({reminder.cohortName})</span>
                  </td>
                  <td className="py-1 pr-3">
                    {reminder.offsetHours} h before
                    {/* Reminded of another due time than the lab's: an extension's (or one the lab had before). */}
                    {Date.parse(reminder.dueAt) !== Date.parse(lab.dueAt) ? (
                      <span className="block text-xs text-ink-600">
                        of the due time <LabTime at={reminder.dueAt} courseTimeZone={timeZone} />
                      </span>
                    ) : null}
                  </td>
                  <td className="py-1 pr-3">
                    <LabTime at={reminder.sentAt} courseTimeZone={timeZone} />
                  </td>
                  <td className="py-1">{reminder.emailStatus ?? "not queued"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>
    </div>
  );
}

function TimeTerm({ label, at, timeZone }: { label: string; at: string; timeZone: string }) {
  return (
    <div>
      <dt className="text-sm text-ink-600">{label}</dt>
      <dd>
        <LabTime at={at} courseTimeZone={timeZone} />
      </dd>
    </div>
  );
}

const significant = (value: number) => value.toPrecision(3);

/** The figure the experiment is about: C_D at its Re for drag, the measured viscosity for viscometry. */
function keyResult(student: DashboardStudent, kind: "drag" | "viscometry"): string {
  if (kind === "drag" && student.dragCoefficient !== null) {
    return `C_D ${significant(student.dragCoefficient)} at Re ${student.reynolds === null ? "?" : significant(student.reynolds)}`;
  }
  if (kind === "viscometry" && student.viscosityPaS !== null) return `μ ${significant(student.viscosityPaS)} Pa·s`;
  return "—";
}

/** The form the ticked students' checkboxes belong to (they sit in the table, the form below it). */
const extendFormId = "extend-selected";

/**
 * Gives the ticked students one later due time, through the extensions page's action (one
 * transaction): a fetcher, so the dashboard stays, with the messages beside the fields on a refusal.
 */
function ExtendSelected({
  courseId,
  labId,
  timeZone,
  selected,
  onDone,
}: {
  courseId: string;
  labId: string;
  timeZone: string;
  selected: ReadonlySet<string>;
  onDone: () => void;
}) {
  const fetcher = useFetcher<typeof extensionsAction>();
  const result = fetcher.data;
  const errors = result && "error" in result ? (result.error ?? {}) : {};
  const done =
    result && "done" in result && result.done
      ? { count: result.count ?? 0, dueAt: typeof result.dueAt === "string" ? result.dueAt : null }
      : null;
  // A new blank form after each success; a refused one keeps what was typed.
  const [round, setRound] = useState(0);
  useEffect(() => {
    if (done) {
      onDone();
      setRound((value) => value + 1);
    }
  }, [result]);
  const extensionsHref = `/courses/${courseId}/labs/${labId}/extensions`;
  return (
    <section aria-labelledby="extend-selected-heading" className="rounded-lg bg-white p-4 ring-1 ring-ink-900/10">
      <h2 id="extend-selected-heading" className="mb-1 text-lg font-semibold">
        Give the selected students a later due time
      </h2>
      <p className="mb-3 text-sm text-ink-700">
        {selected.size === 0 ? "Tick students in the table above." : `${selected.size} selected.`} Each one&apos;s own extension is replaced
        by this one; a whole cohort is extended on the{" "}
        <Link to={extensionsHref} className="underline">
          Extensions
        </Link>{" "}
        page.
      </p>
      {done ? (
        <div className="mb-3">
          <Notice tone="success">
            {done.count === 1 ? "The student is" : `${done.count} students are`} now due{" "}
            {done.dueAt ? <LabTime at={done.dueAt} courseTimeZone={timeZone} /> : null}.{" "}
            <Link to={extensionsHref} className="underline">
              See every extension
            </Link>
          </Notice>
        </div>
      ) : null}
      {[...(errors.membershipIds ?? []), ...(errors[""] ?? [])].length ? (
        <div className="mb-3">
          <Notice tone="error">{[...(errors.membershipIds ?? []), ...(errors[""] ?? [])].join(" ")}</Notice>
        </div>
      ) : null}
      <fetcher.Form key={round} id={extendFormId} method="post" action={extensionsHref} className="flex flex-col gap-4">
        <input type="hidden" name="intent" value="extend-students" />
        <ExtensionWindowFields timeZone={timeZone} errors={errors} />
        <Button type="submit" disabled={selected.size === 0 || fetcher.state !== "idle"} className="self-start">
          Give {selected.size === 0 ? "the selected students" : selected.size === 1 ? "this student" : `these ${selected.size} students`}{" "}
          the new due time
        </Button>
      </fetcher.Form>
    </section>
  );
}

function StudentRow({
  student,
  kind,
  timeZone,
  courseId,
  labId,
  selection,
}: {
  student: DashboardStudent;
  kind: "drag" | "viscometry";
  timeZone: string;
  courseId: string;
  labId: string;
  selection: { checked: boolean; toggle: () => void } | null;
}) {
  const handedIn = student.version !== null && student.submittedAt !== null;
  return (
    <tr className="border-b border-ink-900/10 align-top">
      {selection ? (
        <td className="py-1 pr-2">
          <input
            type="checkbox"
            form={extendFormId}
            name="membershipIds"
            value={student.membershipId}
            checked={selection.checked}
            onChange={selection.toggle}
            aria-label={`Select ${student.name}`}
          />
        </td>
      ) : null}
      <th scope="row" className="py-1 pr-3 font-medium">
        {student.name}
      </th>
      <td className="py-1 pr-3">{student.cohortName}</td>
      <td className="py-1 pr-3">
        {handedIn ? (
          <>
            <LabTime at={student.submittedAt!} courseTimeZone={timeZone} />
            {student.late ? <span className="ml-2 rounded px-1.5 text-xs text-outlier ring-1 ring-outlier">late</span> : null}
            {student.version! > 1 ? <span className="ml-2 text-xs text-ink-600">version {student.version}</span> : null}
          </>
        ) : (
          <span className={student.status === "missing" ? "text-outlier" : ""}>
            {student.status === "missing" ? "Missing" : "Not due yet"}
            {student.hasDraft ? " (draft started)" : ""}
          </span>
        )}
        {student.deadline.extendedBy ? (
          <span className="block text-xs">
            <ExtendedTo deadline={student.deadline} timeZone={timeZone} />
          </span>
        ) : null}
      </td>
      <td className="py-1 pr-3 tabular-nums">{handedIn ? keyResult(student, kind) : ""}</td>
      <td className="py-1 pr-3 text-right tabular-nums">{handedIn ? student.warningCount : ""}</td>
      <td className="py-1">
        {handedIn && student.dropLogId ? (
          <Link to={handInHref(courseId, labId, student.dropLogId)} className="underline">
            Open<span className="sr-only"> the hand-in of {student.name}</span>
          </Link>
        ) : null}
      </td>
    </tr>
  );
}

export function meta({ loaderData }: Route.MetaArgs) {
  return [{ title: `${loaderData?.lab.title ?? "Lab"} · hand-ins · Benchpost` }];
}
