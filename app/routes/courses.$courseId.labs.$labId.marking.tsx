/**
 * The marking desk of a lab, for its instructors and the TAs of its cohorts: one criterion at a time
 * across the class. The criterion, the cohort, a hand-in state and the page travel in the URL and are
 * served by the loader, which sends one page of compact cards and nothing that grows with the class
 * (the next card to score beyond the page is asked for with `?after=`, a bulk action names the
 * filters rather than every id); marks are saved card by card through fetchers (a save does not
 * reload the desk: its answer carries the student's new card), and a bulk action reloads it.
 */
import { data, Link, redirect, type ShouldRevalidateFunctionArgs } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.labs.$labId.marking";
import { LabStaffNav } from "~/components/labs/lab-staff-nav";
import { CriterionLadder, Pages, StateLegend } from "~/components/marking/desk-navigation";
import { MarkingDesk } from "~/components/marking/marking-desk";
import { ButtonLink } from "~/components/ui/button";
import { counted } from "~/lib/plural";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { deskStatusFilters, markingDeskSearch, MAX_BULK_STUDENTS } from "~/lib/marking/desk-filters";
import { AppError } from "~/lib/app-error";
import { isEntityId } from "~/lib/forms/ids";
import { markingStudentHref } from "~/lib/marking/links";
import { markChange } from "~/lib/marking/marks";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { deskCardOf, loadMarkingDesk, selectedMembershipIds } from "~/server/marking/marking-desk.server";
import { throwAsResponse } from "~/server/errors.server";
import { applyToMany, saveMark } from "~/server/marking/marks.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { staffRoles } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const url = new URL(request.url);
  // A student named in the address (older "next to mark" links) opens their own marking view, in the desk's order.
  const student = url.searchParams.get("student");
  if (student && isEntityId(student)) {
    url.searchParams.delete("student");
    throw redirect(markingStudentHref(access.course.id, lab.id, student, url.search));
  }
  // A cohort filter the viewer may not choose: the error page says so with the refusal's status.
  const desk = await loadMarkingDesk(db, { access, lab, filters: readSearchParams(request, markingDeskSearch) }).catch(
    throwAsResponse(request),
  );
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    instructor: access.membership.role === "instructor",
    lab: {
      id: lab.id,
      title: lab.title,
      kind: lab.kind,
      rubric: lab.rubric,
      readyAt: lab.marking.readyAt?.toISOString() ?? null,
      releasedAt: lab.marking.releasedAt?.toISOString() ?? null,
    },
    cohorts: desk.cohorts,
    criterion: desk.criterion,
    criteria: desk.criteria,
    cards: desk.rows.map((row) => deskCardOf(row, desk.criterion?.id ?? null)),
    bands: desk.bands,
    groups: desk.groups.map((group) => ({ key: group.key, title: group.title, count: group.membershipIds.length })),
    counts: desk.counts,
    page: desk.page,
    pageCount: desk.pageCount,
    totalRows: desk.totalRows,
    openId: desk.openId,
    noneToScore: desk.noneToScore,
    maxTotal: desk.maxTotal,
    canEdit: desk.canEdit,
    filters: { cohort: url.searchParams.get("cohort"), status: url.searchParams.get("status") },
  };
}

const reason = z.string().trim().max(500, "Keep the reason under 500 characters.").nullish();
const someIds = z.array(z.uuid()).max(MAX_BULK_STUDENTS);
const deskAction = z.discriminatedUnion("intent", [
  z.object({
    intent: z.literal("save"),
    membershipId: z.uuid(),
    expectedVersion: z.int().min(0),
    change: markChange,
    reason,
    /** The desk's cards answer as a card of the criterion they mark; the student's view takes the whole row. */
    view: z.object({ criterionId: z.uuid() }).nullish(),
  }),
  z.object({
    intent: z.literal("bulk"),
    /** The desk's filters and what was chosen within them (see `DeskSelection`). */
    selection: z.object({
      criterionId: z.uuid(),
      cohortId: z.uuid().nullish(),
      status: z.enum(deskStatusFilters).nullish(),
      all: z.boolean(),
      bands: z.array(z.string().max(40)).max(20),
      ids: someIds,
      except: someIds,
    }),
    change: markChange,
    reason,
  }),
]);

