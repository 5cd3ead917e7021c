/**
 * The parts screens through the built app's request handler: what an instructor and a TA see, a
 * refused form (400, errors beside the fields, input kept), and the import's commit.
 */
import { count, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { courseMemberships, courses, parts, users } from "~/db/schema";
import { partToCsvRow } from "~/lib/kits/parts-csv";
import { db } from "~/server/db.server";
import { createPart } from "~/server/kits/parts.server";
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
    input: { kind: "fluid_lot", label: "FL-1", fluidName: "syrup", densityKgM3: 1380, calibration: [{ temperatureC: 18, viscosityPaS: 6 }, { temperatureC: 24, viscosityPaS: 3.5 }], notes: null },
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
        form: { kind: "fluid_lot", label: "GLY-85", fluidName: "glycerol–water 85 %", densityKgM3: "1221", glycerolMassFraction: "0.85", calibrationTemperatureC: ["20", "30"], calibrationViscosityPaS: ["109", "0.058"] },
      }),
    );
    expect(response.status).toBe(302);
    const { html } = await page(new URL(response.headers.get("location")!, "http://localhost").pathname, instructor);
    expect(html).toContain("Check these measurements");
    expect(html).toContain("The viscosity at 20 °C is about 1000 times the handbook value for a glycerol mass fraction of 0.85 (Cheng 2008)");
    expect(html).toContain("Handbook μ (Pa·s)");
    expect(html).toContain("unit slip? (mPa·s vs Pa·s)");
    expect(html).toContain("agrees with the handbook");
  });

  it("refuses a glycerol mass fraction typed as a percentage, keeping the input", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=fluid_lot`, {
        cookie: instructor,
        form: { kind: "fluid_lot", label: "GLY-X", fluidName: "glycerol–water", densityKgM3: "1221", glycerolMassFraction: "85", calibrationTemperatureC: "20", calibrationViscosityPaS: "0.109" },
      }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("85 % glycerol is 0.85.");
    expect(html).toMatch(/name="glycerolMassFraction"[^>]*value="85"|value="85"[^>]*name="glycerolMassFraction"/);
  });

  it("answers a bad part with 400, the error beside the field and the typed values kept", async () => {
    const response = await handle(
      appRequest(`/courses/${courseId}/parts/new?kind=sphere`, { cookie: instructor, form: { kind: "sphere", label: "S-1", material: "glass", diameterMm: "", massG: "0.1" } }),
    );
    expect(response.status).toBe(400);
    const html = await response.text();
    expect(html).toContain("Enter the diameter in mm.");
    expect(html).toMatch(/value="glass"/);
  });

  it("commits an import through the page's action", async () => {
    const rows = [partToCsvRow({ kind: "accessory", label: "TH-1", accessoryType: "thermometer", notes: null })];
    const response = await handle(appRequest(`/courses/${courseId}/parts/import`, { cookie: instructor, form: { rows: JSON.stringify(rows) } }));
    expect(response.status).toBe(200);
    const [{ n }] = await db.select({ n: count() }).from(parts).where(eq(parts.label, "TH-1"));
    expect(n).toBe(1);
  });
});
