import type { Route } from "./+types/courses.$courseId.kits.tracking-template[.]csv";
import { csvResponse } from "~/lib/csv";
import { trackingTemplateCsv } from "~/lib/shipping/tracking-rows";
import { requireCourseRole } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return csvResponse("tracking-template.csv", trackingTemplateCsv);
}
