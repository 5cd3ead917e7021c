/**
 * The parts screens through the built app's request handler: what an instructor and a TA see, a
 * refused form (400, errors beside the fields, input kept), the import's commit, and links only to
 * the kits, hand-ins and comparisons the viewer may open.
 */
import { RouterContextProvider } from "react-router";
import { and, count, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { courseMemberships, courses, kitParts, kits, labCohorts, labs, parts, users } from "~/db/schema";
import { partToCsvRow } from "~/lib/kits/parts-csv";
import { requireCourseRole, staffRoles } from "~/server/auth/access.server";
import { courseOverview } from "~/server/courses/overview.server";
import { db } from "~/server/db.server";
import { ensureDropLog, handInDropLog } from "~/server/drop-logs/hand-in.server";
import { checkInKits } from "~/server/kits/kits.server";
import { createPart } from "~/server/kits/parts.server";
import { createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";

let handle: AppHandler;
let courseId: string;
let instructor: string;
let ta: string;
let fluidLotId: string;

beforeAll(async () => {
  handle = await createAppHandler();
  const [course] = await db.insert(courses).values({ title: "Parts pages", code: "PP-1", term: "Test term", timeZone: "UTC" }).returning();
  courseId = course.id;
  const [instructorUser, taUser] = await db
    .insert(users)
    .values([
      { email: "pp-instructor@parts.example", name: "Test instructor" },
      { email: "pp-ta@parts.example", name: "Test TA" },
    ])
    .returning();
  await db.insert(courseMemberships).values([
    { courseId, userId: instructorUser.id, role: "instructor" },
    { courseId, userId: taUser.id, role: "ta" },
  ]);
  instructor = await sessionCookieFor(instructorUser.id);
  ta = await sessionCookieFor(taUser.id);
  const { part } = await createPart(db, {
    courseId,
    actorId: instructorUser.id,
    input: {
      kind: "fluid_lot",
      label: "FL-1",
      fluidName: "syrup",
      densityKgM3: 1380,
      calibration: [
        { temperatureC: 18, viscosityPaS: 6 },
        { temperatureC: 24, viscosityPaS: 3.5 },
      ],
      notes: null,
    },
  });
  fluidLotId = part.id;
});

const page = async (path: string, cookie: string) => {
  const response = await handle(appRequest(path, { cookie }));
  return { status: response.status, html: await response.text() };
};

describe("parts screens", () => {
  it("lists the parts with their measurements, and offers changes only to instructors", async () => {
    const forInstructor = await page(`/courses/${courseId}/parts?kind=fluid_lot`, instructor);
    expect(forInstructor.status).toBe(200);
    expect(forInstructor.html).toContain("FL-1");
    expect(forInstructor.html).toContain("2 calibration points");
    expect(forInstructor.html).toContain("Add a part");
    const forTa = await page(`/courses/${courseId}/parts`, ta);
    expect(forTa.status).toBe(200);
    expect(forTa.html).not.toContain("Add a part");
    expect(forTa.html).toContain("Export inventory (CSV)");
  });

  it("draws a fluid lot's calibration on the server, with its table", async () => {
    const { status, html } = await page(`/courses/${courseId}/parts/${fluidLotId}`, instructor);
    expect(status).toBe(200);
    expect(html).toMatch(/<svg[^>]*role="img"/);
    expect(html).toContain("Calibration points and residuals");
    expect(html).toContain("Re-measure");
    expect((await page(`/courses/${courseId}/parts/${fluidLotId}`, ta)).html).not.toContain("Save the new measurements");
  });

  it("compares a declared glycerol–water lot with the handbook on its page and warns of a mPa·s typed as Pa·s", async () => {
    // Segur & Oberstar (1951), 85 % glycerol: 109 mPa·s at 20 °C, 58 mPa·s at 30 °C (from memory); the 20 °C value typed as Pa·s.
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=fluid_lot`, {
        cookie: instructor,
        form: {
          kind: "fluid_lot",
          label: "GLY-85",
          fluidName: "glycerol–water 85 %",
          densityKgM3: "1221",
          glycerolMassFraction: "0.85",
          "calibration[0].temperatureC": "20",
          "calibration[0].viscosityPaS": "109",
          "calibration[1].temperatureC": "30",
          "calibration[1].viscosityPaS": "0.058",
        },
      }),
    );
    expect(response.status).toBe(302);
    const { html } = await page(new URL(response.headers.get("location")!, "http://localhost").pathname, instructor);
    expect(html).toContain("Check these measurements");
    expect(html).toContain(
      "The viscosity at 20 °C is about 1000 times the handbook value for a glycerol mass fraction of 0.85 (Cheng 2008)",
    );
    expect(html).toContain("Handbook μ (Pa·s)");
    expect(html).toContain("unit slip? (mPa·s vs Pa·s)");
    expect(html).toContain("agrees with the handbook");
  });

  it("refuses a glycerol mass fraction typed as a percentage, keeping the input", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=fluid_lot`, {
        cookie: instructor,
        form: {
          kind: "fluid_lot",
          label: "GLY-X",
          fluidName: "glycerol–water",
          densityKgM3: "1221",
          glycerolMassFraction: "85",
          "calibration[0].temperatureC": "20",
          "calibration[0].viscosityPaS": "0.109",
        },
      }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("85 % glycerol is 0.85.");
    expect(html).toMatch(/name="glycerolMassFraction"[^>]*value="85"|value="85"[^>]*name="glycerolMassFraction"/);
  });

  it("answers a bad part with 400, the error beside the field and the typed values kept", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=sphere`, {
        cookie: instructor,
        form: { kind: "sphere", label: "S-1", material: "glass", diameterMm: "", massG: "0.1" },
      }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("Enter the diameter in mm.");
    expect(html).toMatch(/value="glass"/);
  });

  it("saves a sphere typed with decimal commas (0,5)", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=sphere`, {
        cookie: instructor,
        form: { kind: "sphere", label: "S-COMMA", material: "glass", diameterMm: "4,5", diameterResolutionMm: "0,5", massG: "0,12" },
      }),
    );
    expect(response.status).toBe(302);
    const [saved] = await db.select().from(parts).where(eq(parts.label, "S-COMMA"));
    expect([saved.diameterMm, saved.diameterResolutionMm, saved.massG]).toEqual([4.5, 0.5, 0.12]);
  });

  it("adds and removes calibration rows without JavaScript, keeping what was typed", async () => {
    // The rows' buttons submit Conform's intent; the server answers with the form one row longer (or shorter).
    const typed = { kind: "fluid_lot", label: "GLY-R", "calibration[0].temperatureC": "20,5", "calibration[0].viscosityPaS": "0.11" };
    const added = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=fluid_lot`, {
        cookie: instructor,
        form: { ...typed, __intent__: JSON.stringify({ type: "insert", payload: { name: "calibration" } }) },
      }),
    );
    const addedHtml = await added.text();
    expect(addedHtml).toMatch(/name="calibration\[1\]\.temperatureC"/);
    expect(addedHtml).toMatch(
      /name="calibration\[0\]\.temperatureC"[^>]*value="20,5"|value="20,5"[^>]*name="calibration\[0\]\.temperatureC"/,
    );
    const removed = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=fluid_lot`, {
        cookie: instructor,
        form: { ...typed, __intent__: JSON.stringify({ type: "remove", payload: { name: "calibration", index: 0 } }) },
      }),
    );
    expect(await removed.text()).not.toMatch(/name="calibration\[0\]\.temperatureC"/);
    expect(await db.select({ id: parts.id }).from(parts).where(eq(parts.label, "GLY-R"))).toEqual([]);
  });

  it("refuses a re-measurement with the error at its calibration row and the note kept", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/${fluidLotId}`, {
        cookie: instructor,
        form: {
          intent: "remeasure",
          kind: "fluid_lot",
          label: "FL-1",
          fluidName: "syrup",
          densityKgM3: "1380",
          "calibration[0].temperatureC": "18",
          "calibration[0].viscosityPaS": "6",
          "calibration[1].temperatureC": "",
          "calibration[1].viscosityPaS": "3,5",
          note: "new viscometer",
        },
      }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toMatch(/id="[^"]*calibration\[1\]\.temperatureC[^"]*"[^>]*>Enter the temperature in °C\./);
    expect(html).toContain("new viscometer");
  });

  it("commits an import through the page's action", async () => {
    const rows = [partToCsvRow({ kind: "accessory", label: "TH-1", accessoryType: "thermometer", notes: null })];
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/import`, { cookie: instructor, form: { rows: JSON.stringify(rows) } }),
    );
    expect(response.status).toBe(200);
    const [{ n }] = await db.select({ n: count() }).from(parts).where(eq(parts.label, "TH-1"));
    expect(n).toBe(1);
  });
});

