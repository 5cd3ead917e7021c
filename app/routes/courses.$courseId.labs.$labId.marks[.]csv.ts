import type { Route } from "./+types/courses.$courseId.labs.$labId.marks[.]csv";
import { csvResponse, toCsv } from "~/lib/csv";
import { db } from "~/server/db.server";
import { loadMarkLines, type MarkLine } from "~/server/marking/mark-export.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { staffRoles } from "~/server/auth/access.server";

/** The lab's marks as a long table, one line per student and criterion (see `loadMarkLines`), formulas neutralised. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const lines = await loadMarkLines(db, { access, lab });
  const csv = toCsv<MarkLine>(lines, [
    { header: "cohort", value: (line) => line.cohort },
    { header: "student_number", value: (line) => line.studentNumber },
    { header: "student", value: (line) => line.student },
    { header: "email", value: (line) => line.email },
    { header: "hand_in", value: (line) => line.handIn },
    { header: "marked_version", value: (line) => line.markedVersion },
    { header: "line", value: (line) => line.line },
    { header: "criterion_no", value: (line) => line.position },
    { header: "criterion", value: (line) => line.criterion },
    { header: "level", value: (line) => line.level },
    { header: "level_description", value: (line) => line.levelDescription },
    { header: "points", value: (line) => line.points },
    { header: "out_of", value: (line) => line.outOf },
    { header: "scored", value: (line) => line.scored },
    { header: "marker", value: (line) => line.marker },
    { header: "released_at", value: (line) => line.releasedAt },
  ]);
  return csvResponse(`marks-${lab.title}.csv`, csv);
}
