import { data } from "react-router";
import type { Route } from "./+types/courses.$courseId.shipments.$shipmentId.print[.]pdf";
import { isEntityId } from "~/lib/forms/ids";
import { requireCourseRole } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { shipmentPrintPdf } from "~/server/shipping/print.server";

/** Every label and packing slip of a shipment as one PDF, one page per kit: the instructors' (it shows addresses). */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  const pdf = isEntityId(params.shipmentId)
    ? await shipmentPrintPdf(db, { course: access.course, shipmentId: params.shipmentId, actorId: access.user.id, request })
    : null;
  if (!pdf) throw data("Not found", { status: 404 });
  return new Response(Buffer.from(pdf), {
    headers: {
      "Content-Type": "application/pdf",
      "Content-Length": String(pdf.byteLength),
      "Content-Disposition": `inline; filename="shipment-${params.shipmentId}.pdf"`,
      "X-Content-Type-Options": "nosniff",
      // Addresses: never kept by a shared cache or the browser's.
      "Cache-Control": "no-store",
    },
  });
}
