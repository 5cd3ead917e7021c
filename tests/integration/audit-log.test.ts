/**
 * The course's audit log as the instructor reads it: each event a sentence that names its lab, part,
 * kit, cohort or student, never a stored code, an id or a blob of detail; the actions that were not
 * logged before (a part recorded or changed, kit moves, a new cohort, an adjusted mark); and the same
 * number of statements for a short and a long log.
 */
import { eq } from "drizzle-orm";
import { RouterContextProvider } from "react-router";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, kits } from "~/db/schema";
import { requireCourseRole } from "~/server/auth/access.server";
import { addCohort } from "~/server/courses/courses.server";
import { db } from "~/server/db.server";
import { moveKits } from "~/server/kits/kits.server";
import { createPart, setPartStatus } from "~/server/kits/parts.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { saveMark, saveMarkCell } from "~/server/marking/marks.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let handle: AppHandler;
let cookie: string;

beforeAll(async () => {
  fixture = await createAccessFixture("audit-log");
  handle = await createAppHandler();
  cookie = await sessionCookieFor(fixture.userIds.instructor);
});

/** The log's table, as text: the page around it (links, its data) carries ids by design. */
async function auditTable() {
  const response = await handle(appRequest(`/courses/${fixture.courseId}/audit`, { cookie }));
  expect(response.status).toBe(200);
  const html = (await response.text()).replaceAll("<!-- -->", "");
  const table = html.slice(html.indexOf("<table"), html.indexOf("</table>"));
  return { html, table, text: table.replace(/<[^>]+>/g, " ").replaceAll("&#x27;", "'") };
}

describe("the course's audit log", () => {
  it("writes a sentence for a new cohort, a part recorded and changed, kit moves and an adjusted mark, with no id or code", async () => {
    const actorId = fixture.userIds.instructor;
    const courseId = fixture.courseId;
    const instructor = await requireCourseRole({ request: appRequest("/", { cookie }), context: new RouterContextProvider() }, courseId, [
      "instructor",
    ]);
    await addCohort(db, { courseId, actorId, name: "Evening cohort" });
    const { part } = await createPart(db, {
      courseId,
      actorId,
      input: { kind: "sphere", label: "S-audit", material: "steel", diameterMm: 3, massG: 0.11, notes: null } as never,
    });
    await setPartStatus(db, { courseId, partId: part.id, actorId, status: "remeasure" });
    const moved = await db
      .insert(kits)
      .values([
        { courseId, number: "K-audit-1", state: "checked_in" },
        { courseId, number: "K-audit-2", state: "checked_in" },
      ])
      .returning();
    await moveKits(db, { courseId, actorId, kitIds: moved.map((kit) => kit.id), move: { to: "on_shelf" } });

    const bare = (await loadMarkingLab(db, courseId, fixture.labId))!;
    await saveRubric(db, {
      access: instructor,
      lab: bare,
      input: { criteria: [{ kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 }] },
    });
    const lab = (await loadMarkingLab(db, courseId, fixture.labId))!;
    const target = { access: instructor, labId: lab.id, membershipId: fixture.membershipIds.ownStudent };
    await saveMarkCell(db, { ...target, criterionId: lab.rubric[0].id, points: 3, expectedVersion: 0 });
    await saveMark(db, {
      ...target,
      expectedVersion: 1,
      source: "moderation",
      reason: "In line with the other cohort",
      change: { kind: "score", criterionId: lab.rubric[0].id, points: 2 },
    });

    const { text } = await auditTable();
    for (const sentence of [
      "Test instructor created the cohort “Evening cohort”.",
      "Test instructor recorded the part S-audit.",
      "Test instructor sent the part S-audit for re-measurement.",
      "Test instructor moved kit K-audit-1 from checked in to on shelf.",
      "Test instructor moved kit K-audit-2 from checked in to on shelf.",
      "Test instructor saved the rubric of “Drag on a steel sphere” (1 criterion).",
      "Test instructor adjusted the mark of Test ownStudent for “Drag on a steel sphere” from 3 points to 2 points, because “In line with the other cohort”.",
    ])
      expect(text).toContain(sentence);
    expect(text).not.toMatch(/[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}/i);
    expect(text).not.toMatch(/\b[a-z]+\.[a-z]+_[a-z_]+\b|[{}]/);
  });

  it("reads a log of 100 events in as many statements as one of 10", async () => {
    const statementsWith = async (events: number) => {
      const courseId = fixture.otherCourseId;
      await db.delete(auditEvents).where(eq(auditEvents.courseId, courseId));
      const [kit] = await db
        .insert(kits)
        .values({ courseId, number: `K-log-${events}` })
        .returning();
      await db.insert(auditEvents).values(
        Array.from({ length: events }, (_, index) => ({
          courseId,
          actorId: fixture.userIds.otherInstructor,
          action: index % 2 ? "kit.moved" : "part.created",
          subject: index % 2 ? `kit:${kit.id}` : `part:${fixture.partId}`,
          detail: { from: "on_shelf", to: "packed" },
        })),
      );
      const other = await sessionCookieFor(fixture.userIds.otherInstructor);
      const { statements, result } = await countStatements(() => handle(appRequest(`/courses/${courseId}/audit`, { cookie: other })));
      const html = (await result.text()).replaceAll("<!-- -->", "");
      const table = html.slice(html.indexOf("<table"), html.indexOf("</table>"));
      expect((table.match(/moved kit K-log-/g) ?? []).length).toBe(events / 2);
      return statements;
    };
    expect(await statementsWith(100)).toBe(await statementsWith(10));
  });
});
