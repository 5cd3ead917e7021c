/**
 * A lab's marks for the institution's gradebook: one row per student of the viewer's cohorts (TAs
 * see theirs, instructors all), with generic columns, as the CSV download and the
 * `GET /api/v1/labs/:labId/marks` JSON give them. Every figure of a mark is of the version it was
 * marked on, which each row names beside the latest one, so a later hand-in never mixes in. Two
 * statements whatever the class size.
 */
import type { HandInStanding } from "~/lib/drop-logs/hand-in-window";
import { maxTotalOf } from "~/lib/marking/rubric";
import type { CourseAccess } from "~/server/auth/access.server";
import type { Executor } from "~/server/db.server";
import { deskRow, loadClassLabels, loadStudentMarkRows } from "./mark-rows.server";
import { assertMarkingStaff, markableCohortIds, type MarkingLab } from "./marking-lab.server";

/** The marks of a lab as plain JSON: the same fields in the CSV and the API. */
export type MarksJson = {
  lab: { id: string; courseId: string; title: string; releasedAt: string | null };
  maxTotal: number;
  criteria: { id: string; title: string; kind: "levels" | "range" | "auto"; maxPoints: number }[];
  marks: {
    membershipId: string;
    student: { name: string; email: string; studentNumber: string | null };
    cohort: { id: string; name: string };
    /**
     * Of the version the mark rests on (the counted one without a mark); with none, "not-due" while the
     * student's own due time is ahead and nothing is handed in, else "missing".
     */
    handIn: HandInStanding;
    late: boolean;
    /** The version the mark rests on; null without a mark or for a mark given with nothing handed in. */
    markedVersion: { id: string; number: number } | null;
    /** The latest handed-in version, null when nothing is handed in. */
    latestVersion: number | null;
    needsRemarking: boolean;
    /** Null for a student without a mark. */
    total: number | null;
    /** Every criterion has points. */
    complete: boolean;
    latePenaltyPoints: number;
    /** Points per criterion id; null where none are given or suggested. */
    points: Record<string, number | null>;
    feedback: string;
    markedBy: string | null;
    updatedAt: string | null;
    releasedAt: string | null;
    version: number;
  }[];
};

/** Every student's mark of the lab that the viewer may see, by name. Staff only. */
export async function loadMarksJson(
  executor: Executor,
  { access, lab, now = new Date() }: { access: CourseAccess; lab: MarkingLab; now?: Date },
): Promise<MarksJson> {
  await assertMarkingStaff(executor, access, lab);
  const [students, labels] = await Promise.all([
    loadStudentMarkRows(executor, lab, { cohortIds: markableCohortIds(access, lab), now }),
    loadClassLabels(executor, lab),
  ]);
  return {
    lab: { id: lab.id, courseId: lab.courseId, title: lab.title, releasedAt: lab.marking.releasedAt?.toISOString() ?? null },
    maxTotal: maxTotalOf(lab.rubric),
    criteria: lab.rubric.map((criterion) => ({
      id: criterion.id,
      title: criterion.title,
      kind: criterion.kind,
      maxPoints: criterion.maxPoints,
    })),
    marks: students.map((student) => {
      const row = deskRow(lab, student, labels);
      const basis = row.markedHandIn;
      return {
        membershipId: row.membershipId,
        student: { name: row.studentName, email: row.email, studentNumber: row.studentNumber },
        cohort: { id: row.cohortId, name: row.cohortName },
        // A mark given on nothing, with a hand-in since, stays "missing": that is what it was marked on.
        handIn: basis === null ? (row.status === "not-due" ? "not-due" : "missing") : basis.late ? "late" : "on-time",
        late: basis?.late ?? false,
        markedVersion: row.mark && basis ? { id: basis.versionId, number: basis.version } : null,
        latestVersion: row.handIn?.version ?? null,
        needsRemarking: row.needsRemarking,
        total: row.mark ? row.total : null,
        complete: row.mark !== null && row.complete,
        latePenaltyPoints: row.mark?.latePenaltyPoints ?? 0,
        points: Object.fromEntries(lab.rubric.map((criterion) => [criterion.id, row.mark ? row.cells[criterion.id].points : null])),
        feedback: row.mark?.feedback ?? "",
        markedBy: row.mark?.markedBy?.name ?? null,
        updatedAt: row.mark?.updatedAt ?? null,
        releasedAt: row.mark?.releasedAt ?? null,
        version: row.expectedVersion,
      };
    }),
  };
}
