import type { ColumnDef } from "@tanstack/react-table";
import { Form, Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.parts._index";
import { DataTable } from "~/components/ui/data-table";
import { SelectField, TextField } from "~/components/ui/field";
import { Button, ButtonLink } from "~/components/ui/button";
import { PageHeader } from "~/components/ui/page-header";
import { StatusBadge } from "~/components/kits/status-badge";
import { PartBiasBadge } from "~/components/comparison/part-bias";
import { pagingSearch, searchText } from "~/lib/forms/search-params";
import { measurementSummary, partStatusLabels } from "~/lib/kits/part-display";
import { partKindLabels, type PartKind } from "~/lib/kits/part-input";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { listPartBias } from "~/server/comparison/part-quality.server";
import { listParts } from "~/server/kits/parts.server";

const partListSearch = z.object({
  kind: z.enum(["sphere", "fluid_lot", "column", "accessory"]).optional(),
  status: z.enum(["in_service", "remeasure", "retired"]).optional(),
  search: searchText(40),
  ...pagingSearch(),
});

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor", "ta"]);
  const { page, size, ...filters } = readSearchParams(request, partListSearch);
  const paging = { page, pageSize: size };
  const [{ rows, total }, bias] = await Promise.all([
    listParts(db, access.course.id, { ...filters, search: filters.search || undefined, ...paging }),
    listPartBias(db, access.course.id),
  ]);
  return {
    courseId: access.course.id,
    mayEdit: access.membership.role === "instructor",
    filters,
    pageInfo: { ...paging, total },
    rows: rows.map((part) => ({
      id: part.id,
      label: part.label,
      kind: part.kind,
      status: part.status,
      kitNumber: part.kitNumber,
      measurements: measurementSummary(part),
      biased: bias.get(part.id)?.flagged ?? false,
    })),
  };
}

type PartRow = Route.ComponentProps["loaderData"]["rows"][number];

export default function PartsList({ loaderData }: Route.ComponentProps) {
  const { courseId, mayEdit, filters, pageInfo, rows } = loaderData;
  const base = `/courses/${courseId}`;
  const columns: ColumnDef<PartRow, unknown>[] = [
    {
      header: "Label",
      cell: ({ row }) => (
        <>
          <Link to={`${base}/parts/${row.original.id}`} className="whitespace-nowrap font-medium text-ink-800 underline underline-offset-2">
            {row.original.label}
          </Link>
          {row.original.biased ? <PartBiasBadge /> : null}
        </>
      ),
    },
    { header: "Kind", cell: ({ row }) => partKindLabels[row.original.kind as PartKind] },
    { header: "Measurements", cell: ({ row }) => <span className="text-ink-800">{row.original.measurements}</span> },
    { header: "Status", cell: ({ row }) => <StatusBadge status={row.original.status} /> },
    { header: "Kit", cell: ({ row }) => row.original.kitNumber ?? "—" },
  ];
  return (
    <div className="flex flex-col gap-6">
      <PageHeader
        title="Parts"
        actions={
          <>
            {mayEdit ? (
              <>
                <ButtonLink to={`${base}/parts/new`}>Add a part</ButtonLink>
                <Link to={`${base}/parts/import`} className="rounded-md bg-white px-4 py-2 text-sm font-medium ring-1 ring-ink-900/20">
                  Import parts (CSV)
                </Link>
              </>
            ) : null}
            <a href={`${base}/inventory.csv`} className="rounded-md bg-white px-4 py-2 text-sm font-medium ring-1 ring-ink-900/20" download>
              Export inventory (CSV)
            </a>
          </>
        }
      >
        The measured spheres, fluid lots, columns and accessories of this course's kits.
        {mayEdit ? null : " You can read the inventory; instructors change it."}
      </PageHeader>
      <Form method="get" className="flex flex-wrap items-end gap-3" aria-label="Filter the parts">
        <div className="w-40">
          <SelectField label="Kind" name="kind" defaultValue={filters.kind ?? ""}>
            <option value="">Every kind</option>
            {Object.entries(partKindLabels).map(([kind, label]) => (
              <option key={kind} value={kind}>
                {label}
              </option>
            ))}
          </SelectField>
        </div>
        <div className="w-48">
          <SelectField label="Status" name="status" defaultValue={filters.status ?? ""}>
            <option value="">Every status</option>
            {Object.entries(partStatusLabels).map(([status, label]) => (
              <option key={status} value={status}>
                {label}
              </option>
            ))}
          </SelectField>
        </div>
        <div className="w-48">
          <TextField label="Label contains" name="search" type="search" defaultValue={filters.search ?? ""} />
        </div>
        <Button type="submit" variant="secondary">
          Show
        </Button>
      </Form>
      <DataTable
        caption="Parts of this course"
        columns={columns}
        rows={rows}
        pageInfo={pageInfo}
        empty="No parts match. Add one, or import a CSV file."
      />
    </div>
  );
}

export function meta() {
  return [{ title: "Parts · Benchpost" }];
}
