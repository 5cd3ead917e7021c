import type { Route } from "./+types/courses.$courseId.parts.template[.]csv";
import { csvResponse } from "~/lib/csv";
import { templateCsv } from "~/lib/kits/parts-csv";
import { requireCourseRole } from "~/server/auth/access.server";

/** The import template: the columns in order, with one example row per part kind. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return csvResponse("benchpost-parts-template.csv", templateCsv());
}
