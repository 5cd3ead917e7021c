/**
 * The marking desk on a real PostgreSQL: automatic criteria following the reduction, the desk's
 * constant statement count, bulk marking in one all-or-nothing transaction, edit conflicts, cohort
 * limits for TAs, moderation, release with one e-mail per student, what students see, the history and
 * the CSV export.
 */
import Papa from "papaparse";
import { RouterContextProvider } from "react-router";
import { AppError } from "~/lib/app-error";
import { and, count, eq, inArray, like, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  auditEvents,
  cohorts,
  courseMemberships,
  dropLogs,
  emailOutbox,
  labCohorts,
  labExtensions,
  labs,
  markChanges,
  marks,
  rubricCriteria,
  taCohortAssignments,
} from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { listFailedEmails } from "~/server/email/failed-emails.server";
import { handInDropLog, loadStudentLab } from "~/server/drop-logs/hand-in.server";
import { loadMarkLines, loadMarkSummary, loadMarksJson } from "~/server/marking/mark-export.server";
import { loadMarkingDesk, markingDeskSearch, selectedMembershipIds, type MarkingDeskFilters } from "~/server/marking/marking-desk.server";
import { loadMarkingLab, type MarkingLab } from "~/server/marking/marking-lab.server";
import { applyToMany, markingLock, saveMark, saveMarkCell } from "~/server/marking/marks.server";
import { listMarkChanges, loadModeration, markLabReady, releaseMarks } from "~/server/marking/moderation.server";
import { copyRubric, listRubricSources, saveRubric } from "~/server/marking/rubrics.server";
import { loadStudentMark } from "~/server/marking/student-mark.server";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { quietClass, rehandIn } from "../support/comparison-class";
import { countStatements } from "../support/count-statements";
import { seedMarkingClass } from "../support/marking-class";

let fixture: AccessFixture;
const day = 24 * 3600 * 1000;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
const page = (extra: Partial<MarkingDeskFilters> = {}): MarkingDeskFilters => ({ page: 1, pageSize: 50, ...extra });

/** Cohorts made for one test (their students are only that test's), marked by `assignedTa`. */
const extraCohorts: string[] = [];
async function freshCohort(name: string): Promise<string> {
  const [cohort] = await db.insert(cohorts).values({ courseId: fixture.courseId, name }).returning();
  await db.insert(taCohortAssignments).values({ membershipId: fixture.membershipIds.assignedTa, cohortId: cohort.id });
  extraCohorts.push(cohort.id);
  return cohort.id;
}
const activeStudents = async (cohortId: string) =>
  (
    await db
      .select({ n: count() })
      .from(courseMemberships)
      .where(
        and(eq(courseMemberships.cohortId, cohortId), eq(courseMemberships.role, "student"), sql`${courseMemberships.removedAt} is null`),
      )
  )[0].n;

type Person = "ownStudent" | "sameCohortStudent" | "otherCohortStudent" | "assignedTa" | "unassignedTa" | "instructor";
function accessOf(actor: Person): CourseAccess {
  const role = actor.endsWith("Student") ? "student" : actor === "instructor" ? "instructor" : "ta";
  const cohortIds =
    actor === "instructor"
      ? [fixture.cohortId, fixture.otherCohortId, ...extraCohorts]
      : actor === "assignedTa"
        ? [fixture.cohortId, ...extraCohorts]
        : actor === "ownStudent" || actor === "sameCohortStudent"
          ? [fixture.cohortId]
          : [fixture.otherCohortId];
  return {
    user: {
      id: fixture.userIds[actor],
      email: `${actor.toLowerCase()}@mk.example`,
      name: `Test ${actor}`,
      sessionId: null,
      via: "session",
    },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "mk-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds[actor], role, cohortId: role === "student" ? cohortIds[0] : null },
    cohortIds,
  } as unknown as CourseAccess;
}

/** A published drag lab, open now, for both cohorts unless told. */
async function newLab(title: string, { cohortIds = [fixture.cohortId, fixture.otherCohortId], requiredDrops = 10 } = {}) {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title,
      kind: "drag",
      status: "published",
      opensAt: new Date(Date.now() - day),
      dueAt: new Date(Date.now() + day),
      requiredDrops,
      resolutions,
    })
    .returning();
  await db.insert(labCohorts).values(cohortIds.map((cohortId) => ({ labId: lab.id, cohortId })));
  return lab;
}

/** A rubric with every kind of criterion: two levels criteria, a range and the four automatic rules. */
const fullRubric = {
  criteria: [
    {
      kind: "levels",
      title: "Set-up described",
      levels: [
        { points: 0, description: "Not described" },
        { points: 1, description: "Partly" },
        { points: 2, description: "Fully, with the photo" },
      ],
    },
    { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
    { kind: "auto", title: "Enough drops", rule: "required_drops", maxPoints: 2 },
    { kind: "auto", title: "Close to the reference", rule: "within_reference", maxPoints: 3, params: { tolerancePercent: 10 } },
    { kind: "auto", title: "Agrees with the class", rule: "not_outlier", maxPoints: 2, params: { suspectPoints: 1 } },
    { kind: "auto", title: "On time", rule: "on_time", maxPoints: 1, params: { latePenaltyPoints: 1 } },
  ],
};

async function labWithRubric(title: string, options?: Parameters<typeof newLab>[1]): Promise<MarkingLab> {
  const lab = await newLab(title, options);
  const bare = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
  await saveRubric(db, { access: accessOf("instructor"), lab: bare, input: fullRubric });
  return (await loadMarkingLab(db, fixture.courseId, lab.id))!;
}

const byTitle = (lab: MarkingLab, title: string) => lab.rubric.find((criterion) => criterion.title === title)!;
const markCount = async (labId: string) => (await db.select({ n: count() }).from(marks).where(eq(marks.labId, labId)))[0].n;
const changeCount = async (labId: string) => (await db.select({ n: count() }).from(markChanges).where(eq(markChanges.labId, labId)))[0].n;

async function refusal(work: Promise<unknown>): Promise<AppError> {
  const error = await work.then(
    () => null,
    (caught: unknown) => caught,
  );
  expect(error).toBeInstanceOf(AppError);
  return error as AppError;
}

beforeAll(async () => {
  fixture = await createAccessFixture("mk");
});

describe("automatic criteria", () => {
  it("follow the counted hand-in's reduction: its drop count, its figure against the reference and the class", async () => {
    const lab = await labWithRubric("Follows the reduction", { requiredDrops: 6 });
    const { membershipIds, dropLogIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: [...quietClass(20), 1.02],
      label: "follow",
    });
    const planted = membershipIds[20];
    const suggestionsOf = async (membershipId: string) => {
      const desk = await loadMarkingDesk(db, { access: accessOf("instructor"), lab, filters: page({ pageSize: 200 }) });
      const row = desk.rows.find((candidate) => candidate.membershipId === membershipId)!;
      return {
        row,
        points: Object.fromEntries(lab.rubric.filter((c) => c.kind === "auto").map((c) => [c.title, row.suggestions[c.id].points])),
      };
    };
    expect((await suggestionsOf(planted)).points).toEqual({
      "Enough drops": 2,
      "Close to the reference": 3,
      "Agrees with the class": 2,
      "On time": 1,
    });

    // The student hands in again with a figure 60 % above the reference: off the reference, and an outlier of the class.
    await rehandIn(db, dropLogIds[20], 1.6);
    const after = await suggestionsOf(planted);
    expect(after.points).toMatchObject({ "Close to the reference": 0, "Agrees with the class": 0 });
    expect(after.row.classLabel?.label).toBe("outlier");
    expect(after.row.flagged).toBe(true);

    // A real hand-in: the server's own reduction counts the drops.
    const handIn = (drops: number[], key: string) =>
      handInDropLog(db, {
        access: accessOf("ownStudent"),
        labId: lab.id,
        idempotencyKey: key,
        input: { sphereId: fixture.sphereId, temperatureC: 22, drops },
      });
    await handIn([7.41, 7.52, 7.47, 7.38, 7.5], "mk-follow-5-drops");
    let own = await suggestionsOf(fixture.membershipIds.ownStudent);
    expect(own.points["Enough drops"]).toBe(0);
    expect(own.row.suggestions[byTitle(lab, "Enough drops").id].reason).toMatch(/5 drops, fewer than the 6 required/);
    await handIn([7.41, 7.52, 7.47, 7.38, 7.5, 7.44, 7.49], "mk-follow-7-drops");
    own = await suggestionsOf(fixture.membershipIds.ownStudent);
    expect(own.points["Enough drops"]).toBe(2);
    expect(own.row.handIn?.dropCount).toBe(7);
  });

  it("are overridden only with a reason, and the total uses the override", async () => {
    const lab = await labWithRubric("Override");
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: quietClass(5),
      label: "override",
    });
    const drops = byTitle(lab, "Enough drops");
    const access = accessOf("assignedTa");
    const refused = await refusal(
      saveMarkCell(db, { access, labId: lab.id, membershipId: membershipIds[0], criterionId: drops.id, points: 1, expectedVersion: 0 }),
    );
    expect(refused.code).toBe("invalid_value");
    expect(await markCount(lab.id)).toBe(0);
    const saved = await saveMarkCell(db, {
      access,
      labId: lab.id,
      membershipId: membershipIds[0],
      criterionId: drops.id,
      points: 1,
      overrideReason: "Two drops were timed twice",
      expectedVersion: 0,
    });
    expect(saved.status).toBe("saved");
    if (saved.status !== "saved") return;
    expect(saved.row.cells[drops.id]).toMatchObject({ points: 1, source: "override", suggestion: { points: 2 } });
    // 1 (override) + 3 + 2 + 1 from the suggestions; the manual criteria have nothing yet.
    expect(saved.row.total).toBe(7);
    expect(saved.row.complete).toBe(false);
  });
});