describe("a part's history", () => {
  it("says in words how a part came back from a check-in: a damaged bottle of a lot, a missing sphere", async () => {
    const [{ id: actorId }] = await db.select({ id: users.id }).from(users).where(eq(users.email, "pp-instructor@parts.example"));
    const [sphere] = await db
      .insert(parts)
      .values({ courseId, kind: "sphere", label: "S-history", material: "steel", diameterMm: 3, massG: 0.11 })
      .returning();
    const [kit] = await db.insert(kits).values({ courseId, number: "K-history", state: "coming_back" }).returning();
    await db.insert(kitParts).values([
      { kitId: kit.id, partId: sphere.id },
      { kitId: kit.id, partId: fluidLotId, exclusive: false },
    ]);
    await checkInKits(db, {
      courseId,
      actorId,
      kits: [{ kitId: kit.id, conditions: { [sphere.id]: "missing", [fluidLotId]: "damaged" }, remeasure: [] }],
    });
    const text = async (partId: string) => {
      const { status, html } = await page(`/courses/${courseId}/parts/${partId}`, instructor);
      expect(status).toBe(200);
      // The history section's text alone: the page's data (in a script) holds the stored codes.
      const history = html.slice(html.indexOf('id="history-heading"'), html.indexOf("</section>", html.indexOf('id="history-heading"')));
      return history
        .replaceAll("<!-- -->", "")
        .replaceAll("&#x27;", "'")
        .replace(/<[^>]+>/g, "");
    };
    const lot = await text(fluidLotId);
    expect(lot).toContain(
      "Came back damaged: A bottle of this lot was checked in damaged with Kit K-history, taken out of the kit; the rest of the lot stays in service, by Test instructor",
    );
    const lost = await text(sphere.id);
    expect(lost).toContain(
      "Missing at check-in: It was not in Kit K-history when it came back, taken off the kit's list and retired, by Test instructor",
    );
    for (const page of [lot, lost]) expect(page).not.toMatch(/checked_in|\(damaged\)|\(missing\)/);
  });
});

