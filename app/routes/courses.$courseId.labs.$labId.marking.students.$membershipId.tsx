/**
 * One student's marking view: the hand-in's evidence first, then every criterion of the rubric to
 * score beside it (or below it on a phone). Saves go to the marking desk's action through fetchers,
 * exactly as the desk's own; moving on follows the desk's order, and Alt+N opens the next hand-in
 * still to mark. The desk's search string (its order and filters) rides along in the URL.
 */
import { useEffect, useReducer, useState } from "react";
import { data, Link, useLocation, useNavigate, type ShouldRevalidateFunctionArgs } from "react-router";
import type { Route } from "./+types/courses.$courseId.labs.$labId.marking.students.$membershipId";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { CriterionMarks } from "~/components/marking/criterion-marks";
import { HandInEvidence } from "~/components/marking/hand-in-evidence";
import { markSaves } from "~/components/marking/mark-saves";
import { useMarkSaver } from "~/components/marking/use-mark-saver";
import type { MarkingDeskRow } from "~/server/marking/mark-rows.server";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { isEntityId } from "~/lib/forms/ids";
import { markingDeskSearch } from "~/lib/marking/desk-filters";
import { markingDeskHref, markingStudentHref } from "~/lib/marking/links";
import { counted } from "~/lib/plural";
import { requireStudentAccess, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { throwAsResponse } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { loadMarkingStudent } from "~/server/marking/marking-student.server";
import { findRecordMember } from "~/server/members/student-record.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const scope = { request, context };
  const { access, lab } = await requireLabAccess(scope, params, staffRoles, loadMarkingLab);
  const member = isEntityId(params.membershipId) ? await findRecordMember(db, access.course.id, params.membershipId) : null;
  if (!member || member.role !== "student") throw data("Not found", { status: 404 });
  // A TA of another cohort is refused here, and the refusal recorded, before anything of the student is read.
  await requireStudentAccess(scope, access.course.id, member);
  const view = await loadMarkingStudent(db, {
    access,
    lab,
    membershipId: member.membershipId,
    filters: readSearchParams(request, markingDeskSearch),
  }).catch(throwAsResponse(request));
  // A student of the course outside this lab's cohorts, or no longer in the course.
  if (!view) throw data("Not found", { status: 404 });
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    instructor: access.membership.role === "instructor",
    lab: { id: lab.id, title: lab.title, kind: lab.kind, rubric: lab.rubric },
    ...view,
  };
}

/** A save answers with the student's new row, so the view is not read again after one. */
export function shouldRevalidate({ formAction, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  if (formAction?.split("?")[0].endsWith("/marking")) return false;
  return defaultShouldRevalidate;
}

export default function MarkingStudentPage({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, row: base, dropLog, order, canEdit } = loaderData;
  const { search } = useLocation();
  const navigate = useNavigate();
  const deskHref = markingDeskHref(courseId, lab.id);
  const studentHref = (membershipId: string) => markingStudentHref(courseId, lab.id, membershipId, search);
  const [saves, dispatch] = useReducer(markSaves<MarkingDeskRow>, {});
  const { row, saveState, save, retry } = useMarkSaver({
    action: deskHref,
    rubric: lab.rubric,
    base,
    saves: saves[base.membershipId],
    dispatch,
  });
  const [nextNote, setNextNote] = useState("");
  useEffect(() => setNextNote(""), [base.membershipId]);

  // Alt+N, from anywhere on the view: the next hand-in still to mark after this student in the desk's order.
  useEffect(() => {
    const onKeyDown = (event: KeyboardEvent) => {
      if (!event.altKey || event.ctrlKey || event.metaKey || event.code !== "KeyN") return;
      event.preventDefault();
      if (order.nextToMarkId) navigate(markingStudentHref(courseId, lab.id, order.nextToMarkId, search));
      else setNextNote("No other hand-in of your students is waiting to be marked.");
    };
    document.addEventListener("keydown", onKeyDown);
    return () => document.removeEventListener("keydown", onKeyDown);
  }, [order.nextToMarkId, navigate, courseId, lab.id, search]);

  const stepClass = "inline-flex min-h-10 items-center rounded-md bg-white px-3 text-sm ring-1 ring-ink-900/20";
  return (
    <div className="flex min-w-0 flex-col gap-4">
      <PageHeader
        title={row.studentName}
        trail={[
          { to: `/courses/${courseId}/labs`, label: "Labs" },
          { to: `${deskHref}${search}`, label: `${lab.title}: marking` },
        ]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
      >
        {row.cohortName} · marking {lab.title}
      </PageHeader>
      <nav aria-label="Other students" className="flex flex-wrap items-center gap-2">
        <Link to={`${deskHref}${search}`} className={stepClass}>
          Back to the desk
        </Link>
        {order.previousId ? (
          <Link to={studentHref(order.previousId)} className={stepClass} rel="prev">
            ← The student before
          </Link>
        ) : null}
        {order.nextId ? (
          <Link to={studentHref(order.nextId)} className={stepClass} rel="next">
            The student after →
          </Link>
        ) : null}
        {order.nextToMarkId ? (
          <Link to={studentHref(order.nextToMarkId)} className={stepClass} aria-keyshortcuts="Alt+N">
            Next hand-in to mark (Alt+N)
          </Link>
        ) : null}
        {/* On a phone the evidence comes first and is long: a way straight to the criteria. */}
        {lab.rubric.length ? (
          <a href="#marks-heading" className={`${stepClass} xl:hidden`}>
            To the criteria
          </a>
        ) : null}
        <span className="text-sm text-ink-700">
          {order.index + 1} of {counted(order.count, "student", "students")} in the desk&apos;s order
        </span>
        <span role="status" className="text-sm">
          {nextNote}
        </span>
      </nav>
      {!canEdit ? (
        <Notice tone="info">
          The instructor has closed this lab&apos;s marking for moderation: the mark is shown but cannot be changed here.
        </Notice>
      ) : null}
      <div className="grid min-w-0 gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)] xl:items-start">
        <HandInEvidence courseId={courseId} labId={lab.id} kind={lab.kind} timeZone={timeZone} row={row} dropLog={dropLog} />
        {lab.rubric.length ? (
          <CriterionMarks
            key={row.membershipId}
            rubric={lab.rubric}
            row={row}
            canEdit={canEdit}
            saveState={saveState}
            save={save}
            retry={retry}
          />
        ) : (
          <Notice tone="warning">This lab has no rubric yet: the instructor sets its criteria before marking.</Notice>
        )}
      </div>
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Marking ${loaderData?.row.studentName ?? "a student"} · Benchpost` }];
}
