import { and, asc, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { emailOutbox, kitEvents, kitParts, kitProblems, kitProblemUpdates, kits, parts, shipmentItems } from "~/db/schema";
import { db } from "~/server/db.server";
import {
  changeProblemStatus,
  getKitProblem,
  listKitProblems,
  listProblems,
  openProblemsDigest,
  reportKitProblem,
  sendReplacement,
} from "~/server/kits/kit-problems.server";
import { listKits } from "~/server/kits/kits.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countStatements } from "../support/count-statements";

let handle: AppHandler;
let fixtures = 0;

beforeAll(async () => {
  handle = await createAppHandler();
});

/**
 * A course of its own per test (ownStudent holds kit K-01 at home: sphere S-1 of 3 mm, column C-1 of
 * 40 mm bore, fluid lot F-1), with spare parts on the shelf and a second kit holding sphere S-9.
 */
async function courseWithShelf() {
  const fixture = await createAccessFixture(`problems${++fixtures}`);
  const [spareSphere, spareColumn, wideSphere, lot, busySphere] = await db
    .insert(parts)
    .values([
      { courseId: fixture.courseId, kind: "sphere", label: "S-2", material: "steel", diameterMm: 3, massG: 0.11 },
      { courseId: fixture.courseId, kind: "column", label: "C-2", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
      { courseId: fixture.courseId, kind: "sphere", label: "S-50", material: "steel", diameterMm: 50, massG: 500 },
      {
        courseId: fixture.courseId,
        kind: "fluid_lot",
        label: "F-2",
        fluidName: "glycerol",
        densityKgM3: 1260,
        bottlesOnHand: 1,
        calibration: [{ temperatureC: 20, viscosityPaS: 1.41 }],
      },
      { courseId: fixture.courseId, kind: "sphere", label: "S-9", material: "steel", diameterMm: 3, massG: 0.11 },
    ])
    .returning();
  const [otherKit] = await db.insert(kits).values({ courseId: fixture.courseId, number: "K-02" }).returning();
  await db.insert(kitParts).values({ kitId: otherKit.id, partId: busySphere.id });
  const partId = async (label: string) =>
    (
      await db
        .select({ id: parts.id })
        .from(parts)
        .where(and(eq(parts.courseId, fixture.courseId), eq(parts.label, label)))
    )[0].id;
  return {
    fixture,
    spareSphereId: spareSphere.id,
    spareColumnId: spareColumn.id,
    wideSphereId: wideSphere.id,
    spareLotId: lot.id,
    busySphereId: busySphere.id,
    lotInKitId: await partId("F-1"),
  };
}

const reportDamagedSphere = (fixture: AccessFixture, partId = fixture.sphereId) =>
  reportKitProblem(db, {
    courseId: fixture.courseId,
    kitId: fixture.kitId,
    actorId: fixture.userIds.ownStudent,
    partId,
    problem: "damaged",
    note: "The sphere arrived chipped.",
  });

const studentMail = (fixture: AccessFixture) =>
  db
    .select()
    .from(emailOutbox)
    .where(and(eq(emailOutbox.template, "kit-problem-update"), eq(emailOutbox.courseId, fixture.courseId)))
    .orderBy(asc(emailOutbox.createdAt));

const updatesOf = (problemId: string) =>
  db
    .select({ from: kitProblemUpdates.fromStatus, to: kitProblemUpdates.toStatus, note: kitProblemUpdates.note })
    .from(kitProblemUpdates)
    .where(eq(kitProblemUpdates.problemId, problemId))
    .orderBy(asc(kitProblemUpdates.createdAt));

const partsInKit = async (kitId: string) =>
  (await db.select({ partId: kitParts.partId }).from(kitParts).where(eq(kitParts.kitId, kitId))).map((row) => row.partId).sort();

describe("a student's report", () => {
  it("becomes a received problem with its first update, stays on the kit's history and e-mails the instructors", async () => {
    const { fixture } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);

    const [problem] = await db.select().from(kitProblems).where(eq(kitProblems.id, problemId));
    expect(problem).toMatchObject({
      status: "received",
      kind: "damaged",
      kitId: fixture.kitId,
      membershipId: fixture.membershipIds.ownStudent,
      partId: fixture.sphereId,
      note: "The sphere arrived chipped.",
    });
    expect(await updatesOf(problemId)).toEqual([{ from: null, to: "received", note: null }]);
    const events = await db
      .select()
      .from(kitEvents)
      .where(and(eq(kitEvents.kitId, fixture.kitId), eq(kitEvents.action, "reported")));
    expect(events.map((event) => event.detail)).toEqual([{ partId: fixture.sphereId, problem: "damaged" }]);
    const mail = await db
      .select()
      .from(emailOutbox)
      .where(and(eq(emailOutbox.template, "kit-problem"), eq(emailOutbox.courseId, fixture.courseId)));
    expect(mail.map((m) => m.toAddress)).toEqual([`instructor@problems${fixtures}.example`]);
    expect(mail[0].props).toMatchObject({ partLabel: "S-1", problem: "damaged" });
    expect(String(mail[0].props.kitUrl)).toMatch(new RegExp(`/kits/problems/${problemId}$`));
    // The report alone tells the student nothing by e-mail: they made it, and see it on their kit page.
    expect(await studentMail(fixture)).toEqual([]);
  });

  it("counts as open on the kits list until it is resolved, whatever the kit does meanwhile", async () => {
    const { fixture } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const openOf = async () =>
      (await listKits(db, fixture.courseId, { page: 1, pageSize: 25 })).rows.find((kit) => kit.id === fixture.kitId)!.openReports;
    await db
      .update(kits)
      .set({ updatedAt: new Date(Date.now() + 60_000) })
      .where(eq(kits.id, fixture.kitId));
    expect(await openOf()).toBe(1);
    await changeProblemStatus(db, {
      courseId: fixture.courseId,
      actorId: fixture.userIds.instructor,
      problemId,
      to: "resolved",
      note: "Fine.",
    });
    expect(await openOf()).toBe(0);
  });
});

describe("status changes", () => {
  it("keeps each change and e-mails the student once for each", async () => {
    const { fixture, spareSphereId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const scope = { courseId: fixture.courseId, actorId: fixture.userIds.instructor, problemId };

    await sendReplacement(db, {
      ...scope,
      replacementPartId: spareSphereId,
      carrier: "Parcelwise",
      trackingNumber: "PW-R-1",
      requestKey: crypto.randomUUID(),
      note: "A new sphere is in the post.",
    });
    await changeProblemStatus(db, { ...scope, to: "resolved", note: "Glad it arrived." });

    expect(await updatesOf(problemId)).toEqual([
      { from: null, to: "received", note: null },
      { from: "received", to: "replacement_sent", note: "A new sphere is in the post." },
      { from: "replacement_sent", to: "resolved", note: "Glad it arrived." },
    ]);
    const mail = await studentMail(fixture);
    expect(mail.map((m) => [m.toAddress, m.props.status, m.props.note])).toEqual([
      [`ownstudent@problems${fixtures}.example`, "replacement_sent", "A new sphere is in the post."],
      [`ownstudent@problems${fixtures}.example`, "resolved", "Glad it arrived."],
    ]);
    expect(mail[0].props).toMatchObject({ replacementLabel: "S-2", carrier: "Parcelwise", trackingNumber: "PW-R-1" });
  });

  it("refuses changes the table does not allow, and keeps nothing of them", async () => {
    const { fixture, spareSphereId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const scope = { courseId: fixture.courseId, actorId: fixture.userIds.instructor, problemId };

    await expect(changeProblemStatus(db, { ...scope, to: "replacement_sent", note: "Sent." })).rejects.toMatchObject({
      code: "kit_problem_refused",
      field: "to",
    });
    await changeProblemStatus(db, { ...scope, to: "resolved", note: "Found it in the box after all." });
    await expect(changeProblemStatus(db, { ...scope, to: "received", note: "Again." })).rejects.toThrow(
      /resolved; it cannot become received/,
    );
    await expect(changeProblemStatus(db, { ...scope, to: "resolved", note: "Again." })).rejects.toThrow(/cannot become resolved/);
    await expect(
      sendReplacement(db, {
        ...scope,
        replacementPartId: spareSphereId,
        carrier: "Parcelwise",
        trackingNumber: "PW-R-2",
        requestKey: crypto.randomUUID(),
        note: "Late.",
      }),
    ).rejects.toThrow(/no replacement can be sent/);

    expect((await updatesOf(problemId)).map((update) => update.to)).toEqual(["received", "resolved"]);
    expect((await studentMail(fixture)).map((m) => m.props.status)).toEqual(["resolved"]);
    expect(await partsInKit(fixture.kitId)).not.toContain(spareSphereId);
  });
});

describe("a replacement sent from the problem", () => {
  const send = (fixture: AccessFixture, problemId: string, replacementPartId: string) =>
    sendReplacement(db, {
      courseId: fixture.courseId,
      actorId: fixture.userIds.instructor,
      problemId,
      replacementPartId,
      carrier: "Parcelwise",
      trackingNumber: "PW-R-9",
      requestKey: crypto.randomUUID(),
      note: "On its way.",
    });

  it("refuses a part of another kind, one in another kit, and one too wide for the kit's column, changing nothing", async () => {
    const { fixture, spareColumnId, busySphereId, wideSphereId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const before = await partsInKit(fixture.kitId);

    await expect(send(fixture, problemId, spareColumnId)).rejects.toMatchObject({
      field: "replacementPartId",
      message: expect.stringMatching(/not of the reported part's kind; choose a sphere/),
    });
    await expect(send(fixture, problemId, busySphereId)).rejects.toThrow(/S-9 already sits in kit K-02/);
    await expect(send(fixture, problemId, wideSphereId)).rejects.toThrow(/wider than the kit's column bore/);
    await expect(send(fixture, problemId, fixture.sphereId)).rejects.toThrow(/the reported part itself/);

    expect(await partsInKit(fixture.kitId)).toEqual(before);
    const [problem] = await db.select().from(kitProblems).where(eq(kitProblems.id, problemId));
    expect(problem).toMatchObject({ status: "received", replacementPartId: null });
    expect(await db.select().from(shipmentItems).where(eq(shipmentItems.problemId, problemId))).toEqual([]);
  });

  it("puts the part in the kit in place of the reported one, retires the broken one, and shows the student the tracking", async () => {
    const { fixture, spareSphereId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    await send(fixture, problemId, spareSphereId);

    const inKit = await partsInKit(fixture.kitId);
    expect(inKit).toContain(spareSphereId);
    expect(inKit).not.toContain(fixture.sphereId);
    const [broken] = await db.select({ status: parts.status }).from(parts).where(eq(parts.id, fixture.sphereId));
    expect(broken.status).toBe("retired");
    const [problem] = await db.select().from(kitProblems).where(eq(kitProblems.id, problemId));
    expect(problem).toMatchObject({ status: "replacement_sent", replacementPartId: spareSphereId });
    const [update] = (await db.select().from(kitProblemUpdates).where(eq(kitProblemUpdates.problemId, problemId))).filter(
      (row) => row.toStatus === "replacement_sent",
    );
    expect(update.detail).toMatchObject({ replacementPartId: spareSphereId, shipmentItemId: expect.any(String) });

    const [mine] = await listKitProblems(db, fixture.courseId, { membershipId: fixture.membershipIds.ownStudent });
    expect(mine).toMatchObject({
      status: "replacement_sent",
      replacementLabel: "S-2",
      parcel: { carrier: "Parcelwise", trackingNumber: "PW-R-9" },
    });
    const page = await handle(
      appRequest(`/courses/${fixture.courseId}/my-kit`, { cookie: await sessionCookieFor(fixture.userIds.ownStudent) }),
    );
    const html = await page.text();
    expect(html).toContain("Replacement sent");
    expect(html).toContain("PW-R-9");
  });

  it("sends a bottle of another fluid lot from stock, leaving the reported lot in service", async () => {
    const { fixture, spareLotId, lotInKitId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture, lotInKitId);
    await send(fixture, problemId, spareLotId);

    const inKit = await partsInKit(fixture.kitId);
    expect(inKit).toContain(spareLotId);
    expect(inKit).not.toContain(lotInKitId);
    const statuses = await db
      .select({ id: parts.id, status: parts.status, bottles: parts.bottlesOnHand })
      .from(parts)
      .where(eq(parts.courseId, fixture.courseId));
    expect(statuses.find((part) => part.id === lotInKitId)!.status).toBe("in_service");
    expect(statuses.find((part) => part.id === spareLotId)!.bottles).toBe(0);
  });
});

describe("the problem page", () => {
  it("offers the instructor only shelf parts of the reported kind, and a TA of the student's cohort no forms", async () => {
    const { fixture } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const path = `/courses/${fixture.courseId}/kits/problems/${problemId}`;
    const pageFor = async (actor: "instructor" | "assignedTa") =>
      (await handle(appRequest(path, { cookie: await sessionCookieFor(fixture.userIds[actor]) }))).text();

    const instructorPage = await pageFor("instructor");
    const offered = [...instructorPage.matchAll(/<option value="[0-9a-f-]{36}"[^>]*>([^<—]+)/g)].map((match) => match[1].trim());
    // S-2 is on the shelf; S-50 too, but wider than the kit's column; S-9 sits in K-02; C-2 is a column.
    expect(offered).toEqual(["S-2"]);
    expect(instructorPage).toContain("Send a replacement");

    const taPage = await pageFor("assignedTa");
    expect(taPage).toContain("The sphere arrived chipped.");
    expect(taPage).not.toContain("Send a replacement");
    expect(taPage).not.toContain("Change the status");
  });
});

describe("a resent replacement form", () => {
  it("finds the replacement already sent and changes nothing", async () => {
    const { fixture, spareSphereId } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const input = {
      courseId: fixture.courseId,
      actorId: fixture.userIds.instructor,
      problemId,
      replacementPartId: spareSphereId,
      carrier: "Parcelwise",
      trackingNumber: "PW-R-5",
      requestKey: crypto.randomUUID(),
      note: "On its way.",
    };
    await sendReplacement(db, input);
    await sendReplacement(db, input);
    expect(await db.select().from(shipmentItems).where(eq(shipmentItems.problemId, problemId))).toHaveLength(1);
    expect((await updatesOf(problemId)).map((update) => update.to)).toEqual(["received", "replacement_sent"]);
    expect(await studentMail(fixture)).toHaveLength(1);
  });
});

describe("who sees and changes a problem", () => {
  it("lets a student see only their own problems, and change none", async () => {
    const { fixture } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    expect(await listKitProblems(db, fixture.courseId, { membershipId: fixture.membershipIds.sameCohortStudent })).toEqual([]);

    const asStudent = async (actor: "ownStudent" | "sameCohortStudent", path: string, form?: Record<string, string>) =>
      handle(appRequest(path, { cookie: await sessionCookieFor(fixture.userIds[actor]), form }));
    const problemPath = `/courses/${fixture.courseId}/kits/problems/${problemId}`;
    expect((await asStudent("ownStudent", problemPath, { intent: "status", to: "resolved", note: "I fixed it myself." })).status).toBe(403);
    expect((await asStudent("ownStudent", problemPath)).status).toBe(403);
    const otherPage = await asStudent("sameCohortStudent", `/courses/${fixture.courseId}/my-kit`);
    expect(await otherPage.text()).not.toContain("The sphere arrived chipped.");
    expect((await db.select().from(kitProblems).where(eq(kitProblems.id, problemId)))[0].status).toBe("received");
  });

  it("answers a bad status form at its field, keeping what was typed, and a good one with the change", async () => {
    const { fixture } = await courseWithShelf();
    const { problemId } = await reportDamagedSphere(fixture);
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const post = (form: Record<string, string>) =>
      handle(appRequest(`/courses/${fixture.courseId}/kits/problems/${problemId}`, { cookie, form }));

    const tooShort = await post({ intent: "status", to: "resolved", note: "ok" });
    expect(tooShort.status).toBe(400);
    expect(await tooShort.text()).toMatch(/Write the student a few words/);
    const byHand = await post({ intent: "status", to: "replacement_sent", note: "Posted a sphere." });
    expect(byHand.status).toBe(400);
    const refusedPage = await byHand.text();
    expect(refusedPage).toMatch(/Send the replacement part below/);
    expect(refusedPage).toContain("Posted a sphere.");
    expect((await post({ intent: "status", to: "resolved", note: "Sorted in the lab session." })).status).toBe(200);
    expect((await getKitProblem(db, fixture.courseId, problemId))!.status).toBe("resolved");
  });
});

describe("the instructors' lists", () => {
  it("puts open problems on the course overview, oldest first, in a constant number of statements", async () => {
    const { fixture } = await courseWithShelf();
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const overview = async () => (await handle(appRequest(`/courses/${fixture.courseId}`, { cookie }))).text();
    expect(await overview()).not.toMatch(/open kit problem/);

    const first = await reportDamagedSphere(fixture);
    const second = await reportKitProblem(db, {
      courseId: fixture.courseId,
      kitId: fixture.kitId,
      actorId: fixture.userIds.ownStudent,
      partId: null,
      problem: "incomplete",
      note: "No thermometer in the box.",
    });
    const html = await overview();
    expect(html).toMatch(/2(<!-- -->)? open kit problem(<!-- -->)?s/);
    expect(html.indexOf(`kits/problems/${first.problemId}`)).toBeGreaterThan(-1);
    expect(html.indexOf(`kits/problems/${first.problemId}`)).toBeLessThan(html.indexOf(`kits/problems/${second.problemId}`));

    const few = await countStatements(() => openProblemsDigest(db, fixture.courseId, undefined));
    await db.insert(kitProblems).values(
      Array.from({ length: 40 }, (_, i) => ({
        courseId: fixture.courseId,
        kitId: fixture.kitId,
        kind: "missing" as const,
        note: `Lost ${i}`,
      })),
    );
    const many = await countStatements(() => openProblemsDigest(db, fixture.courseId, undefined));
    expect(few.result.open).toBe(2);
    expect(many.result.open).toBe(42);
    expect(many.result.oldest).toHaveLength(5);
    expect(many.statements).toBe(few.statements);

    // A TA of the other cohort has none of these students: nothing open for them.
    expect((await openProblemsDigest(db, fixture.courseId, [fixture.otherCohortId])).open).toBe(0);
  });

  it("lists open problems before resolved ones, filters by status and pages in two statements", async () => {
    const { fixture } = await courseWithShelf();
    const scope = { courseId: fixture.courseId, actorId: fixture.userIds.instructor };
    const done = await reportDamagedSphere(fixture);
    await changeProblemStatus(db, { ...scope, problemId: done.problemId, to: "resolved", note: "Sorted." });
    const open = await reportDamagedSphere(fixture);

    const { statements, result } = await countStatements(() => listProblems(db, fixture.courseId, { page: 1, pageSize: 25 }));
    expect(statements).toBe(2);
    expect(result.rows.map((row) => row.id)).toEqual([open.problemId, done.problemId]);
    const resolved = await listProblems(db, fixture.courseId, { status: "resolved", page: 1, pageSize: 25 });
    expect(resolved).toMatchObject({ total: 1, rows: [{ id: done.problemId }] });
    expect((await listProblems(db, fixture.courseId, { cohortIds: [fixture.otherCohortId], page: 1, pageSize: 25 })).total).toBe(0);
  });
});
