import type { ColumnDef } from "@tanstack/react-table";
import { SortHeader } from "~/components/ui/sort-header";
import { Form, Link, useLocation } from "react-router";
import type { Route } from "./+types/courses.$courseId.mark-book";
import { DataTable } from "~/components/ui/data-table";
import { SelectField, TextField } from "~/components/ui/field";
import { Button, ButtonLink } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/page-header";
import { formatPercent, markBookSearch, markBookStandingWords } from "~/lib/marking/mark-book";
import { requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { throwAsResponse } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import { markBookPage, type MarkBookCell, type MarkBookLab } from "~/server/marking/mark-book.server";
import { counted } from "~/lib/plural";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { sortParam, ...query } = readSearchParams(request, markBookSearch);
  const book = await markBookPage(db, access, query).catch(throwAsResponse(request));
  return {
    courseId: access.course.id,
    mayChangeSettings: access.membership.role === "instructor" && !access.course.archivedAt,
    filters: { search: query.search ?? "", cohortId: query.cohortId ?? "", sort: sortParam },
    pageInfo: { ...query.paging!, total: book.total },
    dropLowest: book.dropLowest,
    labs: book.labs,
    cohorts: book.cohorts,
    // The page shows what it needs of each cell; the exports read the rest.
    rows: book.rows.map(({ cells, ...row }) => ({
      ...row,
      id: row.membershipId,
      cells: Object.fromEntries(
        Object.entries(cells).map(([labId, cell]) => [labId, { standing: cell.standing, percent: cell.percent, use: cell.use }]),
      ),
    })),
  };
}

type Row = Route.ComponentProps["loaderData"]["rows"][number];

export default function MarkBook({ loaderData }: Route.ComponentProps) {
  const { courseId, mayChangeSettings, filters, pageInfo, dropLowest, labs, cohorts, rows } = loaderData;
  const location = useLocation();
  const base = `/courses/${courseId}`;
  // The exports take the filters and order shown, never the page.
  const exportSearch = new URLSearchParams(location.search);
  exportSearch.delete("page");
  exportSearch.delete("size");
  const exportQuery = exportSearch.size ? `?${exportSearch}` : "";
  const columns: ColumnDef<Row, unknown>[] = [
    {
      id: "name",
      header: () => <SortHeader label="Student" by="name" sort={filters.sort} />,
      cell: ({ row }) => <Student row={row.original} recordTo={`${base}/members/${row.original.membershipId}/record`} />,
    },
    {
      id: "number",
      header: () => <SortHeader label="Student number" by="number" sort={filters.sort} />,
      cell: ({ row }) => row.original.studentNumber ?? "—",
    },
    {
      id: "cohort",
      header: () => <SortHeader label="Cohort" by="cohort" sort={filters.sort} />,
      cell: ({ row }) => row.original.cohortName ?? "—",
    },
    ...labs.map((lab): ColumnDef<Row, unknown> => ({
      id: lab.id,
      header: () => <LabHeader lab={lab} sort={filters.sort} />,
      cell: ({ row }) => <LabCell cell={row.original.cells[lab.id]} />,
    })),
    {
      id: "total",
      header: () => <SortHeader label="Term total" by="total" sort={filters.sort} />,
      cell: ({ row }) => <span className="font-medium">{formatPercent(row.original.total)}</span>,
    },
    {
      id: "counted",
      header: () => <SortHeader label="Labs counted" by="counted" sort={filters.sort} />,
      cell: ({ row }) => (
        <>
          {row.original.counted}
          {row.original.dropped ? <span className="text-ink-600"> ({row.original.dropped} dropped)</span> : null}
        </>
      ),
    },
  ];
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Mark book"
        actions={
          <>
            {mayChangeSettings ? (
              <ButtonLink to={`${base}/mark-book/settings`} variant="secondary">
                Weights and dropped labs
              </ButtonLink>
            ) : null}
            <a
              href={`${base}/mark-book.csv${exportQuery}`}
              className="rounded-md bg-white px-4 py-2 text-sm font-medium ring-1 ring-ink-900/20"
              download
            >
              Export the mark book (CSV)
            </a>
            <a
              href={`${base}/mark-book/oneroster-results.csv${exportQuery}`}
              className="rounded-md bg-white px-4 py-2 text-sm font-medium ring-1 ring-ink-900/20"
              download
            >
              Export results for OneRoster 1.2 (CSV)
            </a>
          </>
        }
      >
        <TotalRule dropLowest={dropLowest} />
      </PageHeader>
      <Form method="get" className="flex flex-wrap items-end gap-3" aria-label="Filter the mark book">
        <input type="hidden" name="sort" value={filters.sort === "name" ? "" : filters.sort} />
        <div className="w-64">
          <TextField label="Name or e-mail contains" name="search" type="search" defaultValue={filters.search} />
        </div>
        {cohorts.length > 1 ? (
          <div className="w-48">
            <SelectField label="Cohort" name="cohort" defaultValue={filters.cohortId}>
              <option value="">Every cohort</option>
              {cohorts.map((cohort) => (
                <option key={cohort.id} value={cohort.id}>
                  {cohort.name}
                </option>
              ))}
            </SelectField>
          </div>
        ) : null}
        <Button type="submit" variant="secondary">
          Show
        </Button>
      </Form>
      <DataTable caption="Term marks, one row per student" columns={columns} rows={rows} pageInfo={pageInfo} empty="No students match." />
    </div>
  );
}

/** How the total is made, in the course's own numbers. */
function TotalRule({ dropLowest }: { dropLowest: number }) {
  const dropped =
    dropLowest === 0
      ? ""
      : dropLowest === 1
        ? ", leaving out each student's lowest lab"
        : `, leaving out each student's ${dropLowest} lowest labs`;
  return (
    <>
      A lab counts once its mark is released: its points over the rubric&apos;s maximum. The term total is the weighted average of those
      percentages{dropped}; a lab with weight 0 is left out.
    </>
  );
}

function Student({ row, recordTo }: { row: Row; recordTo: string }) {
  return (
    <div className="flex flex-col">
      <Link to={recordTo} className="font-medium underline">
        {row.name}
      </Link>
      <span className="text-xs text-ink-600">{row.email}</span>
    </div>
  );
}

function LabHeader({ lab, sort }: { lab: MarkBookLab; sort: string }) {
  return (
    <div className="flex flex-col">
      <SortHeader label={lab.title} by={lab.id} sort={sort} />
      <span className="text-xs font-normal text-ink-600">
        {lab.maximum > 0 ? `of ${counted(lab.maximum, "point", "points")}` : "no rubric yet"} · weight {lab.weight}
      </span>
    </div>
  );
}

function LabCell({ cell }: { cell: Pick<MarkBookCell, "standing" | "percent" | "use"> | undefined }) {
  if (!cell) return null;
  if (cell.standing !== "released") return <span className="text-ink-600">{markBookStandingWords[cell.standing]}</span>;
  if (cell.use === "dropped")
    return (
      <span className="text-ink-600">
        <s>{formatPercent(cell.percent)}</s> dropped
      </span>
    );
  return <span className={cell.use === "left-out" ? "text-ink-600" : undefined}>{formatPercent(cell.percent)}</span>;
}

export function meta() {
  return [{ title: "Mark book · Benchpost" }];
}