describe("the marking desk", () => {
  it("keeps a student's class label on the row a save returns, also when no criterion uses the label", async () => {
    const lab = await newLab("Label after a save");
    await saveRubric(db, {
      access: accessOf("instructor"),
      lab: (await loadMarkingLab(db, fixture.courseId, lab.id))!,
      input: { criteria: [{ kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 }] },
    });
    const marking = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
    // A quiet class and one hand-in 60 % above it: an outlier of the class.
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: [...quietClass(20), 1.6],
      label: "kept-label",
    });
    const outlier = membershipIds[20];
    const access = accessOf("assignedTa");
    const desk = await loadMarkingDesk(db, { access, lab: marking, filters: page({ pageSize: 200 }) });
    const before = desk.rows.find((row) => row.membershipId === outlier)!;
    expect(before).toMatchObject({ classLabel: { label: "outlier" }, flagged: true });

    const discussion = byTitle(marking, "Discussion");
    const saved = await saveMarkCell(db, {
      access,
      labId: lab.id,
      membershipId: outlier,
      criterionId: discussion.id,
      points: 2,
      expectedVersion: 0,
    });
    expect(saved).toMatchObject({ status: "saved", row: { classLabel: before.classLabel, flagged: true } });
    // The answer to a stale save (a conflict) carries it too.
    const conflict = await saveMarkCell(db, {
      access,
      labId: lab.id,
      membershipId: outlier,
      criterionId: discussion.id,
      points: 3,
      expectedVersion: 0,
    });
    expect(conflict).toMatchObject({ status: "conflict", row: { classLabel: before.classLabel, flagged: true } });
  });

  it("runs the same number of SQL statements for 10 and for 1,000 students, and pages on the server", async () => {
    const statementsFor = async (size: number) => {
      const cohortId = await freshCohort(`Desk size ${size}`);
      const lab = await labWithRubric(`Desk size ${size}`, { cohortIds: [cohortId] });
      await seedMarkingClass(db, { courseId: fixture.courseId, labId: lab.id, cohortId, figures: quietClass(size), label: `desk${size}` });
      const { statements, result } = await countStatements(() =>
        loadMarkingDesk(db, {
          access: accessOf("assignedTa"),
          lab,
          filters: page({ page: 2, pageSize: 5, criterionId: byTitle(lab, "Set-up described").id }),
        }),
      );
      expect(result.totalRows).toBe(size);
      expect(result.rows).toHaveLength(5);
      expect(result.bands).toHaveLength(5);
      expect(result.pageCount).toBe(size / 5);
      // Every log is clean and of ten drops, so a manual criterion keeps the names' order: page 2 starts at the sixth.
      expect(result.rows[0].studentName).toBe(`desk${size} student ${String(5).padStart(4, "0")}`);
      expect(result.groups).toEqual([{ key: "clean", title: "Clean drop logs", membershipIds: result.matchingIds }]);
      return statements;
    };
    const small = await statementsFor(10);
    expect(small).toBeLessThanOrEqual(3);
    expect(await statementsFor(1000)).toBe(small);
  });

  it("marks one criterion at a time, in its order and bands, and filters by hand-in state on the server", async () => {
    const cohortId = await freshCohort("Filters");
    const lab = await labWithRubric("Filters", { cohortIds: [cohortId] });
    const { membershipIds, dropLogIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId,
      figures: quietClass(10),
      label: "filters",
      late: (index) => index < 3,
    });
    // Two of them never handed in: their drop logs have no counted version.
    await db
      .update(dropLogs)
      .set({ latestVersionId: null })
      .where(inArray(dropLogs.id, dropLogIds.slice(8)));
    const access = accessOf("assignedTa");
    const afterDue = new Date(lab.dueAt.getTime() + 60_000);
    const desk = (filters: Partial<MarkingDeskFilters>, now = afterDue) =>
      loadMarkingDesk(db, { access, lab, filters: page(filters), now });
    const ids = (found: { rows: { membershipId: string }[] }) => found.rows.map((row) => row.membershipId).sort();
    // Up to and including the due instant they may still hand in on time: awaited, not absent yet.
    const atDue = await desk({ status: "awaited" }, lab.dueAt);
    expect(ids(atDue)).toEqual(membershipIds.slice(8).sort());
    expect(atDue.counts).toMatchObject({ absent: 0, awaited: 2 });
    expect(ids(await desk({ status: "after-due" }))).toEqual(membershipIds.slice(0, 3).sort());
    expect(ids(await desk({ status: "absent" }))).toEqual(membershipIds.slice(8).sort());
    // A group or "every hand-in shown" reaches past the page: every late student, though a page holds two.
    expect((await desk({ status: "after-due", pageSize: 2 })).matchingIds.sort()).toEqual(membershipIds.slice(0, 3).sort());

    // Nothing scored yet: the desk opens on the first criterion.
    const discussion = byTitle(lab, "Discussion");
    expect((await desk({})).criterion?.id).toBe(byTitle(lab, "Set-up described").id);
    await applyToMany(db, {
      access,
      labId: lab.id,
      membershipIds: [membershipIds[5]],
      change: { kind: "score", criterionId: discussion.id, points: 4 },
    });
    const opened = await desk({});
    expect(opened.criteria.find((criterion) => criterion.id === discussion.id)).toMatchObject({ scored: 1, handedIn: 8 });
    expect(opened.counts).toEqual({
      all: 10,
      waiting: 8,
      awaited: 0,
      absent: 2,
      "after-due": 3,
      "to-score": 7,
      "part-scored": 1,
      scored: 0,
      relogged: 0,
      flagged: 0,
    });
    expect((await desk({ status: "part-scored" })).rows.map((row) => row.membershipId)).toEqual([membershipIds[5]]);
    // Scored on Discussion: the next-to-score list of that criterion passes them by.
    expect((await desk({ criterionId: discussion.id })).toMarkIds).not.toContain(membershipIds[5]);

    // The timing criterion lays the class out by timing: after the due time first, nothing handed in last.
    const onTime = await desk({ criterionId: byTitle(lab, "On time").id });
    expect(onTime.groups.map((group) => [group.key, [...group.membershipIds].sort()])).toEqual([
      ["after-due", membershipIds.slice(0, 3).sort()],
      ["in-time", membershipIds.slice(3, 8).sort()],
      ["nothing", membershipIds.slice(8).sort()],
    ]);
    expect(onTime.bands.slice(0, 4)).toEqual(["after-due", "after-due", "after-due", "in-time"]);

    // A criterion of another lab (or none at all) is a URL made by hand: refused.
    expect((await refusal(desk({ criterionId: "00000000-0000-4000-8000-000000000009" }))).code).toBe("invalid_value");
    const criterionId = discussion.id;
    expect(markingDeskSearch.parse({ criterion: criterionId, status: "after-due", page: "3", pageSize: "100" })).toEqual({
      criterionId,
      cohortId: undefined,
      status: "after-due",
      page: 3,
      pageSize: 100,
      studentId: undefined,
    });
  });
});

describe("the desk over HTTP", () => {
  it("serves one criterion's cards to the instructor, refuses a value the criterion cannot take, and applies a band in one bulk action", async () => {
    const cohortId = await freshCohort("Desk over HTTP");
    const lab = await labWithRubric("Desk over HTTP", { cohortIds: [cohortId] });
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId,
      figures: quietClass(6),
      label: "http-desk",
    });
    const handle = await createAppHandler();
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const discussion = byTitle(lab, "Discussion");
    const path = `/courses/${fixture.courseId}/labs/${lab.id}/marking`;
    const page = await handle(appRequest(`${path}?criterion=${discussion.id}`, { cookie }));
    expect(page.status).toBe(200);
    const html = (await page.text()).replaceAll("<!-- -->", "");
    // The ladder marks the criterion chosen; the cards come under their band, one per student.
    expect(html).toMatch(/<a[^>]*aria-current="step"[^>]*>(?:(?!<\/a>).)*Discussion/s);
    expect(html).toContain("Clean drop logs");
    expect(html.match(/<article /g)).toHaveLength(6);
    expect(html).not.toContain("<table");

    const post = async (body: unknown) =>
      handle(
        new Request(new URL(`${path}.data`, appOrigin()), {
          method: "POST",
          body: JSON.stringify(body),
          headers: { Cookie: cookie, Origin: appOrigin(), "Content-Type": "application/json" },
        }),
      );
    const change = (points: number) => ({ kind: "score", criterionId: discussion.id, points, level: null });
    const refused = await post({ intent: "save", membershipId: membershipIds[0], expectedVersion: 0, change: change(7) });
    expect(refused.status).toBe(400);
    expect(await refused.text()).toContain("Give between 0 and 4 points.");
    expect(await markCount(lab.id)).toBe(0);

    // The band by its key, as the desk names it: the server finds its students.
    const selection = { criterionId: discussion.id, cohortId: null, status: null, all: false, bands: ["clean"], ids: [], except: [] };
    const bulk = await post({ intent: "bulk", selection, change: change(3) });
    expect(bulk.status).toBe(200);
    expect(await markCount(lab.id)).toBe(6);
  });
});

