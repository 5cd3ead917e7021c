/**
 * Re-reduction after a part correction on a real PostgreSQL: a re-measured fluid lot gives every
 * version that used it a new reduction revision with its cause, the job is queued with the change and
 * is idempotent, the class comparison is relabelled, the automatic criteria follow the new figure,
 * saved marks are flagged and not changed, and the lot's bias counts only the revised figures.
 */
import { and, asc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, comparisonLabels, dropLogVersions, marks, parts, reductionRevisions, rereductionRuns } from "~/db/schema";
import type { PartInput } from "~/lib/kits/part-input";
import type { CourseAccess } from "~/server/auth/access.server";
import { relabelLab } from "~/server/comparison/class-comparison.server";
import { listPartBias } from "~/server/comparison/part-quality.server";
import { db } from "~/server/db.server";
import { previewDropLog } from "~/server/drop-logs/hand-in.server";
import { updatePart } from "~/server/kits/parts.server";
import { runRereduction } from "~/server/kits/rereduce.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { loadModeration } from "~/server/marking/moderation.server";
import { saveMark } from "~/server/marking/marks.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let lotId: string;
const oldCalibration = [
  { temperatureC: 20, viscosityPaS: 1.41 },
  { temperatureC: 25, viscosityPaS: 0.94 },
];
const newCalibration = [
  { temperatureC: 20, viscosityPaS: 1.2 },
  { temperatureC: 25, viscosityPaS: 0.8 },
];
const lot = (calibration: typeof oldCalibration, label = "F-1"): PartInput => ({
  kind: "fluid_lot",
  label,
  notes: null,
  fluidName: "glycerol",
  densityKgM3: 1260,
  calibration,
});

