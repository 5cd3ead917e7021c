import type { ColumnDef } from "@tanstack/react-table";
import { Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.kits.overdue";
import { KitStateBadge } from "~/components/kit-state-badge";
import { DataTable } from "~/components/ui/data-table";
import { PageHeader } from "~/components/ui/page-header";
import { formatCalendarDay, formatDateTime } from "~/lib/format-date";
import { pagingSearch } from "~/lib/forms/search-params";
import { kitCohortScope, requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { listOverdueKits, returnSettingsOf } from "~/server/kits/returns.server";
import { plural } from "~/lib/plural";

const overdueSearch = z.object(pagingSearch());

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { page, size } = readSearchParams(request, overdueSearch);
  const paging = { page, pageSize: size };
  const [settings, { rows, total }] = await Promise.all([
    returnSettingsOf(db, access.course.id),
    // A TA sees the kits of their cohorts' students, like the kits list.
    listOverdueKits(db, access.course.id, { cohortIds: kitCohortScope(access), ...paging }),
  ]);
  return {
    kits: rows,
    pageInfo: { ...paging, total },
    returnBy: settings.kitReturnBy,
    reminderDays: settings.kitReturnReminderDays,
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    isInstructor: access.membership.role === "instructor",
  };
}

type OverdueRow = Route.ComponentProps["loaderData"]["kits"][number];

function parcel(carrier: string | null, trackingNumber: string | null, sentOn: string | null) {
  return trackingNumber ? `${carrier} ${trackingNumber}, sent ${sentOn ? formatCalendarDay(sentOn) : "on a date not given"}` : null;
}

function columnsFor(courseId: string, timeZone: string): ColumnDef<OverdueRow, unknown>[] {
  return [
    {
      header: "Kit",
      cell: ({ row }) => (
        <Link to={`/courses/${courseId}/kits/${row.original.id}`} className="whitespace-nowrap font-medium underline">
          {row.original.number}
        </Link>
      ),
    },
    { header: "State", cell: ({ row }) => <KitStateBadge state={row.original.state} /> },
    {
      header: "Student",
      cell: ({ row }) => (
        <span>
          {row.original.studentName ?? "—"}
          {row.original.invited ? <span className="text-ink-600"> (invited)</span> : null}
          <span className="block text-xs text-ink-600">{row.original.studentEmail}</span>
        </span>
      ),
    },
    { header: "Cohort", cell: ({ row }) => row.original.cohortName ?? "—" },
    {
      header: "Days overdue",
      cell: ({ row }) =>
        row.original.overdue ? (
          <span className="font-medium text-outlier">{row.original.daysOverdue}</span>
        ) : (
          <span className="text-ink-600">not counted</span>
        ),
    },
    {
      header: "What is known",
      cell: ({ row }) => {
        const kit = row.original;
        if (kit.state === "coming_back")
          return parcel(kit.returnCarrier, kit.returnTrackingNumber, kit.returnShippedOn) ?? "On its way back; no return parcel given";
        if (kit.state === "in_transit")
          return `Not yet arrived: ${parcel(kit.carrier, kit.trackingNumber, kit.shippedOn) ?? "no parcel given"}`;
        return "At the student's home";
      },
    },
    {
      header: "Last reminder",
      cell: ({ row }) => (row.original.lastReminderAt ? formatDateTime(row.original.lastReminderAt, timeZone, "short") : "none yet"),
    },
  ];
}

export default function OverdueKits({ loaderData }: Route.ComponentProps) {
  const { kits, pageInfo, returnBy, reminderDays, courseId, timeZone, isInstructor } = loaderData;
  return (
    <div className="flex flex-col gap-4">
      <PageHeader title="Overdue kits" trail={[{ to: `/courses/${courseId}/kits`, label: "Kits" }]}>
        {returnBy ? (
          <>
            Kits were due back by {formatCalendarDay(returnBy)}. A kit still at its student's home counts as overdue, and its student is
            e-mailed{" "}
            {reminderDays.length
              ? `${reminderDays.join(", ")} ${plural(Math.max(...reminderDays), "day", "days")} after that date`
              : "no reminder (no reminder days are set)"}
            . Kits on their way out or back are listed with their parcel, not counted.
          </>
        ) : (
          <>
            The course has no return-by date, so no kit is overdue.
            {isInstructor ? (
              <>
                {" "}
                Set one in{" "}
                <Link to={`/courses/${courseId}/settings`} className="underline">
                  course settings
                </Link>
                .
              </>
            ) : null}
          </>
        )}
      </PageHeader>
      <DataTable
        caption="Kits not back after the return-by date"
        columns={columnsFor(courseId, timeZone)}
        rows={kits}
        pageInfo={pageInfo}
        empty={returnBy ? "No kit is out with a student." : "No return-by date is set."}
      />
    </div>
  );
}

export function meta() {
  return [{ title: "Overdue kits · Benchpost" }];
}