describe("a bulk action", () => {
  it("applies a level to 500 students in one transaction, with the same statements as for 5", async () => {
    const lab = await labWithRubric("Bulk 500", { cohortIds: [fixture.cohortId] });
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: quietClass(505),
      label: "bulk",
    });
    const setUp = byTitle(lab, "Set-up described");
    const access = accessOf("assignedTa");
    const few = await countStatements(() =>
      applyToMany(db, {
        access,
        labId: lab.id,
        membershipIds: membershipIds.slice(500),
        change: { kind: "score", criterionId: setUp.id, level: 3 },
      }),
    );
    const many = await countStatements(() =>
      applyToMany(db, {
        access,
        labId: lab.id,
        membershipIds: membershipIds.slice(0, 500),
        change: { kind: "score", criterionId: setUp.id, level: 2 },
      }),
    );
    expect(many.result).toMatchObject({ changed: 500, unchanged: 0 });
    expect(many.statements).toBe(few.statements);

    const written = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), inArray(marks.membershipId, membershipIds.slice(0, 500))));
    expect(written).toHaveLength(500);
    expect(
      written.every(
        (mark) =>
          mark.scores[setUp.id]?.level === 2 && mark.scores[setUp.id]?.points === 1 && mark.markedById === fixture.userIds.assignedTa,
      ),
    ).toBe(true);
    // now() is the transaction's start: one value over all rows means one transaction wrote them.
    expect(new Set(written.map((mark) => mark.updatedAt.toISOString())).size).toBe(1);
    const history = await db
      .select()
      .from(markChanges)
      .where(and(eq(markChanges.labId, lab.id), eq(markChanges.source, "bulk")));
    expect(history).toHaveLength(505);
    expect(
      new Set(
        history
          .filter((change) => membershipIds.slice(0, 500).includes(change.membershipId))
          .map((change) => change.changedAt.toISOString()),
      ).size,
    ).toBe(1);

    // The same level again changes nothing and records nothing.
    expect(
      await applyToMany(db, {
        access,
        labId: lab.id,
        membershipIds: membershipIds.slice(0, 10),
        change: { kind: "score", criterionId: setUp.id, level: 2 },
      }),
    ).toMatchObject({ changed: 0, unchanged: 10 });
    expect(await changeCount(lab.id)).toBe(505);
  });

  it("is all or nothing: one student of another cohort, or an invalid value, refuses the whole batch", async () => {
    const lab = await labWithRubric("Bulk refused");
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: quietClass(499),
      label: "refused",
    });
    const setUp = byTitle(lab, "Set-up described");
    const access = accessOf("assignedTa");
    const snapshot = async () => ({ marks: await markCount(lab.id), changes: await changeCount(lab.id) });
    await applyToMany(db, {
      access,
      labId: lab.id,
      membershipIds: membershipIds.slice(0, 3),
      change: { kind: "score", criterionId: setUp.id, level: 1 },
    });
    const before = await snapshot();
    expect(before).toEqual({ marks: 3, changes: 3 });

    const deniedBefore = (
      await db
        .select({ n: count() })
        .from(auditEvents)
        .where(and(eq(auditEvents.action, "access.denied"), eq(auditEvents.actorId, fixture.userIds.assignedTa)))
    )[0].n;
    const outside = await refusal(
      applyToMany(db, {
        access,
        labId: lab.id,
        membershipIds: [...membershipIds, fixture.membershipIds.otherCohortStudent],
        change: { kind: "score", criterionId: setUp.id, level: 3 },
      }),
    );
    expect(outside.code).toBe("not_in_cohort");
    expect(outside.subjectIds).toEqual([fixture.membershipIds.otherCohortStudent]);
    expect(await snapshot()).toEqual(before);
    const deniedAfter = (
      await db
        .select({ n: count() })
        .from(auditEvents)
        .where(and(eq(auditEvents.action, "access.denied"), eq(auditEvents.actorId, fixture.userIds.assignedTa)))
    )[0].n;
    expect(deniedAfter).toBe(deniedBefore + 1);

    // Not a student at all (the instructor's own membership) is refused the same way.
    expect(
      (
        await refusal(
          applyToMany(db, {
            access: accessOf("instructor"),
            labId: lab.id,
            membershipIds: [...membershipIds, fixture.membershipIds.instructor],
            change: { kind: "latePenalty", points: 1 },
          }),
        )
      ).code,
    ).toBe("not_in_cohort");
    expect(
      (await refusal(applyToMany(db, { access, labId: lab.id, membershipIds, change: { kind: "score", criterionId: setUp.id, level: 4 } })))
        .code,
    ).toBe("invalid_value");
    expect(
      (await refusal(applyToMany(db, { access, labId: lab.id, membershipIds, change: { kind: "latePenalty", points: -2 } }))).code,
    ).toBe("invalid_value");
    expect(await snapshot()).toEqual(before);
    const levels = await db.select({ scores: marks.scores }).from(marks).where(eq(marks.labId, lab.id));
    expect(levels.every((mark) => mark.scores[setUp.id]?.level === 1)).toBe(true);
  });
});

describe("two people editing one mark", () => {
  it("get a conflict instead of overwriting each other", async () => {
    const lab = await labWithRubric("Conflict", { cohortIds: [fixture.cohortId] });
    const discussion = byTitle(lab, "Discussion");
    const membershipId = fixture.membershipIds.sameCohortStudent;
    const cell = (access: CourseAccess, points: number, expectedVersion: number) =>
      saveMarkCell(db, { access, labId: lab.id, membershipId, criterionId: discussion.id, points, expectedVersion });

    const first = await cell(accessOf("assignedTa"), 3, 0);
    expect(first).toMatchObject({ status: "saved", mark: { version: 1 } });
    // The instructor's page still shows the student unmarked (version 0).
    const second = await cell(accessOf("instructor"), 1, 0);
    expect(second.status).toBe("conflict");
    if (second.status === "conflict") expect(second.current).toMatchObject({ version: 1, scores: { [discussion.id]: { points: 3 } } });
    const [stored] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), eq(marks.membershipId, membershipId)));
    expect(stored.scores[discussion.id].points).toBe(3);

    // Two saves from version 1 at once: one is saved, the other is told.
    const outcomes = await Promise.all([cell(accessOf("assignedTa"), 2, 1), cell(accessOf("instructor"), 4, 1)]);
    expect(outcomes.map((outcome) => outcome.status).sort()).toEqual(["conflict", "saved"]);
    const [after] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), eq(marks.membershipId, membershipId)));
    expect(after.version).toBe(2);
    expect(after.scores[discussion.id].points).toBe(outcomes[0].status === "saved" ? 2 : 4);
    expect(await changeCount(lab.id)).toBe(2);
  });
});

