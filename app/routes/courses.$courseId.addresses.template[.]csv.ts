import type { Route } from "./+types/courses.$courseId.addresses.template[.]csv";
import { csvResponse } from "~/lib/csv";
import { requireCourseRole } from "~/server/auth/access.server";
import { addressTemplateCsv } from "~/lib/shipping/address-import";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return csvResponse("addresses-template.csv", addressTemplateCsv);
}