export async function action({ request, context, params }: Route.ActionArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const parsed = deskAction.safeParse(await request.json().catch(() => null));
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    return data(
      {
        intent: "refused" as const,
        status: "refused" as const,
        error: {
          code: "invalid_value",
          message: issue?.message ?? "The change cannot be read.",
          field: String(issue?.path.at(-1) ?? "form"),
          membershipIds: [],
        },
      },
      { status: 400 },
    );
  }
  const input = parsed.data;
  try {
    if (input.intent === "save") {
      const result = await saveMark(db, {
        access,
        labId: lab.id,
        membershipId: input.membershipId,
        expectedVersion: input.expectedVersion,
        change: input.change,
        reason: input.reason,
      });
      const row = input.view ? deskCardOf(result.row, input.view.criterionId) : result.row;
      return { intent: "save" as const, status: result.status, row };
    }
    const { selection } = input;
    // The students as the desk finds them now: those passing its filters that the selection takes.
    const desk = await loadMarkingDesk(db, {
      access,
      lab,
      filters: {
        criterionId: selection.criterionId,
        cohortId: selection.cohortId ?? undefined,
        status: selection.status ?? undefined,
        page: 1,
        pageSize: 1,
      },
    });
    const result = await applyToMany(db, {
      access,
      labId: lab.id,
      membershipIds: selectedMembershipIds(desk, selection),
      change: input.change,
      reason: input.reason,
    });
    return { intent: "bulk" as const, status: "applied" as const, changed: result.changed, unchanged: result.unchanged };
  } catch (error) {
    // The desk saves through fetchers and shows a refusal in the student's row, so it answers its own shape.
    if (!(error instanceof AppError)) throw error;
    return data(
      {
        intent: input.intent,
        status: "refused" as const,
        error: { code: error.code, message: error.message, field: error.field ?? "form", membershipIds: error.subjectIds },
      },
      { status: error.status },
    );
  }
}

/** A lost connection is a failed save the marker can retry, not an error page. */
export async function clientAction({ serverAction }: Route.ClientActionArgs) {
  try {
    return await serverAction();
  } catch {
    return { status: "failed" as const, message: "The connection failed; nothing was saved." };
  }
}

/** A saved cell answers with the student's new row, so the desk is not read again; a bulk action reloads it. */
export function shouldRevalidate({ actionResult, defaultShouldRevalidate }: ShouldRevalidateFunctionArgs) {
  if (actionResult && typeof actionResult === "object" && "intent" in actionResult && actionResult.intent === "save") return false;
  if (actionResult && typeof actionResult === "object" && "status" in actionResult && actionResult.status === "failed") return false;
  return defaultShouldRevalidate;
}

export default function MarkingPage({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, instructor, lab, criterion, canEdit, maxTotal, filters } = loaderData;
  const base = `/courses/${courseId}/labs/${lab.id}`;
  return (
    <div className="flex min-w-0 flex-col gap-4">
      <PageHeader
        title={lab.title}
        trail={[{ to: `/courses/${courseId}/labs`, label: "Labs" }]}
        tabs={<LabStaffNav courseId={courseId} labId={lab.id} instructor={instructor} />}
        actions={
          <>
            <a href={`${base}/marks.csv`} className="px-3 py-2 text-sm underline" download>
              Marks by criterion (CSV)
            </a>
            <a href={`${base}/marks-summary.csv`} className="px-3 py-2 text-sm underline" download>
              Marks summary (CSV)
            </a>
            {instructor ? (
              <>
                <Link to={`${base}/moderation`} className="px-3 py-2 text-sm underline">
                  Moderate and release
                </Link>
                <ButtonLink to={`${base}/rubric`} variant="secondary">
                  Edit the rubric
                </ButtonLink>
              </>
            ) : null}
          </>
        }
      >
        Marking desk · one criterion at a time · out of {counted(maxTotal, "point", "points")}
        {lab.releasedAt ? " · marks released" : lab.readyAt ? " · marking closed for TAs" : ""}
      </PageHeader>
      {lab.rubric.length === 0 ? (
        <Notice tone="warning">
          This lab has no rubric yet.{" "}
          {instructor ? (
            <Link to={`${base}/rubric`} className="underline">
              Set its criteria
            </Link>
          ) : (
            "The instructor sets its criteria"
          )}{" "}
          before marking.
        </Notice>
      ) : null}
      {!canEdit ? (
        <Notice tone="info">
          The instructor has closed this lab&apos;s marking for moderation: marks are shown but cannot be changed here.
        </Notice>
      ) : null}
      <CriterionLadder criteria={loaderData.criteria} current={criterion?.id ?? null} />
      <div className="grid min-w-0 grid-cols-1 gap-4 lg:grid-cols-[14rem_minmax(0,1fr)] lg:items-start">
        <StateLegend cohorts={loaderData.cohorts} counts={loaderData.counts} filters={filters} />
        <div className="flex min-w-0 flex-col gap-3">
          {criterion ? (
            <MarkingDesk
              desk={{ courseId, labId: lab.id, kind: lab.kind, timeZone, rubric: lab.rubric, criterion, canEdit }}
              cards={loaderData.cards}
              bands={loaderData.bands}
              groups={loaderData.groups}
              totalRows={loaderData.totalRows}
              filters={{ cohortId: filters.cohort, status: filters.status }}
              openId={loaderData.openId}
              noneToScore={loaderData.noneToScore}
              paged={loaderData.pageCount > 1}
            />
          ) : null}
          <Pages page={loaderData.page} pageCount={loaderData.pageCount} totalRows={loaderData.totalRows} />
        </div>
      </div>
    </div>
  );
}

export function meta({ data: loaderData }: Route.MetaArgs) {
  return [{ title: `Marking: ${loaderData?.lab.title ?? "lab"} · Benchpost` }];
}