describe("cohorts", () => {
  it("keep a TA to their own students: another cohort can be neither seen nor marked", async () => {
    const lab = await labWithRubric("Cohorts");
    const discussion = byTitle(lab, "Discussion");
    const ta = accessOf("assignedTa");
    const desk = await loadMarkingDesk(db, { access: ta, lab, filters: page({ pageSize: 200 }) });
    const seen = desk.rows.map((row) => row.membershipId);
    expect(seen).toEqual(expect.arrayContaining([fixture.membershipIds.ownStudent, fixture.membershipIds.sameCohortStudent]));
    expect(seen).not.toContain(fixture.membershipIds.otherCohortStudent);
    expect(desk.rows.every((row) => row.cohortId === fixture.cohortId)).toBe(true);
    expect(desk.cohorts.map((cohort) => cohort.id)).toEqual([fixture.cohortId]);
    // The addresses the desk makes name students too: "next after" another cohort's student opens none of
    // theirs, and a bulk "everything shown", even with that student named by hand, takes only the TA's own.
    const after = await loadMarkingDesk(db, { access: ta, lab, filters: page({ afterId: fixture.membershipIds.otherCohortStudent }) });
    expect(after.rows.map((row) => row.membershipId)).not.toContain(fixture.membershipIds.otherCohortStudent);
    expect(after.openId).not.toBe(fixture.membershipIds.otherCohortStudent);
    const chosen = selectedMembershipIds(desk, { all: true, bands: [], ids: [fixture.membershipIds.otherCohortStudent], except: [] });
    expect(chosen).toContain(fixture.membershipIds.ownStudent);
    expect(chosen).not.toContain(fixture.membershipIds.otherCohortStudent);
    // Filtering for another cohort is a URL made by hand: refused as bad input (400), nothing shown.
    expect(await refusal(loadMarkingDesk(db, { access: ta, lab, filters: page({ cohortId: fixture.otherCohortId }) }))).toMatchObject({
      code: "invalid_value",
      status: 400,
    });
    const refused = await refusal(
      saveMarkCell(db, {
        access: ta,
        labId: lab.id,
        membershipId: fixture.membershipIds.otherCohortStudent,
        criterionId: discussion.id,
        points: 2,
        expectedVersion: 0,
      }),
    );
    expect(refused).toMatchObject({ code: "not_in_cohort", status: 403 });
    expect(await markCount(lab.id)).toBe(0);
    // The instructor sees both cohorts.
    const all = await loadMarkingDesk(db, { access: accessOf("instructor"), lab, filters: page({ cohortId: fixture.otherCohortId }) });
    expect(all.rows.map((row) => row.membershipId)).toContain(fixture.membershipIds.otherCohortStudent);

    // A TA of none of the lab's cohorts gets nothing; students never mark.
    const onlyCohortOne = await labWithRubric("Cohort one only", { cohortIds: [fixture.cohortId] });
    expect((await refusal(loadMarkingDesk(db, { access: accessOf("unassignedTa"), lab: onlyCohortOne, filters: page() }))).code).toBe(
      "not_in_cohort",
    );
    expect((await refusal(loadMarkingDesk(db, { access: accessOf("ownStudent"), lab, filters: page() }))).code).toBe("forbidden");
    expect(
      (
        await refusal(
          saveMarkCell(db, {
            access: accessOf("ownStudent"),
            labId: lab.id,
            membershipId: fixture.membershipIds.ownStudent,
            criterionId: discussion.id,
            points: 4,
            expectedVersion: 0,
          }),
        )
      ).code,
    ).toBe("forbidden");
  });
});

describe("moderation and release", () => {
  it("summarises each TA's marks, lets only instructors adjust with a reason, and keeps every change", async () => {
    const lab = await labWithRubric("Moderation");
    const { membershipIds: cohortOne } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: quietClass(3),
      label: "mod1",
    });
    const { membershipIds: cohortTwo } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.otherCohortId,
      figures: quietClass(2),
      label: "mod2",
    });
    const discussion = byTitle(lab, "Discussion");
    const discussionPoints = [0, 2, 4];
    for (const [index, membershipId] of cohortOne.entries()) {
      await saveMarkCell(db, {
        access: accessOf("assignedTa"),
        labId: lab.id,
        membershipId,
        criterionId: discussion.id,
        points: discussionPoints[index],
        expectedVersion: 0,
      });
    }
    for (const membershipId of cohortTwo)
      await saveMarkCell(db, {
        access: accessOf("unassignedTa"),
        labId: lab.id,
        membershipId,
        criterionId: discussion.id,
        points: 1,
        expectedVersion: 0,
      });

    const moderation = await loadModeration(db, { access: accessOf("instructor"), lab });
    // Each seeded hand-in: 2 + 3 + 2 + 1 = 8 suggested, plus the discussion points.
    const assigned = moderation.markers.find((entry) => entry.marker?.id === fixture.userIds.assignedTa)!;
    // Worked by hand: totals 8, 10, 12; the sample standard deviation (n − 1) is √((4 + 0 + 4) / 2) = 2.
    expect(assigned).toMatchObject({ count: 3, mean: 10, standardDeviation: 2, min: 8, max: 12 });
    const other = moderation.markers.find((entry) => entry.marker?.id === fixture.userIds.unassignedTa)!;
    expect(other).toMatchObject({ count: 2, mean: 9, standardDeviation: 0 });
    expect(assigned.histogram.reduce((sum, n) => sum + n, 0)).toBe(3);
    expect(moderation.overall.count).toBe(5);
    const students = (await activeStudents(fixture.cohortId)) + (await activeStudents(fixture.otherCohortId));
    expect(moderation.progress).toEqual({ unmarked: students - 5, partial: 5, marked: 0 });
    expect((await refusal(loadModeration(db, { access: accessOf("assignedTa"), lab }))).code).toBe("instructors_only");

    const target = cohortOne[0];
    const adjust = (access: CourseAccess, reason?: string) =>
      saveMark(db, {
        access,
        labId: lab.id,
        membershipId: target,
        expectedVersion: 1,
        source: "moderation",
        reason,
        change: { kind: "score", criterionId: discussion.id, points: 1 },
      });
    expect((await refusal(adjust(accessOf("assignedTa"), "I am a TA"))).code).toBe("instructors_only");
    expect((await refusal(adjust(accessOf("instructor")))).code).toBe("reason_required");
    const adjusted = await adjust(accessOf("instructor"), "In line with the other cohort's discussion marks");
    expect(adjusted).toMatchObject({ status: "saved", row: { total: 9 } });
    const [stored] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), eq(marks.membershipId, target)));
    expect(stored).toMatchObject({ markedById: fixture.userIds.assignedTa, moderatedById: fixture.userIds.instructor, total: 9 });

    const history = await listMarkChanges(db, { access: accessOf("instructor"), labId: lab.id, membershipId: target });
    expect(history.map((entry) => entry.source)).toEqual(["moderation", "desk"]);
    expect(history[0]).toMatchObject({
      reason: "In line with the other cohort's discussion marks",
      changedBy: { id: fixture.userIds.instructor },
      old: { total: 8 },
      new: { total: 9 },
    });
    expect((await refusal(listMarkChanges(db, { access: accessOf("assignedTa"), labId: lab.id }))).code).toBe("instructors_only");
  });

  it("e-mails each student once however often the marks are released, and shows students nothing before", async () => {
    const lab = await labWithRubric("Release", { cohortIds: [fixture.cohortId] });
    const setUp = byTitle(lab, "Set-up described");
    const discussion = byTitle(lab, "Discussion");
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      figures: quietClass(4),
      label: "release",
    });
    const ta = accessOf("assignedTa");
    const instructor = accessOf("instructor");
    // Handed in before it is marked: the mark rests on this version.
    await handInDropLog(db, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      idempotencyKey: "mk-release-hand-in",
      input: { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
    });
    await applyToMany(db, {
      access: ta,
      labId: lab.id,
      membershipIds: [...membershipIds.slice(0, 3), fixture.membershipIds.ownStudent],
      change: { kind: "score", criterionId: setUp.id, level: 3 },
    });
    await applyToMany(db, {
      access: ta,
      labId: lab.id,
      membershipIds: [fixture.membershipIds.ownStudent],
      change: { kind: "feedback", text: "Clear photo; say which band you started the watch at." },
    });
    const outbox = () =>
      db
        .select()
        .from(emailOutbox)
        .where(like(emailOutbox.dedupeKey, `marks-released:${lab.id}:%`));
    // Every mark lacks the discussion: all partly marked, so whom to release matters.
    const all = { scope: "all", zeroForNoHandIn: false, whileOpen: true } as const;

    expect(await loadStudentMark(db, { access: accessOf("ownStudent"), labId: lab.id })).toBeNull();
    expect((await refusal(releaseMarks(db, { access: instructor, lab, choice: all }))).code).toBe("not_ready");
    expect((await refusal(markLabReady(db, { access: ta, lab }))).code).toBe("instructors_only");
    await markLabReady(db, { access: instructor, lab });
    // Ready: TAs no longer change marks; the instructor still may.
    expect(
      (
        await refusal(
          saveMarkCell(db, {
            access: ta,
            labId: lab.id,
            membershipId: membershipIds[0],
            criterionId: discussion.id,
            points: 1,
            expectedVersion: 1,
          }),
        )
      ).code,
    ).toBe("marking_closed");
    expect(await loadStudentMark(db, { access: accessOf("ownStudent"), labId: lab.id })).toBeNull();

    expect(await releaseMarks(db, { access: instructor, lab, choice: all })).toMatchObject({
      released: 4,
      zeros: 0,
      emailed: 4,
      withheld: (await activeStudents(fixture.cohortId)) - 4,
    });
    const sent = await outbox();
    expect(sent.map((row) => row.toAddress)).toContain("ownstudent@mk.example");
    expect(sent).toHaveLength(4);
    expect(sent.every((row) => row.template === "marks-released" && row.courseId === fixture.courseId)).toBe(true);
    expect(await releaseMarks(db, { access: instructor, lab, choice: all })).toMatchObject({ released: 0, emailed: 0, alreadyReleased: 4 });
    expect(await outbox()).toHaveLength(4);

    // A student marked after the first release is e-mailed by the next one, and nobody else again.
    await saveMarkCell(db, {
      access: instructor,
      labId: lab.id,
      membershipId: membershipIds[3],
      criterionId: setUp.id,
      level: 1,
      expectedVersion: 0,
    });
    // A student who handed in nothing (and still may) gets nothing released, even with a mark.
    await saveMarkCell(db, {
      access: instructor,
      labId: lab.id,
      membershipId: fixture.membershipIds.sameCohortStudent,
      criterionId: setUp.id,
      level: 1,
      expectedVersion: 0,
    });
    expect(await releaseMarks(db, { access: instructor, lab, choice: { ...all, zeroForNoHandIn: true } })).toMatchObject({
      released: 1,
      zeros: 0,
      emailed: 1,
    });
    const again = await outbox();
    expect(again).toHaveLength(5);
    expect(new Set(again.map((row) => row.toAddress)).size).toBe(5);
    expect(again.map((row) => row.toAddress)).not.toContain("samecohortstudent@mk.example");

    const seen = (await loadStudentMark(db, { access: accessOf("ownStudent"), labId: lab.id }))!;
    // The fixture's hand-in: 5 drops (fewer than 10), on time; 2 for the set-up.
    expect(seen).toMatchObject({
      feedback: "Clear photo; say which band you started the watch at.",
      changedAfterRelease: null,
      basedOn: { dropCount: 5, late: false },
    });
    expect(seen.criteria.find((criterion) => criterion.title === "Set-up described")).toMatchObject({
      points: 2,
      level: { number: 3, description: "Fully, with the photo" },
    });
    expect(seen.criteria.find((criterion) => criterion.title === "Enough drops")).toMatchObject({ points: 0, automatic: true });
    expect(seen.total).toBe(seen.criteria.reduce((sum, criterion) => sum + (criterion.points ?? 0), 0));

    // A released mark changes only with a reason, which the student is shown.
    const change = { kind: "score" as const, criterionId: discussion.id, points: 3 };
    expect(
      (
        await refusal(
          saveMark(db, { access: instructor, labId: lab.id, membershipId: fixture.membershipIds.ownStudent, expectedVersion: 2, change }),
        )
      ).code,
    ).toBe("reason_required");
    await saveMark(db, {
      access: instructor,
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      expectedVersion: 2,
      change,
      reason: "The discussion had been missed",
    });
    const changed = (await loadStudentMark(db, { access: accessOf("ownStudent"), labId: lab.id }))!;
    expect(changed.total).toBe(seen.total + 3);
    expect(changed.changedAfterRelease).toMatchObject({
      releasedTotal: seen.total,
      changes: [{ reason: "The discussion had been missed", oldTotal: seen.total, newTotal: seen.total + 3 }],
    });
    // Another student's mark stays theirs; staff cannot read a mark as a student.
    expect(await loadStudentMark(db, { access: accessOf("otherCohortStudent"), labId: lab.id })).toBeNull();
    expect((await refusal(loadStudentMark(db, { access: instructor, labId: lab.id }))).code).toBe("forbidden");
  });

  it("keeps a released mark's automatic points when the class changes afterwards", async () => {
    const cohortId = await freshCohort("Frozen");
    const lab = await labWithRubric("Frozen", { cohortIds: [cohortId] });
    const { membershipIds, dropLogIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId,
      figures: [...quietClass(12), 1.3],
      label: "frozen",
    });
    const instructor = accessOf("instructor");
    const setUp = byTitle(lab, "Set-up described");
    await applyToMany(db, { access: instructor, labId: lab.id, membershipIds, change: { kind: "score", criterionId: setUp.id, level: 2 } });
    await markLabReady(db, { access: instructor, lab });
    await releaseMarks(db, { access: instructor, lab, choice: { scope: "all", zeroForNoHandIn: false, whileOpen: true } });
    const classCriterion = byTitle(lab, "Agrees with the class");
    const before = await loadMarkingDesk(db, { access: instructor, lab, filters: page() });
    const planted = before.rows.find((row) => row.membershipId === membershipIds[12])!;
    expect(planted.cells[classCriterion.id]).toMatchObject({ points: 0, source: "released" });
    // The others re-hand in near 1.3: the planted figure is no longer an outlier, but its released points stay.
    for (const [index, dropLogId] of dropLogIds.slice(0, 12).entries()) await rehandIn(db, dropLogId, 1.28 + index * 0.003);
    const after = await loadMarkingDesk(db, { access: instructor, lab, filters: page() });
    const row = after.rows.find((candidate) => candidate.membershipId === membershipIds[12])!;
    expect(row.suggestions[classCriterion.id].points).toBe(2);
    expect(row.cells[classCriterion.id]).toMatchObject({ points: 0, source: "released" });
    expect(row.total).toBe(planted.total);
  });
});

