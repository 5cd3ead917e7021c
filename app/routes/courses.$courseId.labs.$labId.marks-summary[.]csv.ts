import type { Route } from "./+types/courses.$courseId.labs.$labId.marks-summary[.]csv";
import { csvResponse, toCsv } from "~/lib/csv";
import { db } from "~/server/db.server";
import { loadMarkSummary, type SummaryLine } from "~/server/marking/mark-export.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { staffRoles } from "~/server/auth/access.server";

/** The summary sheet of the lab's marks (see `loadMarkSummary`): hand-ins, criteria and totals, one figure a line. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const lines = await loadMarkSummary(db, { access, lab });
  const csv = toCsv<SummaryLine>(lines, [
    { header: "section", value: (line) => line.section },
    { header: "subject", value: (line) => line.subject },
    { header: "measure", value: (line) => line.measure },
    { header: "value", value: (line) => line.value },
  ]);
  return csvResponse(`marks-summary-${lab.title}.csv`, csv);
}