function accessOf(actor: "instructor" | "ownStudent"): CourseAccess {
  const student = actor === "ownStudent";
  return {
    user: { id: fixture.userIds[actor], email: `${actor}@rr.example`, name: `Test ${actor}`, sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "rr-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds[actor], role: student ? "student" : "instructor", cohortId: student ? fixture.cohortId : null },
    cohortIds: student ? [fixture.cohortId] : [fixture.cohortId, fixture.otherCohortId],
  } as unknown as CourseAccess;
}

const currentVersion = async () => (await db.select().from(dropLogVersions).where(eq(dropLogVersions.dropLogId, fixture.dropLogId)))[0];

beforeAll(async () => {
  fixture = await createAccessFixture("rr");
  [{ id: lotId }] = await db
    .select({ id: parts.id })
    .from(parts)
    .where(and(eq(parts.courseId, fixture.courseId), eq(parts.label, "F-1")));
});

describe("a re-measured fluid lot", () => {
  it("revises every version that used it, relabels, re-suggests, flags marks without changing them, and is idempotent", async () => {
    const instructor = accessOf("instructor");
    const handedIn = await currentVersion();
    // Revision 1 was written at hand-in, with no cause.
    const first = await db.select().from(reductionRevisions).where(eq(reductionRevisions.versionId, handedIn.id));
    expect(first).toMatchObject([{ revision: 1, cause: null, normalisedFigure: handedIn.normalisedFigure }]);

    const lab = (await loadMarkingLab(db, fixture.courseId, fixture.labId))!;
    const rubric = await saveRubric(db, {
      access: instructor,
      lab,
      input: {
        criteria: [
          { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
          { kind: "auto", title: "Close to the reference", rule: "within_reference", maxPoints: 3, params: { tolerancePercent: 10 } },
        ],
      },
    });
    const discussion = rubric.find((criterion) => criterion.kind === "range")!;
    const automatic = rubric.find((criterion) => criterion.kind === "auto")!;
    const marked = await saveMark(db, {
      access: instructor,
      labId: fixture.labId,
      membershipId: fixture.membershipIds.ownStudent,
      expectedVersion: 0,
      change: { kind: "score", criterionId: discussion.id, points: 3 },
    });
    expect(marked.status).toBe("saved");
    const [markBefore] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, fixture.labId), eq(marks.membershipId, fixture.membershipIds.ownStudent)));
    expect(markBefore.reductionRevision).toBe(1);
    const suggestionBefore = marked.row.suggestions[automatic.id];

    await updatePart(db, {
      courseId: fixture.courseId,
      partId: lotId,
      actorId: fixture.userIds.instructor,
      input: lot(newCalibration),
      note: "viscometer re-run",
    });
    const [run] = await db.select().from(rereductionRuns).where(eq(rereductionRuns.partId, lotId));
    expect(run).toMatchObject({ total: 1, done: 0, finishedAt: null });
    // The job went in with the change, on the queue the worker reads.
    const jobs = await db.execute<{ id: string }>(
      sql`select id from pgboss.job where name = 'reduction-revision' and data ->> 'runId' = ${run.id}`,
    );
    expect(jobs.rows).toHaveLength(1);
    // Before the job, the lot's old figures no longer count towards its bias.
    expect((await listPartBias(db, fixture.courseId, lotId)).get(lotId)).toBeUndefined();

    const outcome = await runRereduction(db, run.id);
    expect(outcome).toMatchObject({ revised: 1, unreducible: [], labIds: [fixture.labId] });

    const revised = await currentVersion();
    // The figure is the one a hand-in of the same input gets against the corrected lot today.
    const today = await previewDropLog(db, { access: accessOf("ownStudent"), labId: fixture.labId, input: handedIn.input });
    expect(revised.currentRevision).toBe(2);
    expect(revised.normalisedFigure).toBeCloseTo(today.normalisedFigure!, 5);
    expect(revised.normalisedFigure).not.toBeCloseTo(handedIn.normalisedFigure!, 3);
    // What was handed in does not move.
    expect(revised.input).toEqual(handedIn.input);
    expect(revised.submittedAt).toEqual(handedIn.submittedAt);
    expect(
      (
        await db
          .select()
          .from(reductionRevisions)
          .where(eq(reductionRevisions.versionId, handedIn.id))
          .orderBy(asc(reductionRevisions.revision))
      )[0].reduction,
    ).toEqual(handedIn.reduction);

    const [second] = await db
      .select()
      .from(reductionRevisions)
      .where(and(eq(reductionRevisions.versionId, handedIn.id), eq(reductionRevisions.revision, 2)));
    expect(second.cause).toMatchObject({
      partId: lotId,
      partLabel: "F-1",
      changedById: fixture.userIds.instructor,
      changes: { calibration: { from: oldCalibration, to: newCalibration } },
    });

    // Relabelled with the new figure.
    expect(
      (await db.execute(sql`select 1 from pgboss.job where name = 'class-comparison-requested' and data ->> 'labId' = ${fixture.labId}`))
        .rows.length,
    ).toBeGreaterThan(0);
    await relabelLab(db, fixture.labId);
    const [label] = await db.select().from(comparisonLabels).where(eq(comparisonLabels.dropLogId, fixture.dropLogId));
    expect(label.figure).toBeCloseTo(revised.normalisedFigure!, 5);

    // The mark is flagged with both figures, not changed; the automatic criterion suggests from the new figure.
    const moderation = await loadModeration(db, { access: instructor, lab: (await loadMarkingLab(db, fixture.courseId, fixture.labId))! });
    const row = moderation.rows.find((entry) => entry.membershipId === fixture.membershipIds.ownStudent)!;
    expect(row.resultChangedSinceMarked).toMatchObject({ fromRevision: 1, toRevision: 2 });
    expect(row.resultChangedSinceMarked!.oldFigure).toBeCloseTo(handedIn.normalisedFigure!, 5);
    expect(row.resultChangedSinceMarked!.newFigure).toBeCloseTo(revised.normalisedFigure!, 5);
    expect(row.suggestions[automatic.id].reason).not.toBe(suggestionBefore.reason);
    expect(moderation.resultChanged).toMatchObject([{ membershipId: fixture.membershipIds.ownStudent, released: false }]);
    const [markAfter] = await db.select().from(marks).where(eq(marks.id, markBefore.id));
    expect(markAfter).toEqual(markBefore);
    expect(row.resultChangedSinceMarked!.reofferedCriterionIds).toEqual([]);
    // Once released (the automatic points written in as they were), the changed basis is listed for
    // the instructor's review, and the automatic criterion whose suggestion now differs is offered again.
    const newPoints = row.suggestions[automatic.id].points!;
    const releasedPoints = newPoints === 3 ? 0 : 3;
    await db
      .update(marks)
      .set({ releasedAt: new Date(), scores: { ...markBefore.scores, [automatic.id]: { points: releasedPoints, frozen: true } } })
      .where(eq(marks.id, markBefore.id));
    const afterRelease = await loadModeration(db, {
      access: instructor,
      lab: (await loadMarkingLab(db, fixture.courseId, fixture.labId))!,
    });
    expect(afterRelease.resultChanged).toMatchObject([{ membershipId: fixture.membershipIds.ownStudent, released: true, reoffered: 1 }]);
    const releasedRow = afterRelease.rows.find((entry) => entry.membershipId === fixture.membershipIds.ownStudent)!;
    expect(releasedRow.resultChangedSinceMarked!.reofferedCriterionIds).toEqual([automatic.id]);
    expect(releasedRow.cells[automatic.id].points).toBe(releasedPoints);
    await db.update(marks).set({ releasedAt: null, scores: markBefore.scores }).where(eq(marks.id, markBefore.id));

    // The lot's bias counts the revised figure again.
    const counted = (await listPartBias(db, fixture.courseId, lotId)).get(lotId)!.handIns;
    expect(counted).toHaveLength(1);
    expect(counted[0].figure).toBeCloseTo(revised.normalisedFigure!, 5);

    const audit = await db
      .select({ action: auditEvents.action })
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, fixture.courseId), eq(auditEvents.subject, `part:${lotId}`)));
    // The re-measurement itself, the revision queued, and the run that revised the versions.
    expect(audit.map((entry) => entry.action).sort()).toEqual(["part.changed", "part.rereduced", "part.rereduction_queued"]);

    // The job again, after it finished or as a retry of one that stopped before finishing: no second revision.
    expect(await runRereduction(db, run.id)).toMatchObject({ revised: 0 });
    await db.update(rereductionRuns).set({ finishedAt: null }).where(eq(rereductionRuns.id, run.id));
    expect(await runRereduction(db, run.id)).toMatchObject({ revised: 0 });
    expect(await db.select().from(reductionRevisions).where(eq(reductionRevisions.versionId, handedIn.id))).toHaveLength(2);
    expect((await db.select().from(rereductionRuns).where(eq(rereductionRuns.id, run.id)))[0]).toMatchObject({ done: 1, total: 1 });
  });

  it("rests a mark saved again on the current revision, which clears the flag", async () => {
    const instructor = accessOf("instructor");
    const lab = (await loadMarkingLab(db, fixture.courseId, fixture.labId))!;
    const discussion = lab.rubric.find((criterion) => criterion.kind === "range")!;
    const [mark] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, fixture.labId), eq(marks.membershipId, fixture.membershipIds.ownStudent)));
    const saved = await saveMark(db, {
      access: instructor,
      labId: fixture.labId,
      membershipId: fixture.membershipIds.ownStudent,
      expectedVersion: mark.version,
      change: { kind: "score", criterionId: discussion.id, points: 4 },
    });
    expect(saved.status === "saved" && saved.row.resultChangedSinceMarked).toBeNull();
    expect((await db.select().from(marks).where(eq(marks.id, mark.id)))[0].reductionRevision).toBe(2);
  });

  it("queues nothing when the change enters no reduction", async () => {
    await updatePart(db, {
      courseId: fixture.courseId,
      partId: lotId,
      actorId: fixture.userIds.instructor,
      input: { ...lot(newCalibration), notes: "bottle relabelled" },
    });
    expect(await db.select().from(rereductionRuns).where(eq(rereductionRuns.partId, lotId))).toHaveLength(1);
  });
});