describe("the rubric", () => {
  it("keeps its criteria's ids (and scores) when edited, and is copied to another lab with new ids", async () => {
    const lab = await labWithRubric("Rubric source");
    const discussion = byTitle(lab, "Discussion");
    await saveMarkCell(db, {
      access: accessOf("instructor"),
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      criterionId: discussion.id,
      points: 3,
      expectedVersion: 0,
    });
    const edited = await saveRubric(db, {
      access: accessOf("instructor"),
      lab,
      input: {
        criteria: [
          { id: discussion.id, kind: "range", title: "Discussion of the result", minPoints: 0, maxPoints: 5 },
          fullRubric.criteria[0],
        ],
      },
    });
    expect(edited.map((criterion) => criterion.title)).toEqual(["Discussion of the result", "Set-up described"]);
    expect(edited[0].id).toBe(discussion.id);
    const reread = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
    const desk = await loadMarkingDesk(db, { access: accessOf("instructor"), lab: reread, filters: page() });
    expect(desk.rows.find((row) => row.membershipId === fixture.membershipIds.ownStudent)!.cells[discussion.id].points).toBe(3);
    expect((await refusal(saveRubric(db, { access: accessOf("assignedTa"), lab: reread, input: fullRubric }))).code).toBe(
      "instructors_only",
    );

    const target = await newLab("Rubric target");
    // The copy offer lists the labs that have a rubric, with their number of criteria (it once counted 0 for every lab).
    const sources = await listRubricSources(db, { access: accessOf("instructor"), labId: target.id });
    expect(sources.find((source) => source.labId === lab.id)?.criteria).toBe(2);
    expect(sources.some((source) => source.labId === target.id)).toBe(false);
    const copied = await copyRubric(db, { access: accessOf("instructor"), lab: { id: target.id }, fromLabId: lab.id });
    expect(copied.map((criterion) => criterion.title)).toEqual(["Discussion of the result", "Set-up described"]);
    expect(copied.every((criterion) => !edited.some((original) => original.id === criterion.id))).toBe(true);
    expect((await db.select({ n: count() }).from(rubricCriteria).where(eq(rubricCriteria.labId, target.id)))[0].n).toBe(2);
    // The source has marks now: copying over it is refused.
    expect((await refusal(copyRubric(db, { access: accessOf("instructor"), lab: { id: lab.id }, fromLabId: target.id }))).code).toBe(
      "rubric_locked",
    );
  });

  it("is saved from the rubric form's field list, typed numbers as typed, with a refusal at its criterion's field", async () => {
    const lab = await newLab("Rubric over HTTP");
    const handle = await createAppHandler();
    const post = async (fields: Record<string, string>) =>
      handle(
        new Request(new URL(`/courses/${fixture.courseId}/labs/${lab.id}/rubric.data`, appOrigin()), {
          method: "POST",
          body: new URLSearchParams(fields),
          headers: { Cookie: await sessionCookieFor(fixture.userIds.instructor), Origin: appOrigin() },
        }),
      );
    const form = {
      intent: "save",
      "criteria[0].kind": "levels",
      "criteria[0].title": "Method",
      "criteria[0].levels[0].points": "0",
      "criteria[0].levels[0].description": "Not described",
      "criteria[0].levels[1].points": "2,5",
      "criteria[0].levels[1].description": "Fully",
      "criteria[1].kind": "range",
      "criteria[1].title": "Discussion",
      "criteria[1].minPoints": "5",
      "criteria[1].maxPoints": "2",
    };
    const refused = await post(form);
    expect(refused.status).toBe(400);
    const text = await refused.text();
    expect(text).toContain("criteria[1].maxPoints");
    expect(text).toContain("The maximum must be above the minimum.");
    expect(text).toContain("Not described");
    expect((await db.select({ n: count() }).from(rubricCriteria).where(eq(rubricCriteria.labId, lab.id)))[0].n).toBe(0);

    expect((await post({ ...form, "criteria[1].maxPoints": "6" })).status).toBe(200);
    const saved = (await loadMarkingLab(db, fixture.courseId, lab.id))!.rubric;
    expect(saved.map(({ title, kind, minPoints, maxPoints }) => ({ title, kind, minPoints, maxPoints }))).toEqual([
      { title: "Method", kind: "levels", minPoints: 0, maxPoints: 2.5 },
      { title: "Discussion", kind: "range", minPoints: 5, maxPoints: 6 },
    ]);
  });
});

