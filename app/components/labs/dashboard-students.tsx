/**
 * The dashboard's students with their counted version and key result; instructors tick students here
 * and give them a later due time below the table.
 */
import { useEffect, useState } from "react";
import { Link, useFetcher } from "react-router";
import { LabTime } from "~/components/drop-logs/lab-time";
import { ExtensionWindowFields } from "~/components/labs/extension-fields";
import { ExtendedTo } from "~/components/labs/extended-to";
import { StateMark } from "~/components/marking/state-mark";
import { Button } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { handInHref } from "~/lib/comparison/links";
import type { action as extensionsAction } from "~/routes/courses.$courseId.labs.$labId.extensions";
import type { DashboardStudent } from "~/server/labs/lab-dashboard.server";
import { extendedWho, selectedStudentsWords } from "~/lib/labs/extension-words";

export function DashboardStudents({
  courseId,
  timeZone,
  instructor,
  lab,
  students,
}: {
  courseId: string;
  timeZone: string;
  instructor: boolean;
  lab: { id: string; kind: "drag" | "viscometry" };
  students: DashboardStudent[];
}) {
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
    <>
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
    </>
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
            {extendedWho(done.count)} now due {done.dueAt ? <LabTime at={done.dueAt} courseTimeZone={timeZone} /> : null}.{" "}
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
          Give {selectedStudentsWords(selected.size)} the new due time
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
            {student.late ? (
              <span className="ml-2 text-xs">
                <StateMark state="after-due" explain />
              </span>
            ) : null}
            {student.version! > 1 ? <span className="ml-2 text-xs text-ink-600">version {student.version}</span> : null}
          </>
        ) : (
          <span>
            <StateMark state={student.status === "missing" ? "absent" : "awaited"} explain />
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
