import { getFormProps, getInputProps, getSelectProps, useForm } from "@conform-to/react";
import type { ColumnDef } from "@tanstack/react-table";
import { data, Form, Link, useFetcher, useSearchParams } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits._index";
import { DataTable } from "~/components/ui/data-table";
import { Button, ButtonLink } from "~/components/ui/button";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { KitStateBadge } from "~/components/kit-state-badge";
import { pagingSearch, searchText } from "~/lib/forms/search-params";
import { formList, parseSubmission } from "~/lib/forms/submission";
import { kitStateLabels, kitStates } from "~/lib/kits/kit-states";
import { kitCohortScope, requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import { listKits, moveKits } from "~/server/kits/kits.server";
import { counted } from "~/lib/plural";
import { formatCalendarDay } from "~/lib/format-date";

/**
 * Moves that need nothing more than a note can be applied to many kits at once. Checking in needs each
 * part's condition: it has its own page (`kits/check-in`).
 */
const bulkTargets = ["at_home", "coming_back", "on_shelf", "retired"] as const;

const bulkMove = z.object({
  intent: z.literal("bulk-move"),
  to: z.enum(bulkTargets, { error: "Choose the state to move the kits to." }),
  kitIds: formList(z.uuid()).refine((ids) => ids.length > 0, "Select at least one kit."),
  note: z.string().trim().max(500).optional(),
});

const kitListSearch = z.object({ state: z.enum(kitStates).optional(), q: searchText(80), ...pagingSearch() });

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { state, q, page, size } = readSearchParams(request, kitListSearch);
  const paging = { page, pageSize: size };
  // A TA sees the kits held by students of their cohorts, and reads them only.
  const { rows, total } = await listKits(db, access.course.id, {
    state,
    search: q || undefined,
    cohortIds: kitCohortScope(access),
    ...paging,
  });
  return { kits: rows, pageInfo: { ...paging, total }, canChange: access.membership.role === "instructor", courseId: access.course.id };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, bulkMove);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  const { kitIds, to, note } = submission.value;
  const { moved } = await moveKits(db, { courseId: access.course.id, actorId: access.user.id, kitIds, move: { to, note } });
  return { moved: `${counted(moved, "kit", "kits")} moved to ${kitStateLabels[to].toLowerCase()}.` };
});

type KitRow = Route.ComponentProps["loaderData"]["kits"][number];

const columns: ColumnDef<KitRow, unknown>[] = [
  {
    header: "Kit",
    cell: ({ row }) => (
      <Link to={row.original.id} className="whitespace-nowrap font-medium underline">
        {row.original.number}
      </Link>
    ),
  },
  { header: "State", cell: ({ row }) => <KitStateBadge state={row.original.state} /> },
  {
    header: "Student",
    cell: ({ row }) =>
      row.original.holderName ? (
        <span>
          {row.original.holderName}
          <span className="block text-xs text-ink-600">{row.original.cohortName}</span>
        </span>
      ) : (
        <span className="text-ink-600">—</span>
      ),
  },
  { header: "Parts", cell: ({ row }) => row.original.partCount },
  {
    header: "Shipping",
    cell: ({ row }) => {
      const kit = row.original;
      return (
        <>
          {kit.trackingNumber
            ? `${kit.carrier} ${kit.trackingNumber} (${kit.shippedOn ? formatCalendarDay(kit.shippedOn) : "no date"})`
            : ""}
          {kit.returnTrackingNumber ? (
            <span className="block text-xs text-ink-600">
              Back: {kit.returnCarrier} {kit.returnTrackingNumber} ({kit.returnShippedOn && formatCalendarDay(kit.returnShippedOn)})
            </span>
          ) : null}
        </>
      );
    },
  },
  {
    header: "Reports",
    cell: ({ row }) => (row.original.openReports ? <span className="font-medium text-outlier">{row.original.openReports} open</span> : ""),
  },
];