describe("the marks CSVs", () => {
  /** A CSV route's rows as records, read back with the project's CSV parser; the BOM is dropped. */
  async function csvRows(route: "marks" | "marks-summary", labId: string) {
    const { loader } =
      route === "marks"
        ? await import("~/routes/courses.$courseId.labs.$labId.marks[.]csv")
        : await import("~/routes/courses.$courseId.labs.$labId.marks-summary[.]csv");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const response = (await loader({
      request: appRequest(`/courses/${fixture.courseId}/labs/${labId}/${route}.csv`, { cookie }),
      params: { courseId: fixture.courseId, labId },
      context: new RouterContextProvider(),
    } as never)) as Response;
    expect(response.headers.get("content-type")).toMatch(/^text\/csv/);
    const text = (await response.text()).replace(/^\uFEFF/, "");
    const parsed = Papa.parse<Record<string, string>>(text, { header: true, skipEmptyLines: true });
    return { header: text.split(/\r?\n/)[0], rows: parsed.data };
  }

  it("give one line per student and criterion with the late penalty as a line of its own, a summary sheet, and neutralise formulas", async () => {
    const lab = await newLab("Export");
    const bare = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
    await saveRubric(db, {
      access: accessOf("instructor"),
      lab: bare,
      input: {
        criteria: [
          {
            kind: "levels",
            title: "Method",
            levels: [
              { points: 0, description: "Not described" },
              { points: 2, description: "-Fully" },
            ],
          },
          { kind: "range", title: "=SUM(A1:A9)", minPoints: 0, maxPoints: 5 },
          { kind: "auto", title: "On time", rule: "on_time", maxPoints: 1 },
        ],
      },
    });
    const marked = (await loadMarkingLab(db, fixture.courseId, lab.id))!;
    await db.execute(
      sql`update users set name = '=HYPERLINK("http://evil.example","x")', student_number = '+4420' where id = ${fixture.userIds.sameCohortStudent}`,
    );
    const membershipId = fixture.membershipIds.sameCohortStudent;
    const instructor = accessOf("instructor");
    await saveMarkCell(db, {
      access: instructor,
      labId: lab.id,
      membershipId,
      criterionId: marked.rubric[1].id,
      points: 4,
      expectedVersion: 0,
    });
    await saveMarkCell(db, {
      access: instructor,
      labId: lab.id,
      membershipId,
      criterionId: marked.rubric[0].id,
      level: 2,
      expectedVersion: 1,
    });
    await saveMark(db, {
      access: instructor,
      labId: lab.id,
      membershipId,
      expectedVersion: 2,
      change: { kind: "latePenalty", points: 0.5 },
    });

    const { header, rows } = await csvRows("marks", lab.id);
    expect(header).toBe(
      "cohort,student_number,student,email,hand_in,marked_version,line,criterion_no,criterion,level,level_description,points,out_of,scored,marker,released_at",
    );
    const students = new Set(rows.map((row) => row.email));
    // Every student: one line per criterion; the marked one has a late-penalty line too.
    expect(rows).toHaveLength(students.size * 3 + 1);
    const own = rows.filter((row) => row.student.includes("HYPERLINK"));
    expect(
      own.map((row) => [row.line, row.criterion_no, row.criterion, row.level, row.level_description, row.points, row.out_of, row.scored]),
    ).toEqual([
      ["criterion", "1", "Method", "2", "'-Fully", "2", "2", "by hand"],
      ["criterion", "2", "'=SUM(A1:A9)", "", "", "4", "5", "by hand"],
      // Nothing handed in: the automatic criterion gives 0.
      ["criterion", "3", "On time", "", "", "0", "1", "automatic"],
      ["late penalty", "", "", "", "", "-0.5", "", "by hand"],
    ]);
    expect(own.every((row) => row.student === `'=HYPERLINK("http://evil.example","x")` && row.student_number === "'+4420")).toBe(true);
    expect(own.every((row) => row.cohort === "Cohort one" && row.hand_in === "Awaited" && row.marker === "Test instructor")).toBe(true);
    // A student's points add up to their total.
    expect(own.reduce((sum, row) => sum + Number(row.points), 0)).toBe(5.5);
    const unmarked = rows.filter((row) => row.student === "Test ownStudent");
    expect(unmarked.map((row) => [row.points, row.scored])).toEqual([
      ["", "not scored"],
      ["", "not scored"],
      ["", "not scored"],
    ]);

    const summary = await csvRows("marks-summary", lab.id);
    expect(summary.header).toBe("section,subject,measure,value");
    const figure = (section: string, subject: string, measure: string) =>
      summary.rows.find((row) => row.section === section && row.subject === subject && row.measure === measure)?.value;
    expect(figure("hand-ins", "all cohorts", "students")).toBe(String(students.size));
    // Nobody has handed in this lab, which is due tomorrow.
    expect(figure("hand-ins", "all cohorts", "Awaited")).toBe(String(students.size));
    expect(figure("hand-ins", "all cohorts", "On time")).toBe("0");
    expect(figure("criterion", "1. Method", "scored")).toBe("1");
    expect(figure("criterion", "1. Method", "not scored")).toBe(String(students.size - 1));
    expect(figure("criterion", "1. Method", "level 1: Not described")).toBe("0");
    expect(figure("criterion", "1. Method", "level 2: -Fully")).toBe("1");
    expect(figure("criterion", "2. =SUM(A1:A9)", "mean points")).toBe("4");
    expect(figure("totals", "Cohort one", "marked")).toBe("1");
    expect(figure("totals", "all cohorts", "mean total")).toBe("5.5");
    expect(figure("totals", "Cohort two", "mean total")).toBe("");
    await db.execute(
      sql`update users set name = 'Test sameCohortStudent', student_number = null where id = ${fixture.userIds.sameCohortStudent}`,
    );
  });

  it("run the same number of SQL statements for 10 and for 100 students", async () => {
    const statementsFor = async (size: number) => {
      const cohortId = await freshCohort(`Export size ${size}`);
      const lab = await labWithRubric(`Export size ${size}`, { cohortIds: [cohortId] });
      await seedMarkingClass(db, {
        courseId: fixture.courseId,
        labId: lab.id,
        cohortId,
        figures: quietClass(size),
        label: `export${size}`,
      });
      const access = accessOf("instructor");
      const lines = await countStatements(() => loadMarkLines(db, { access, lab }));
      const summary = await countStatements(() => loadMarkSummary(db, { access, lab }));
      expect(lines.result).toHaveLength(size * lab.rubric.length);
      expect(
        summary.result.find((line) => line.section === "hand-ins" && line.subject === "all cohorts" && line.measure === "students")?.value,
      ).toBe(size);
      return [lines.statements, summary.statements];
    };
    expect(await statementsFor(100)).toEqual(await statementsFor(10));
  });
});

