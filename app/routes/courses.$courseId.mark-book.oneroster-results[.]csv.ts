import type { Route } from "./+types/courses.$courseId.mark-book.oneroster-results[.]csv";
import { csvResponse } from "~/lib/csv";
import { markBookExportSearch } from "~/lib/marking/mark-book";
import { requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { readSearchParams } from "~/server/http.server";
import { exportMarkBook } from "~/server/marking/mark-book.server";

/** The released marks as a 1EdTech OneRoster 1.2 `results.csv` (see `exportMarkBook`), for the viewer's students; archived courses too. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const access = await requireCourseRole({ request, context }, params.courseId, staffRoles);
  const { sortParam: _sort, ...query } = readSearchParams(request, markBookExportSearch);
  const csv = await exportMarkBook(db, { access, layout: "oneroster-results", query, request });
  return csvResponse("results.csv", csv);
}
