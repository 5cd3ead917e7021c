import type { ColumnDef } from "@tanstack/react-table";
import { Form, Link, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.problems._index";
import { ProblemStatusBadge } from "~/components/kits/kit-problems";
import { Button } from "~/components/ui/button";
import { DataTable } from "~/components/ui/data-table";
import { PageHeader } from "~/components/ui/page-header";
import { formatDateTime } from "~/lib/format-date";
import { pagingSearch } from "~/lib/forms/search-params";
import { kitProblemKindLabels, kitProblemStatuses, kitProblemStatusLabels } from "~/lib/kits/kit-problem-states";
import { kitCohortScope, requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { listProblems } from "~/server/kits/kit-problems.server";

const problemListSearch = z.object({ status: z.enum(kitProblemStatuses).optional(), ...pagingSearch() });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { status, page, size } = readSearchParams(request, problemListSearch);
  const paging = { page, pageSize: size };
  // A TA follows the problems of their cohorts' students, as they see those students' kits.
  const { rows, total } = await listProblems(db, access.course.id, { status, cohortIds: kitCohortScope(access), ...paging });
  return {
    problems: rows,
    pageInfo: { ...paging, total },
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    canChange: access.membership.role === "instructor",
  };
}

type ProblemRow = Route.ComponentProps["loaderData"]["problems"][number];

const columnsFor = (timeZone: string): ColumnDef<ProblemRow, unknown>[] => [
  {
    header: "Problem",
    cell: ({ row }) => (
      <Link to={row.original.id} className="font-medium underline">
        {kitProblemKindLabels[row.original.kind]}
        {row.original.partLabel ? `: ${row.original.partLabel}` : ""}
      </Link>
    ),
  },
  { header: "Status", cell: ({ row }) => <ProblemStatusBadge status={row.original.status} /> },
  { header: "Kit", cell: ({ row }) => row.original.kitNumber },
  {
    header: "Student",
    cell: ({ row }) => (
      <span>
        {row.original.studentName ?? "former student"}
        <span className="block text-xs text-ink-600">{row.original.cohortName}</span>
      </span>
    ),
  },
  { header: "Reported", cell: ({ row }) => formatDateTime(row.original.createdAt, timeZone) },
  { header: "Last change", cell: ({ row }) => formatDateTime(row.original.updatedAt, timeZone) },
];

export default function KitProblems({ loaderData }: Route.ComponentProps) {
  const { problems, pageInfo, courseId, timeZone, canChange } = loaderData;
  const [search] = useSearchParams();
  return (
    <div className="flex flex-col gap-4">
      <PageHeader title="Kit problems" trail={[{ to: `/courses/${courseId}/kits`, label: "Kits" }]}>
        {canChange
          ? "Open problems first, those waiting longest at the top."
          : "You see the problems of your cohorts' students; only instructors change them."}
      </PageHeader>
      <Form method="get" className="no-print flex flex-wrap items-end gap-3" role="search">
        <label className="flex flex-col text-sm">
          Status
          <select
            name="status"
            defaultValue={search.get("status") ?? ""}
            className="rounded-md border border-ink-900/20 bg-white px-2 py-1.5"
          >
            <option value="">Any status</option>
            {kitProblemStatuses.map((status) => (
              <option key={status} value={status}>
                {kitProblemStatusLabels[status]}
              </option>
            ))}
          </select>
        </label>
        <Button type="submit" variant="secondary">
          Show
        </Button>
      </Form>
      <DataTable
        caption="Problems students reported with their kits"
        columns={columnsFor(timeZone)}
        rows={problems}
        pageInfo={pageInfo}
        rowLabel={(problem) => `problem with kit ${problem.kitNumber}`}
        empty="No problems match. Students report them from their kit page."
      />
    </div>
  );
}

export function meta() {
  return [{ title: "Kit problems · Benchpost" }];
}