describe("release safeguards", () => {
  const hour = 3600 * 1000;
  const releaseAll = { scope: "all", zeroForNoHandIn: false, whileOpen: true } as const;

  it("asks whom to release, gives a zero for no hand-in only when chosen, and warns while an extension is still ahead", async () => {
    const cohortId = await freshCohort("Release choices");
    const lab = await labWithRubric("Release choices", { cohortIds: [cohortId] });
    const { membershipIds, dropLogIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId,
      figures: quietClass(6),
      label: "choices",
    });
    const [full1, full2, partly, unmarked, nothing, extended] = membershipIds;
    // Two of them handed in nothing (their drop logs hold no version that counts); the lab's own window has closed.
    await db.execute(sql`update drop_logs set latest_version_id = null where id in (${dropLogIds[4]}, ${dropLogIds[5]})`);
    await db
      .update(labs)
      .set({ dueAt: new Date(Date.now() - 2 * hour), lateCutoffAt: null })
      .where(eq(labs.id, lab.id));
    // One of them has an extension two days ahead: the lab still takes a hand-in from them.
    const extendedUntil = new Date(Date.now() + 2 * day);
    await db.insert(labExtensions).values({ labId: lab.id, membershipId: extended, dueAt: extendedUntil, reason: "Kit arrived late" });
    const instructor = accessOf("instructor");
    for (const membershipId of [full1, full2, partly]) {
      await saveMarkCell(db, {
        access: instructor,
        labId: lab.id,
        membershipId,
        criterionId: byTitle(lab, "Set-up described").id,
        level: 3,
        expectedVersion: 0,
      });
    }
    for (const membershipId of [full1, full2]) {
      await saveMarkCell(db, {
        access: instructor,
        labId: lab.id,
        membershipId,
        criterionId: byTitle(lab, "Discussion").id,
        points: 3,
        expectedVersion: 1,
      });
    }
    await markLabReady(db, { access: instructor, lab });

    const { release } = await loadModeration(db, { access: instructor, lab });
    expect(release.counts).toEqual({
      released: 0,
      "fully-marked": 2,
      "partly-marked": 1,
      "marked-on-earlier-version": 0,
      "not-marked": 1,
      "no-hand-in": 1,
      "no-hand-in-still-open": 1,
    });
    expect(release.stillOpen).toEqual({ students: 1, until: extendedUntil.toISOString() });
    expect(release.afterReleaseHandIns).toBe("refuse");

    // While anyone may still hand in, release waits for the instructor to say so; nothing is written.
    const open = await refusal(
      releaseMarks(db, { access: instructor, lab, choice: { scope: "marked", zeroForNoHandIn: false, whileOpen: false } }),
    );
    expect(open).toMatchObject({ code: "still_open", status: 409 });
    expect(open.message).toContain("1 student may still hand in");
    expect(
      (
        await db
          .select()
          .from(marks)
          .where(and(eq(marks.labId, lab.id), sql`${marks.releasedAt} is not null`))
      ).length,
    ).toBe(0);

    // The fully marked students only.
    expect(
      await releaseMarks(db, { access: instructor, lab, choice: { scope: "marked", zeroForNoHandIn: false, whileOpen: true } }),
    ).toMatchObject({ released: 2, zeros: 0, emailed: 2, withheld: 4, stillOpen: 1 });
    const releasedIds = async () =>
      (
        await db
          .select({ membershipId: marks.membershipId })
          .from(marks)
          .where(and(eq(marks.labId, lab.id), sql`${marks.releasedAt} is not null`))
      )
        .map((row) => row.membershipId)
        .sort();
    expect(await releasedIds()).toEqual([full1, full2].sort());

    // Then everyone marked, and a zero for the student whose window closed with nothing handed in; never for the extended one.
    expect(
      await releaseMarks(db, { access: instructor, lab, choice: { scope: "all", zeroForNoHandIn: true, whileOpen: true } }),
    ).toMatchObject({ released: 2, zeros: 1, emailed: 2, alreadyReleased: 2, withheld: 2 });
    expect(await releasedIds()).toEqual([full1, full2, partly, nothing].sort());
    const [zero] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), eq(marks.membershipId, nothing)));
    expect(zero).toMatchObject({ total: 0, dropLogVersionId: null, feedback: "Nothing was handed in for this lab." });
    expect(zero.releasedSnapshot).toMatchObject({ total: 0, dropLogVersionId: null });
    const [zeroChange] = await db.select().from(markChanges).where(eq(markChanges.markId, zero.id));
    expect(zeroChange).toMatchObject({
      source: "moderation",
      reason: "Released as zero: nothing was handed in.",
      changedById: fixture.userIds.instructor,
    });
    expect(
      await db
        .select()
        .from(marks)
        .where(and(eq(marks.labId, lab.id), inArray(marks.membershipId, [unmarked, extended]))),
    ).toEqual([]);
    expect(
      await db
        .select()
        .from(emailOutbox)
        .where(like(emailOutbox.dedupeKey, `marks-released:${lab.id}:%`)),
    ).toHaveLength(4);

    // A cohort's extension opens the lab again for all of its students; the student's own extension still decides for them.
    const cohortUntil = new Date(Date.now() + 3 * day);
    await db
      .insert(labExtensions)
      .values({ labId: lab.id, cohortId, dueAt: new Date(Date.now() + day), lateCutoffAt: cohortUntil, reason: "Kits shipped late" });
    expect((await loadModeration(db, { access: instructor, lab })).release.stillOpen).toEqual({
      students: 6,
      until: cohortUntil.toISOString(),
    });
  });

  it("on the moderation page, needs a choice of whom to release and keeps it when the release must be confirmed", async () => {
    const lab = await labWithRubric("Release form", { cohortIds: [fixture.cohortId] });
    await markLabReady(db, { access: accessOf("instructor"), lab });
    const { action } = await import("~/routes/courses.$courseId.labs.$labId.moderation");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const post = async (form: Record<string, string>) => {
      const request = appRequest(`/courses/${fixture.courseId}/labs/${lab.id}/moderation`, { cookie, form });
      // A refusal comes back as `data(…, { status })`, a success as the plain object.
      const result = (await action({
        request,
        params: { courseId: fixture.courseId, labId: lab.id },
        context: new RouterContextProvider(),
      } as never)) as Record<string, unknown>;
      const refused = result.type === "DataWithResponseInit";
      return { status: refused ? (result.init as { status: number }).status : 200, data: refused ? result.data : result };
    };
    const unchosen = await post({ intent: "release" });
    expect(unchosen).toMatchObject({
      status: 400,
      data: { status: "error", error: { scope: [expect.stringContaining("Choose whom to release")] } },
    });
    // The lab is open until tomorrow: the release waits for the confirmation, and the form keeps the choice.
    const unconfirmed = await post({ intent: "release", scope: "all", zeroForNoHandIn: "on" });
    expect(unconfirmed).toMatchObject({
      status: 409,
      data: { error: { whileOpen: [expect.stringContaining("may still hand in")] }, initialValue: { scope: "all", zeroForNoHandIn: "on" } },
    });
    const confirmed = await post({ intent: "release", scope: "all", whileOpen: "on" });
    expect(confirmed).toMatchObject({ status: 200, data: { done: expect.stringMatching(/^Released \d+ marks? and queued/) } });
  });

  it("releases every mark and e-mails the rest when one student's name has quotes and another's address is unusable", async () => {
    const cohortId = await freshCohort("Release awkward names");
    const lab = await labWithRubric("Release awkward names", { cohortIds: [cohortId] });
    const { membershipIds } = await seedMarkingClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId,
      figures: quietClass(3),
      label: "awkward",
    });
    const [quoted, unusable, plain] = membershipIds;
    const userOf = (membershipId: string) => sql`(select user_id from course_memberships where id = ${membershipId})`;
    await db.execute(sql`update users set name = 'Ann "Nan" <Lee>' where id = ${userOf(quoted)}`);
    // An address stored before addresses were checked as strictly: its message cannot be sent.
    await db.execute(sql`update users set email = 'no-at-sign.awkward' where id = ${userOf(unusable)}`);
    await applyToMany(db, {
      access: accessOf("instructor"),
      labId: lab.id,
      membershipIds,
      change: { kind: "score", criterionId: byTitle(lab, "Set-up described").id, level: 2 },
    });
    await markLabReady(db, { access: accessOf("instructor"), lab });

    expect(await releaseMarks(db, { access: accessOf("instructor"), lab, choice: releaseAll })).toMatchObject({ released: 3, emailed: 2 });
    const rows = await db
      .select()
      .from(emailOutbox)
      .where(like(emailOutbox.dedupeKey, `marks-released:${lab.id}:%`));
    const byMember = (membershipId: string) => rows.find((row) => row.dedupeKey === `marks-released:${lab.id}:${membershipId}`)!;
    expect(byMember(quoted)).toMatchObject({ status: "queued", toName: 'Ann "Nan" <Lee>' });
    expect(byMember(plain)).toMatchObject({ status: "queued" });
    expect(byMember(unusable)).toMatchObject({
      status: "failed",
      toAddress: "no-at-sign.awkward",
      lastError: expect.stringContaining("to: not a valid e-mail address"),
    });
    // The instructors see the message that could not go.
    expect((await listFailedEmails(fixture.courseId)).map((email) => email.id)).toContain(byMember(unusable).id);
  });

  it("runs the same statements releasing 5 or 300 students", async () => {
    const statementsFor = async (size: number) => {
      const cohortId = await freshCohort(`Release ${size}`);
      const lab = await labWithRubric(`Release ${size}`, { cohortIds: [cohortId] });
      const { membershipIds } = await seedMarkingClass(db, {
        courseId: fixture.courseId,
        labId: lab.id,
        cohortId,
        figures: quietClass(size),
        label: `release-${size}`,
      });
      // One student handed in nothing, and the lab's window has closed: they get a zero.
      await db.execute(sql`update drop_logs set latest_version_id = null where membership_id = ${membershipIds[0]} and lab_id = ${lab.id}`);
      await db
        .update(labs)
        .set({ dueAt: new Date(Date.now() - hour), lateCutoffAt: null })
        .where(eq(labs.id, lab.id));
      await applyToMany(db, {
        access: accessOf("instructor"),
        labId: lab.id,
        membershipIds: membershipIds.slice(1),
        change: { kind: "score", criterionId: byTitle(lab, "Set-up described").id, level: 2 },
      });
      await markLabReady(db, { access: accessOf("instructor"), lab });
      const { statements, result } = await countStatements(() =>
        releaseMarks(db, { access: accessOf("instructor"), lab, choice: { ...releaseAll, zeroForNoHandIn: true } }),
      );
      expect(result).toMatchObject({ released: size, zeros: 1, emailed: size, stillOpen: 0 });
      return statements;
    };
    expect(await statementsFor(300)).toBe(await statementsFor(5));
  });

  it("refuses a hand-in after release by default, through the form's server function and the API", async () => {
    const lab = await labWithRubric("After release: refuse", { cohortIds: [fixture.cohortId] });
    const student = accessOf("ownStudent");
    const input = { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] };
    await handInDropLog(db, { access: student, labId: lab.id, idempotencyKey: "mk-refuse-1", input });
    await saveMarkCell(db, {
      access: accessOf("instructor"),
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      criterionId: byTitle(lab, "Discussion").id,
      points: 2,
      expectedVersion: 0,
    });
    expect((await loadStudentLab(db, student, lab.id)).afterRelease).toBeNull();
    await markLabReady(db, { access: accessOf("instructor"), lab });
    await releaseMarks(db, { access: accessOf("instructor"), lab, choice: releaseAll });

    // The lab page knows before the student tries.
    expect((await loadStudentLab(db, student, lab.id)).afterRelease).toBe("refuse");
    const refused = await handInDropLog(db, { access: student, labId: lab.id, idempotencyKey: "mk-refuse-2", input }).catch(
      (error: unknown) => error,
    );
    expect(refused).toBeInstanceOf(AppError);
    expect(refused).toMatchObject({ code: "mark_released", status: 409 });
    // A retry of the hand-in already stored still answers with it.
    expect(await handInDropLog(db, { access: student, labId: lab.id, idempotencyKey: "mk-refuse-1", input })).toMatchObject({
      duplicate: true,
      version: { version: 1 },
    });

    const { action } = await import("~/routes/api/v1.labs.$labId.drop-logs");
    const cookie = await sessionCookieFor(fixture.userIds.ownStudent);
    const request = new Request(appRequest(`/api/v1/labs/${lab.id}/drop-logs`).url, {
      method: "POST",
      headers: {
        Cookie: cookie,
        Origin: new URL(appRequest("/").url).origin,
        "Content-Type": "application/json",
        "Idempotency-Key": "mk-refuse-api",
      },
      body: JSON.stringify(input),
    });
    const response = (await action({ request, params: { labId: lab.id }, context: new RouterContextProvider() } as never)) as Response;
    expect(response.status).toBe(409);
    expect(await response.json()).toMatchObject({ error: { code: "mark_released" } });
    const [dropLog] = await db
      .select()
      .from(dropLogs)
      .where(and(eq(dropLogs.labId, lab.id), eq(dropLogs.membershipId, fixture.membershipIds.ownStudent)));
    expect((await db.execute(sql`select count(*)::int as n from drop_log_versions where drop_log_id = ${dropLog.id}`)).rows[0]).toEqual({
      n: 1,
    });
  });

  it("makes a hand-in that arrives during a release wait for it, and then refuses it", async () => {
    const lab = await labWithRubric("After release: race", { cohortIds: [fixture.cohortId] });
    const student = accessOf("ownStudent");
    const input = { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] };
    await handInDropLog(db, { access: student, labId: lab.id, idempotencyKey: "mk-race-1", input });
    await saveMarkCell(db, {
      access: accessOf("instructor"),
      labId: lab.id,
      membershipId: fixture.membershipIds.ownStudent,
      criterionId: byTitle(lab, "Discussion").id,
      points: 2,
      expectedVersion: 0,
    });
    // A release holding the lab's marking lock, as `releaseMarks` does, that has written the mark but not committed.
    let finish!: () => void;
    let written!: () => void;
    const wrote = new Promise<void>((resolve) => (written = resolve));
    const releasing = db.transaction(async (tx) => {
      await tx.execute(markingLock(lab.id, "exclusive"));
      await tx.execute(sql`update marks set released_at = now() where lab_id = ${lab.id}`);
      written();
      await new Promise<void>((resolve) => (finish = resolve));
    });
    await wrote;
    const handIn = handInDropLog(db, { access: student, labId: lab.id, idempotencyKey: "mk-race-2", input }).catch(
      (error: unknown) => error,
    );
    const settled = await Promise.race([handIn.then(() => "settled"), new Promise((resolve) => setTimeout(() => resolve("waiting"), 300))]);
    expect(settled).toBe("waiting");
    finish();
    await releasing;
    expect(await handIn).toMatchObject({ code: "mark_released" });
    const [dropLog] = await db
      .select()
      .from(dropLogs)
      .where(and(eq(dropLogs.labId, lab.id), eq(dropLogs.membershipId, fixture.membershipIds.ownStudent)));
    expect((await db.execute(sql`select count(*)::int as n from drop_log_versions where drop_log_id = ${dropLog.id}`)).rows[0]).toEqual({
      n: 1,
    });
  });

  it("with 'reopen' takes the hand-in and reopens the mark, which, like the export, stays on the version marked until it is marked again", async () => {
    const lab = await labWithRubric("After release: reopen", { cohortIds: [fixture.cohortId] });
    await db.update(labs).set({ afterReleaseHandIns: "reopen" }).where(eq(labs.id, lab.id));
    const student = accessOf("ownStudent");
    const instructor = accessOf("instructor");
    const membershipId = fixture.membershipIds.ownStudent;
    // Version 1: 5 drops, fewer than the 10 required, on time.
    await handInDropLog(db, {
      access: student,
      labId: lab.id,
      idempotencyKey: "mk-reopen-1",
      input: { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5] },
    });
    await saveMarkCell(db, {
      access: instructor,
      labId: lab.id,
      membershipId,
      criterionId: byTitle(lab, "Discussion").id,
      points: 2,
      expectedVersion: 0,
    });
    await markLabReady(db, { access: instructor, lab });
    await releaseMarks(db, { access: instructor, lab, choice: releaseAll });
    const [released] = await db
      .select()
      .from(marks)
      .where(and(eq(marks.labId, lab.id), eq(marks.membershipId, membershipId)));
    expect(released.reopenedAt).toBeNull();
    expect((await loadStudentLab(db, student, lab.id)).afterRelease).toBe("reopen");

    // Version 2, after the due time (late), with the 10 drops.
    await db
      .update(labs)
      .set({ dueAt: new Date(Date.now() - hour), lateCutoffAt: new Date(Date.now() + day) })
      .where(eq(labs.id, lab.id));
    const second = await handInDropLog(db, {
      access: student,
      labId: lab.id,
      idempotencyKey: "mk-reopen-2",
      input: { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.41, 7.52, 7.47, 7.38, 7.5, 7.44, 7.49, 7.42, 7.46, 7.51] },
    });
    expect(second.version).toMatchObject({ version: 2, late: true });
    const [reopened] = await db.select().from(marks).where(eq(marks.id, released.id));
    expect(reopened.reopenedAt).not.toBeNull();
    expect(reopened.dropLogVersionId).toBe(released.dropLogVersionId);
    expect(reopened.version).toBe(released.version);

    const enough = byTitle(lab, "Enough drops");
    const desk = await loadMarkingDesk(db, { access: instructor, lab, filters: page() });
    const row = desk.rows.find((candidate) => candidate.membershipId === membershipId)!;
    expect(row).toMatchObject({
      needsRemarking: true,
      handInChangedSinceMarked: true,
      markedHandIn: { version: 1, late: false, dropCount: 5 },
      handIn: { version: 2, late: true },
    });
    // The automatic criteria read the version marked: 5 drops, so no points for "Enough drops".
    expect(row.suggestions[enough.id].points).toBe(0);
    expect((await loadModeration(db, { access: instructor, lab })).needsRemarking).toBe(1);

    // The export names the version marked and the latest, and every figure is the marked one's.
    const exported = (await loadMarksJson(db, { access: instructor, lab })).marks.find((entry) => entry.membershipId === membershipId)!;
    expect(exported).toMatchObject({
      handIn: "on-time",
      late: false,
      markedVersion: { id: released.dropLogVersionId, number: 1 },
      latestVersion: 2,
      needsRemarking: true,
    });
    expect(exported.points[enough.id]).toBe(0);

    // Marking it again (a released mark: with a reason) moves it onto version 2 and freezes the automatic points from it.
    const remarked = await saveMark(db, {
      access: instructor,
      labId: lab.id,
      membershipId,
      expectedVersion: reopened.version,
      change: { kind: "score", criterionId: byTitle(lab, "Discussion").id, points: 2 },
      reason: "Marked again on version 2",
    });
    expect(remarked).toMatchObject({
      status: "saved",
      changed: true,
      row: { needsRemarking: false, handInChangedSinceMarked: false, markedHandIn: { version: 2 } },
    });
    const [after] = await db.select().from(marks).where(eq(marks.id, released.id));
    expect(after).toMatchObject({ reopenedAt: null, dropLogVersionId: second.version.id });
    expect(after.scores[enough.id]).toEqual({ points: 2, frozen: true });
    // The on-time criterion now reads the late version 2: 1 point off (the rubric's late penalty).
    expect(after.scores[byTitle(lab, "On time").id]).toEqual({ points: 0, frozen: true });
    const seen = (await loadStudentMark(db, { access: student, labId: lab.id }))!;
    expect(seen.basedOn).toMatchObject({ version: 2, dropCount: 10, late: true });
    expect(seen.changedAfterRelease?.changes[0]).toMatchObject({ reason: "Marked again on version 2" });
  });
});
