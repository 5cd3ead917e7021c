import type { Route } from "./+types/courses.$courseId.roster-template[.]csv";
import { csvResponse } from "~/lib/csv";
import { rosterTemplateCsv } from "~/lib/roster/roster-rows";
import { requireCourseRole } from "~/server/auth/access.server";

export async function loader({ request, context, params }: Route.LoaderArgs) {
  await requireCourseRole({ request, context }, params.courseId, ["instructor"]);
  return csvResponse("roster-template.csv", rosterTemplateCsv);
}