describe("links on the staff's kit and part pages", () => {
  it("show an assigned TA only their cohorts' kits, hand-ins and comparisons, and link nothing they may not open", async () => {
    const fixture = await createAccessFixture("part-links");
    const { courseId: course } = fixture;
    const [{ id: fluidLotId }] = await db
      .select({ id: parts.id })
      .from(parts)
      .where(and(eq(parts.courseId, course), eq(parts.label, "F-1")));
    // A kit of cohort two sharing cohort one's fluid lot, with a hand-in of its own lab; and a kit held by
    // no one, coming back with a bottle of that lot, whose check-in enters the lot's history.
    const [otherSphere, otherColumn, shelfSphere] = await db
      .insert(parts)
      .values([
        { courseId: course, kind: "sphere", label: "S-2", material: "steel", diameterMm: 3, massG: 0.11 },
        { courseId: course, kind: "column", label: "C-2", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
        { courseId: course, kind: "sphere", label: "S-3", material: "steel", diameterMm: 3, massG: 0.11 },
      ])
      .returning();
    const [otherKit, shelfKit] = await db
      .insert(kits)
      .values([
        { courseId: course, number: "K-02", state: "at_home", holderMembershipId: fixture.membershipIds.otherCohortStudent },
        { courseId: course, number: "K-03", state: "coming_back" },
      ])
      .returning();
    await db.insert(kitParts).values([
      { kitId: otherKit.id, partId: otherSphere.id },
      { kitId: otherKit.id, partId: otherColumn.id },
      { kitId: otherKit.id, partId: fluidLotId, exclusive: false },
      { kitId: shelfKit.id, partId: shelfSphere.id },
      { kitId: shelfKit.id, partId: fluidLotId, exclusive: false },
    ]);
    await checkInKits(db, {
      courseId: course,
      actorId: fixture.userIds.instructor,
      kits: [{ kitId: shelfKit.id, conditions: { [shelfSphere.id]: "fine", [fluidLotId]: "fine" }, remeasure: [] }],
    });
    const day = 24 * 3600 * 1000;
    const [otherLab] = await db
      .insert(labs)
      .values({
        courseId: course,
        title: "Cohort two's drag lab",
        kind: "drag",
        status: "published",
        opensAt: new Date(Date.now() - day),
        dueAt: new Date(Date.now() + day),
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
      })
      .returning();
    await db.insert(labCohorts).values({ labId: otherLab.id, cohortId: fixture.otherCohortId });
    const otherDropLogId = await ensureDropLog(db, { labId: otherLab.id, membershipId: fixture.membershipIds.otherCohortStudent });
    const otherStudent = await requireCourseRole(
      {
        request: appRequest("/", { cookie: await sessionCookieFor(fixture.userIds.otherCohortStudent) }),
        context: new RouterContextProvider(),
      },
      course,
      ["student"],
    );
    await handInDropLog(db, {
      access: otherStudent,
      labId: otherLab.id,
      idempotencyKey: "part-links-other-cohort",
      input: { sphereId: otherSphere.id, temperatureC: 22, drops: [7.4, 7.5, 7.45, 7.42, 7.48] },
    });

    const ta = await sessionCookieFor(fixture.userIds.assignedTa);
    const instructor = await sessionCookieFor(fixture.userIds.instructor);
    const html = async (path: string, cookie: string) => {
      const response = await handle(appRequest(path, { cookie }));
      expect(response.status).toBe(200);
      // Without React's markers between adjacent text pieces, so sentences can be matched whole.
      return (await response.text()).replaceAll("<!-- -->", "");
    };
    const otherCohortTraces = [otherKit.id, shelfKit.id, otherDropLogId, "Test otherCohortStudent", `/labs/${otherLab.id}/comparison`];

    const lotForTa = await html(`/courses/${course}/parts/${fluidLotId}`, ta);
    for (const trace of otherCohortTraces) expect(lotForTa).not.toContain(trace);
    expect(lotForTa).toContain(`/labs/${fixture.labId}/hand-ins/${fixture.dropLogId}`);
    expect(lotForTa).toContain("Not listed: 1 from students of cohorts you do not mark.");
    expect(lotForTa).toContain("Checked in</strong> with Kit K-03, in good condition, by");

    const otherSphereForTa = await html(`/courses/${course}/parts/${otherSphere.id}`, ta);
    for (const trace of otherCohortTraces) expect(otherSphereForTa).not.toContain(trace);
    expect(otherSphereForTa).toContain("Kit K-02 (not a kit of your cohorts)");
    const shelfSphereForTa = await html(`/courses/${course}/parts/${shelfSphere.id}`, ta);
    expect(shelfSphereForTa).not.toContain(shelfKit.id);
    expect(shelfSphereForTa).toContain("Kit K-03 (not a kit of your cohorts)");
    expect(await html(`/courses/${course}/parts/${fixture.sphereId}`, ta)).toContain(`href="/courses/${course}/kits/${fixture.kitId}"`);

    // The instructor may open everything, and is linked to it.
    const lotForInstructor = await html(`/courses/${course}/parts/${fluidLotId}`, instructor);
    expect(lotForInstructor).toContain(`/labs/${otherLab.id}/hand-ins/${otherDropLogId}`);
    expect(lotForInstructor).toContain(`/labs/${otherLab.id}/comparison`);
    expect(lotForInstructor).toContain(`href="/courses/${course}/kits/${shelfKit.id}"`);
    expect(await html(`/courses/${course}/parts/${otherSphere.id}`, instructor)).toContain(`href="/courses/${course}/kits/${otherKit.id}"`);

    // The packing slip is the instructors': a TA's kit page does not offer it.
    expect(await html(`/courses/${course}/kits/${fixture.kitId}`, ta)).not.toContain("packing-slip");
    expect(await html(`/courses/${course}/kits/${fixture.kitId}`, instructor)).toContain("packing-slip");

    // The overview counts, for the TA, the kits their kits list holds.
    const overviewFor = async (cookie: string) =>
      courseOverview(
        db,
        await requireCourseRole({ request: appRequest("/", { cookie }), context: new RouterContextProvider() }, course, staffRoles),
      );
    expect((await overviewFor(ta)).kitsByState).toEqual({ at_home: 1 });
    expect((await overviewFor(instructor)).kitsByState).toEqual({ at_home: 2, checked_in: 1 });
  });
});
