import { Link } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.shipments._index";
import { ButtonLink } from "~/components/ui/button";
import { Pager } from "~/components/ui/data-table";
import { PageHeader } from "~/components/ui/page-header";
import { tableHeadClass } from "~/components/ui/table-head";
import { formatDateTime } from "~/lib/format-date";
import { pagingSearch } from "~/lib/forms/search-params";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { listShipments } from "~/server/shipping/shipments.server";

const shipmentListSearch = z.object(pagingSearch(25));

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { page, size } = readSearchParams(request, shipmentListSearch);
  const { rows, total } = await listShipments(db, access.course.id, { page, pageSize: size });
  return { courseId: access.course.id, timeZone: access.course.timeZone, shipments: rows, pageInfo: { page, pageSize: size, total } };
}

const kindLabels = { outbound: "Kits to students", return: "Return labels", replacement: "Replacement parts" } as const;

export default function Shipments({ loaderData }: Route.ComponentProps) {
  const { courseId, timeZone, shipments, pageInfo } = loaderData;
  return (
    <div className="flex flex-col gap-4">
      <PageHeader title="Shipments" actions={<ButtonLink to={`/courses/${courseId}/shipments/new`}>Ship a cohort</ButtonLink>}>
        Every batch of labels bought through the carrier, newest first.
      </PageHeader>
      <div
        role="region"
        aria-label="Shipments"
        tabIndex={0}
        className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10"
      >
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Shipments of the course</caption>
          <thead className={tableHeadClass}>
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">
                Started
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                What
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Labels
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/5">
            {shipments.length === 0 ? (
              <tr>
                <td colSpan={3} className="px-3 py-6 text-center text-ink-600">
                  No shipment yet. Ship a cohort to buy their labels.
                </td>
              </tr>
            ) : (
              shipments.map((shipment) => (
                <tr key={shipment.id}>
                  <td className="px-3 py-2">
                    <Link to={shipment.id} className="font-medium underline">
                      {formatDateTime(shipment.createdAt, timeZone, "medium")}
                    </Link>
                  </td>
                  <td className="px-3 py-2">{kindLabels[shipment.kind]}</td>
                  <td className="px-3 py-2">
                    {shipment.bought} of {shipment.total} bought{shipment.failed ? `, ${shipment.failed} failed` : ""}
                  </td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <Pager pageInfo={pageInfo} />
    </div>
  );
}

export function meta() {
  return [{ title: "Shipments · Benchpost" }];
}