export default function Kits({ loaderData }: Route.ComponentProps) {
  const { kits, pageInfo, canChange, courseId } = loaderData;
  const [search] = useSearchParams();
  const fetcher = useFetcher<typeof action>();
  const [form, fields] = useForm({
    id: "bulk-move",
    lastResult: fetcher.data && "moved" in fetcher.data ? undefined : fetcher.data,
    shouldValidate: "onBlur",
    shouldRevalidate: "onInput",
    onValidate: ({ formData }) => parseSubmission(formData, bulkMove),
  });
  // Sending clears the selection, and with it the form: its errors are told above the table.
  const refusals = Object.values(form.allErrors).flat();
  return (
    <div className="flex flex-col gap-4">
      <PageHeader
        title="Kits"
        actions={
          canChange ? (
            <>
              <ButtonLink to="new">Make up a kit</ButtonLink>
              <ButtonLink to={`/courses/${courseId}/shipments/new`} variant="secondary">
                Ship a cohort
              </ButtonLink>
              <ButtonLink to="problems" variant="secondary">
                Kit problems
              </ButtonLink>
              <Link to="tracking-import" className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
                Import tracking numbers (CSV)
              </Link>
              <Link to="check-in" className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
                Check kits in
              </Link>
              <Link to="overdue" className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
                Overdue kits
              </Link>
              <a href={`/courses/${courseId}/inventory.csv`} className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20">
                Export inventory (CSV)
              </a>
            </>
          ) : undefined
        }
      >
        {canChange ? null : (
          <>
            You see the kits of your cohorts' students; only instructors change them.{" "}
            <Link to="overdue" className="underline">
              Overdue kits
            </Link>
          </>
        )}
      </PageHeader>
      <Form method="get" className="no-print flex flex-wrap items-end gap-3" role="search">
        <label className="flex flex-col text-sm">
          State
          <select
            name="state"
            defaultValue={search.get("state") ?? ""}
            className="rounded-md border border-ink-900/20 bg-white px-2 py-1.5"
          >
            <option value="">Any state</option>
            {kitStates.map((state) => (
              <option key={state} value={state}>
                {kitStateLabels[state]}
              </option>
            ))}
          </select>
        </label>
        <label className="flex flex-col text-sm">
          Search
          <input
            name="q"
            type="search"
            defaultValue={search.get("q") ?? ""}
            placeholder="Kit number or student"
            className="rounded-md border border-ink-900/20 bg-white px-2 py-1.5"
          />
        </label>
        <Button type="submit" variant="secondary">
          Show
        </Button>
      </Form>
      {fetcher.data && "moved" in fetcher.data ? <Notice tone="success">{fetcher.data.moved}</Notice> : null}
      {refusals.length ? <Notice tone="error">Nothing was changed: {refusals.join(" ")}</Notice> : null}
      <DataTable
        caption="Kits of the course"
        columns={columns}
        rows={kits}
        pageInfo={pageInfo}
        selectable={canChange}
        rowLabel={(kit) => `kit ${kit.number}`}
        empty="No kits match. Make up a kit from parts on the shelf."
        renderSelectionActions={(kitIds, clear) => (
          <>
            <Form method="get" action="check-in">
              {kitIds.map((id) => (
                <input key={id} type="hidden" name="kit" value={id} />
              ))}
              <Button type="submit" variant="secondary">
                Check in…
              </Button>
            </Form>
            <fetcher.Form
              method="post"
              className="flex flex-wrap items-center gap-2"
              {...getFormProps(form)}
              onSubmit={(event) => {
                form.onSubmit(event);
                if (!event.defaultPrevented) clear();
              }}
            >
              <input type="hidden" name="intent" value="bulk-move" />
              {kitIds.map((id) => (
                <input key={id} type="hidden" name="kitIds" value={id} />
              ))}
              <label className="flex items-center gap-2">
                Move to
                <select {...getSelectProps(fields.to)} required className="rounded-md border border-ink-900/20 bg-white px-2 py-1">
                  {bulkTargets.map((state) => (
                    <option key={state} value={state}>
                      {kitStateLabels[state]}
                    </option>
                  ))}
                </select>
              </label>
              <input
                {...getInputProps(fields.note, { type: "text" })}
                placeholder="Note (optional)"
                aria-label="Note"
                className="rounded-md border border-ink-900/20 bg-white px-2 py-1"
              />
              <Button type="submit" disabled={fetcher.state !== "idle"}>
                {fetcher.state !== "idle" ? "Moving…" : "Apply"}
              </Button>
            </fetcher.Form>
          </>
        )}
      />
    </div>
  );
}

export function meta() {
  return [{ title: "Kits · Benchpost" }];
}
