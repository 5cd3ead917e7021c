import { useEffect } from "react";
import { data, Form, Link, useNavigation, useRevalidator } from "react-router";
import { z } from "zod";
import type { Route } from "./+types/courses.$courseId.shipments.$shipmentId";
import { Button } from "~/components/ui/button";
import { Pager } from "~/components/ui/data-table";
import { Notice } from "~/components/ui/notice";
import { PageHeader } from "~/components/ui/page-header";
import { tableHeadClass } from "~/components/ui/table-head";
import { formatDateTime } from "~/lib/format-date";
import { isEntityId } from "~/lib/forms/ids";
import { pagingSearch } from "~/lib/forms/search-params";
import { parseSubmission, replyFor } from "~/lib/forms/submission";
import { labelFailureLabels } from "~/lib/shipping/shipping-states";
import { recordAudit } from "~/server/audit.server";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { formAction } from "~/server/errors.server";
import { readSearchParams } from "~/server/http.server";
import { getShipment, retryFailedItems } from "~/server/shipping/shipments.server";
import { counted } from "~/lib/plural";

const retry = z.object({ intent: z.literal("retry-failed") });
const shipmentSearch = z.object(pagingSearch(50));

/** How often the page asks for news while labels are being bought. */
const REFRESH_SECONDS = 3;

export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const { page, size } = readSearchParams(request, shipmentSearch);
  const shipment = isEntityId(params.shipmentId)
    ? await getShipment(db, { courseId: access.course.id, shipmentId: params.shipmentId, page, pageSize: size })
    : null;
  if (!shipment) throw data("Not found", { status: 404 });
  return {
    courseId: access.course.id,
    timeZone: access.course.timeZone,
    shipment,
    pageInfo: { page, pageSize: size, total: shipment.total },
  };
}

export const action = formAction(async ({ request, context, params, formData }: Route.ActionArgs & { formData: FormData }) => {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const submission = parseSubmission(formData, retry);
  if (submission.status !== "success") return data(submission.reply(), { status: 400 });
  if (!isEntityId(params.shipmentId)) throw data("Not found", { status: 404 });
  const retried = await retryFailedItems(db, { courseId: access.course.id, shipmentId: params.shipmentId });
  await recordAudit(db, {
    action: "shipment.retried",
    actorId: access.user.id,
    courseId: access.course.id,
    subject: params.shipmentId,
    detail: retried,
    request,
  });
  return retried;
});

const kindTitles = { outbound: "Kits to students", return: "Return labels", replacement: "Replacement parts" } as const;

export default function Shipment({ loaderData, actionData }: Route.ComponentProps) {
  const { courseId, timeZone, shipment, pageInfo } = loaderData;
  const navigation = useNavigation();
  const revalidator = useRevalidator();
  const working = shipment.queued + shipment.buying > 0;
  useEffect(() => {
    if (!working) return;
    const timer = setInterval(() => {
      if (revalidator.state === "idle") void revalidator.revalidate();
    }, REFRESH_SECONDS * 1000);
    return () => clearInterval(timer);
  }, [working, revalidator]);
  const retried = actionData && "requeued" in actionData ? actionData : null;
  const refusal = replyFor(actionData, "retry-failed");
  return (
    <div className="flex flex-col gap-4">
      {/* Without JavaScript the page reloads itself while labels are being bought. */}
      {working ? (
        <noscript>
          <meta httpEquiv="refresh" content={String(REFRESH_SECONDS)} />
        </noscript>
      ) : null}
      <PageHeader
        title={`${kindTitles[shipment.kind]}, ${formatDateTime(shipment.createdAt, timeZone, "medium")}`}
        trail={[{ to: `/courses/${courseId}/shipments`, label: "Shipments" }]}
        actions={
          <a
            href={`/courses/${courseId}/shipments/${shipment.id}/print.pdf`}
            className="rounded-md px-4 py-2 text-sm ring-1 ring-ink-900/20"
            download
          >
            Print slips and labels
          </a>
        }
      />
      <p role="status" className="text-lg">
        {shipment.bought} of {counted(shipment.total, "label", "labels")} bought
        {shipment.failed ? `, ${shipment.failed} failed` : ""}
        {working ? ` — buying the other ${shipment.queued + shipment.buying}…` : "."}
      </p>
      {retried ? (
        <Notice tone={retried.requeued ? "success" : "info"}>
          {retried.requeued ? `${retried.requeued} labels queued again.` : "No label queued again."}
          {retried.waitingForAddress ? ` ${retried.waitingForAddress} wait for their student's address to be fixed first.` : ""}
        </Notice>
      ) : null}
      {refusal?.error ? <Notice tone="error">{Object.values(refusal.error).flat().join(" ")}</Notice> : null}
      {shipment.failed ? (
        <Form method="post">
          <input type="hidden" name="intent" value="retry-failed" />
          <Button type="submit" variant="secondary" disabled={navigation.state !== "idle"}>
            Retry failed
          </Button>
        </Form>
      ) : null}
      <div role="region" aria-label="Labels" tabIndex={0} className="overflow-x-auto rounded-lg bg-white shadow-sm ring-1 ring-ink-900/10">
        <table className="min-w-full text-left text-sm">
          <caption className="sr-only">Each kit's label</caption>
          <thead className={tableHeadClass}>
            <tr>
              <th scope="col" className="px-3 py-2 font-medium">
                Kit
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Student
              </th>
              <th scope="col" className="px-3 py-2 font-medium">
                Label
              </th>
            </tr>
          </thead>
          <tbody className="divide-y divide-ink-900/5">
            {shipment.items.map((item) => (
              <tr key={item.id}>
                <td className="px-3 py-2">
                  <Link to={`/courses/${courseId}/kits/${item.kitId}`} className="font-medium underline">
                    {item.kitNumber}
                  </Link>
                </td>
                <td className="px-3 py-2">{item.studentName ?? "—"}</td>
                <td className="px-3 py-2">
                  {item.status === "bought" ? (
                    `${item.carrier} ${item.service}, tracking ${item.trackingNumber}`
                  ) : item.status === "failed" ? (
                    <span className="text-outlier">
                      <span className="font-medium">{item.errorCode ? labelFailureLabels[item.errorCode] : "Failed"}:</span>{" "}
                      {item.errorMessage}
                    </span>
                  ) : item.status === "buying" ? (
                    "Buying…"
                  ) : (
                    "Waiting to be bought"
                  )}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <Pager pageInfo={pageInfo} />
    </div>
  );
}

export function meta() {
  return [{ title: "Shipment · Benchpost" }];
}
