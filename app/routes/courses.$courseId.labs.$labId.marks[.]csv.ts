import type { Route } from "./+types/courses.$courseId.labs.$labId.marks[.]csv";
import { csvResponse, neutraliseCell, toCsv } from "~/lib/csv";
import { db } from "~/server/db.server";
import { loadMarksJson, type MarksJson } from "~/server/marking/mark-export.server";
import { requireLabAccess } from "~/server/labs/lab-access.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { staffRoles } from "~/server/auth/access.server";

type Row = MarksJson["marks"][number];

/** The lab's marks for a spreadsheet or gradebook, one row per student, formulas neutralised. */
export async function loader({ request, context, params }: Route.LoaderArgs) {
  const { access, lab } = await requireLabAccess({ request, context }, params, staffRoles, loadMarkingLab);
  const marks = await loadMarksJson(db, { access, lab });
  const csv = toCsv<Row>(marks.marks, [
    { header: "student_name", value: (row) => row.student.name },
    { header: "email", value: (row) => row.student.email },
    { header: "student_number", value: (row) => row.student.studentNumber },
    { header: "cohort", value: (row) => row.cohort.name },
    { header: "total", value: (row) => row.total },
    // A criterion's title is typed by an instructor: as a header it is neutralised like any cell.
    ...marks.criteria.map((criterion) => ({ header: neutraliseCell(criterion.title), value: (row: Row) => row.points[criterion.id] })),
    { header: "late", value: (row) => (row.late ? "yes" : "no") },
    { header: "late_penalty", value: (row) => (row.total === null ? null : row.latePenaltyPoints) },
    { header: "released_at", value: (row) => row.releasedAt },
    // Last, so a gradebook import set up for the columns above keeps working: which version was marked.
    { header: "marked_version", value: (row) => row.markedVersion?.number ?? null },
    { header: "latest_version", value: (row) => row.latestVersion },
  ]);
  return csvResponse(`marks-${lab.title}.csv`, csv);
}
