/**
 * The parts inventory against a real PostgreSQL: history of re-measurements, label uniqueness, the
 * checks that catch a mis-measured part, the all-or-nothing CSV import, the constant statement count
 * of the parts table, the export's formula neutralising and the fluid lot's calibration fit.
 */
import { RouterContextProvider } from "react-router";
import Papa from "papaparse";
import { count, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it, vi } from "vitest";
import { courseMemberships, courses, partEvents, parts, users } from "~/db/schema";
import type { PartInput } from "~/lib/kits/part-input";
import { partToCsvRow } from "~/lib/kits/parts-csv";
import { fitFluidViscosity, viscosityAt } from "~/lib/reduction";
import { loader as inventoryCsvLoader } from "~/routes/courses.$courseId.inventory[.]csv";
import { db, pool } from "~/server/db.server";
import { createPart, getPart, getPartPage, importParts, listParts, setPartStatus, updatePart } from "~/server/kits/parts.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { appRequest, sessionCookieFor } from "../support/app-requests";

let instructorId: string;

/** A course of its own per test, so inventories (and so the checks against them) do not mix. */
async function newCourse(code: string): Promise<string> {
  const [course] = await db.insert(courses).values({ title: "Parts test", code, term: "Test term", timeZone: "UTC" }).returning();
  await db.insert(courseMemberships).values({ courseId: course.id, userId: instructorId, role: "instructor" });
  return course.id;
}

/** The course's instructor as the part page's reader (every kit is theirs to open). */
const instructorOf = (courseId: string) =>
  ({
    user: { id: instructorId },
    course: { id: courseId, timeZone: "UTC" },
    membership: { role: "instructor" },
    cohortIds: [],
  }) as unknown as CourseAccess;

const sphere = (label: string, values: Partial<Extract<PartInput, { kind: "sphere" }>> = {}): PartInput => ({
  kind: "sphere",
  label,
  material: "steel",
  diameterMm: 4,
  massG: 0.263, // 6m/(πd³) ≈ 7849 kg/m³, inside the steel range
  notes: null,
  ...values,
});

beforeAll(async () => {
  const [user] = await db.insert(users).values({ email: "parts-instructor@parts.example", name: "Test instructor" }).returning();
  instructorId = user.id;
});

describe("recording and re-measuring parts", () => {
  it("keeps the old and new values in the history, newest first, and returns a part to service", async () => {
    const courseId = await newCourse("P-HIST");
    const { part } = await createPart(db, { courseId, actorId: instructorId, input: sphere("S-1") });
    await setPartStatus(db, { courseId, partId: part.id, actorId: instructorId, status: "remeasure", note: "results biased" });
    const updated = await updatePart(db, {
      courseId,
      partId: part.id,
      actorId: instructorId,
      input: sphere("S-1", { diameterMm: 4.02 }),
      note: "micrometer",
    });
    expect(updated?.part).toMatchObject({ diameterMm: expect.closeTo(4.02, 5), status: "in_service" });

    const stored = await getPart(db, courseId, part.id);
    expect(stored!.events.map((event) => event.action)).toEqual(["remeasured", "status:remeasure", "created"]);
    const [remeasured] = stored!.events;
    expect(remeasured).toMatchObject({ note: "micrometer", actor: { name: "Test instructor" } });
    const changed = remeasured.detail.changed as Record<string, { from: number; to: number }>;
    expect(Object.keys(changed)).toEqual(["diameterMm"]);
    expect(changed.diameterMm.from).toBeCloseTo(4, 5);
    expect(changed.diameterMm.to).toBeCloseTo(4.02, 5);
  });

  it("stores a lot's density uncertainty and dρ/dT and a column's bore uncertainty, and records their re-measurement", async () => {
    const courseId = await newCourse("P-UNC");
    const lot: PartInput = {
      kind: "fluid_lot",
      label: "GLY-U",
      fluidName: "glycerol",
      densityKgM3: 1261,
      densityUncertaintyKgM3: 0.8,
      densityTemperatureCoefficientKgM3K: -0.65,
      calibration: [{ temperatureC: 20, viscosityPaS: 1.41 }],
      notes: null,
    };
    const { part } = await createPart(db, { courseId, actorId: instructorId, input: lot });
    expect(part).toMatchObject({
      densityUncertaintyKgM3: expect.closeTo(0.8, 5),
      densityTemperatureCoefficientKgM3K: expect.closeTo(-0.65, 5),
      innerDiameterUncertaintyMm: null,
    });
    await updatePart(db, {
      courseId,
      partId: part.id,
      actorId: instructorId,
      input: { ...lot, densityUncertaintyKgM3: 0.5 },
      note: "hydrometer",
    });
    const [remeasured] = (await getPart(db, courseId, part.id))!.events;
    expect(Object.keys(remeasured.detail.changed as object)).toEqual(["densityUncertaintyKgM3"]);

    const column: PartInput = {
      kind: "column",
      label: "C-U",
      innerDiameterMm: 40,
      innerDiameterUncertaintyMm: 0.03,
      timedDistanceMm: 200,
      runInMm: 150,
      marginBelowMm: 50,
      notes: null,
    };
    const { part: storedColumn } = await createPart(db, { courseId, actorId: instructorId, input: column });
    expect(storedColumn).toMatchObject({ innerDiameterUncertaintyMm: expect.closeTo(0.03, 5), densityUncertaintyKgM3: null });
  });

  it("refuses a label the course already uses, and allows it in another course", async () => {
    const courseId = await newCourse("P-DUP");
    await createPart(db, { courseId, actorId: instructorId, input: sphere("S-1") });
    await expect(createPart(db, { courseId, actorId: instructorId, input: sphere("S-1") })).rejects.toMatchObject({
      code: "duplicate_label",
      field: "label",
    });
    const otherCourseId = await newCourse("P-DUP2");
    await expect(createPart(db, { courseId: otherCourseId, actorId: instructorId, input: sphere("S-1") })).resolves.toBeTruthy();
  });
});

describe("checks on a sphere", () => {
  const messages = (warnings: { message: string }[]) => warnings.map((warning) => warning.message);

  it("warns when the sphere is lighter than every fluid lot, and not when one fluid is lighter", async () => {
    const courseId = await newCourse("P-FLOAT");
    const fluid = (label: string, densityKgM3: number): PartInput => ({
      kind: "fluid_lot",
      label,
      fluidName: "syrup",
      densityKgM3,
      calibration: [
        { temperatureC: 20, viscosityPaS: 5 },
        { temperatureC: 25, viscosityPaS: 3 },
      ],
      notes: null,
    });
    await createPart(db, { courseId, actorId: instructorId, input: fluid("F-1", 1400) });
    // Nylon at d = 5 mm, m = 0.0746 g: ρ ≈ 1140 kg/m³, inside the nylon range, lighter than 1400.
    const nylon = sphere("N-1", { material: "nylon", diameterMm: 5, massG: 0.0746 });
    expect(messages((await createPart(db, { courseId, actorId: instructorId, input: nylon })).warnings)).toEqual([
      expect.stringMatching(/lighter than every fluid lot/),
    ]);
    await createPart(db, { courseId, actorId: instructorId, input: fluid("F-2", 1000) });
    expect((await createPart(db, { courseId, actorId: instructorId, input: { ...nylon, label: "N-2" } })).warnings).toEqual([]);
  });

  it("warns when the sphere is wider than the bore of every column", async () => {
    const courseId = await newCourse("P-WIDE");
    await createPart(db, {
      courseId,
      actorId: instructorId,
      input: { kind: "column", label: "C-1", innerDiameterMm: 10, timedDistanceMm: 200, runInMm: 100, marginBelowMm: 50, notes: null },
    });
    // 12 mm steel: m = 7850 · π/6 · (0.012 m)³ ≈ 7.10 g.
    const wide = sphere("W-1", { diameterMm: 12, massG: 7.1 });
    expect(messages((await createPart(db, { courseId, actorId: instructorId, input: wide })).warnings)).toEqual([
      expect.stringMatching(/wider than the bore of every column/),
    ]);
    expect((await createPart(db, { courseId, actorId: instructorId, input: sphere("S-OK") })).warnings).toEqual([]);
  });

  it("warns when diameter and mass give a density outside the material's range", async () => {
    const courseId = await newCourse("P-DENS");
    // Steel at d = 4 mm with m = 0.234 g gives ≈ 6980 kg/m³, below the 7650–8050 kg/m³ of steel.
    const { part, warnings } = await createPart(db, { courseId, actorId: instructorId, input: sphere("S-LIGHT", { massG: 0.234 }) });
    expect(messages(warnings)).toEqual([
      expect.stringMatching(/^Diameter and mass give 69\d\d kg\/m³, outside the usual 7650–8050 kg\/m³ for steel/),
    ]);
    // The part's page raises the same check from the stored values.
    expect(messages((await getPartPage(db, instructorOf(courseId), part.id))!.warnings)).toEqual(messages(warnings));
  });
});

describe("checks on a fluid lot against handbook data", () => {
  // Segur & Oberstar (1951), 85 % glycerol by mass: 109 mPa·s at 20 °C, 58 mPa·s at 30 °C (from memory;
  // matches the stored copy of the table the unit tests use).
  type FluidLotInput = Extract<PartInput, { kind: "fluid_lot" }>;
  const mix = (values: Partial<FluidLotInput> = {}): FluidLotInput => ({
    kind: "fluid_lot",
    label: "GLY-85",
    fluidName: "glycerol–water 85 %",
    densityKgM3: 1221,
    glycerolMassFraction: 0.85,
    calibration: [
      { temperatureC: 20, viscosityPaS: 0.109 },
      { temperatureC: 30, viscosityPaS: 0.058 },
    ],
    notes: null,
    ...values,
  });

  it("stores the declared mass fraction, finds Segur's values in agreement, and warns on a mPa·s typed as Pa·s", async () => {
    const courseId = await newCourse("P-GLY");
    const { part, warnings } = await createPart(db, { courseId, actorId: instructorId, input: mix() });
    expect(part.glycerolMassFraction).toBeCloseTo(0.85, 6);
    expect(warnings).toEqual([]);
    const page = await getPartPage(db, instructorOf(courseId), part.id);
    expect(page!.calibration!.points.map((point) => point.finding.kind)).toEqual(["agrees", "agrees"]);

    const slipped = mix({
      calibration: [
        { temperatureC: 20, viscosityPaS: 109 },
        { temperatureC: 30, viscosityPaS: 0.058 },
      ],
    });
    const updated = await updatePart(db, { courseId, partId: part.id, actorId: instructorId, input: slipped });
    expect(updated!.warnings).toEqual([
      {
        field: "calibration",
        message: expect.stringMatching(/^The viscosity at 20 °C is about 1000 times the handbook value .* mPa·s typed as Pa·s/),
      },
    ]);
    expect((await getPartPage(db, instructorOf(courseId), part.id))!.warnings).toEqual(updated!.warnings);
  });

  it("warns when the declared fraction does not fit the calibration, and clears the fraction when it is left empty", async () => {
    const courseId = await newCourse("P-GLY2");
    // Segur's 85 % values declared as 90 %.
    const { part, warnings } = await createPart(db, { courseId, actorId: instructorId, input: mix({ glycerolMassFraction: 0.9 }) });
    expect(warnings.map((warning) => warning.message)).toEqual([
      expect.stringMatching(
        /differs from the handbook value for a glycerol mass fraction of 0\.9 \(Cheng 2008\) by more than its tolerance at 20 °C: -5\d %/,
      ),
    ]);
    // An empty box arrives from zod as undefined; the stored value must still be cleared.
    const cleared = await updatePart(db, {
      courseId,
      partId: part.id,
      actorId: instructorId,
      input: { ...mix(), glycerolMassFraction: undefined },
    });
    expect(cleared!.part.glycerolMassFraction).toBeNull();
    expect(cleared!.warnings).toEqual([]);
    const [remeasured] = (await getPart(db, courseId, part.id))!.events;
    expect(Object.keys(remeasured.detail.changed as object)).toEqual(["glycerolMassFraction"]);
  });

  it("without a declared mix, warns on a viscosity thicker than any kit fluid", async () => {
    const courseId = await newCourse("P-GLY3");
    const { warnings } = await createPart(db, {
      courseId,
      actorId: instructorId,
      input: mix({
        glycerolMassFraction: undefined,
        calibration: [
          { temperatureC: 20, viscosityPaS: 540 },
          { temperatureC: 25, viscosityPaS: 0.38 },
        ],
      }),
    });
    expect(warnings.map((warning) => warning.message)).toEqual([
      expect.stringMatching(/at 20 °C is above 100 Pa·s, thicker than any kit fluid/),
    ]);
  });
});

describe("CSV import", () => {
  const csvRow = (input: PartInput) => partToCsvRow(input);
  const partCount = async (courseId: string) => (await db.select({ n: count() }).from(parts).where(eq(parts.courseId, courseId)))[0].n;

  it("writes nothing when one row of the batch is bad, and names that row's line", async () => {
    const courseId = await newCourse("P-IMP1");
    const rows = [csvRow(sphere("S-1")), { ...csvRow(sphere("S-2")), mass_g: "heavy" }, csvRow(sphere("S-3"))];
    const outcome = await importParts(db, { courseId, actorId: instructorId, rows });
    expect(outcome.created).toBe(0);
    expect(outcome.rejected.map((row) => [row.line, row.problems])).toEqual([[3, ["mass_g: Enter the mass in g."]]]);
    expect(await partCount(courseId)).toBe(0);
  });

  it("refuses the whole batch when a label is already in the course", async () => {
    const courseId = await newCourse("P-IMP2");
    await createPart(db, { courseId, actorId: instructorId, input: sphere("S-1") });
    const outcome = await importParts(db, { courseId, actorId: instructorId, rows: [csvRow(sphere("S-9")), csvRow(sphere("S-1"))] });
    expect(outcome.rejected.map((row) => row.label)).toEqual(["S-1"]);
    expect(await partCount(courseId)).toBe(1);
  });

  it("inserts a clean batch with one history event per part, checking spheres against the columns in the same file", async () => {
    const courseId = await newCourse("P-IMP3");
    const column: PartInput = {
      kind: "column",
      label: "C-1",
      innerDiameterMm: 10,
      timedDistanceMm: 200,
      runInMm: 100,
      marginBelowMm: 50,
      notes: null,
    };
    const result = await importParts(db, {
      courseId,
      actorId: instructorId,
      rows: [csvRow(column), csvRow(sphere("S-1")), csvRow(sphere("W-1", { diameterMm: 12, massG: 7.1 }))],
    });
    expect(result.created).toBe(3);
    expect(result.warnings).toEqual([{ label: "W-1", warnings: [expect.objectContaining({ field: "diameterMm" })] }]);
    const events = await db
      .select({ action: partEvents.action, detail: partEvents.detail })
      .from(partEvents)
      .innerJoin(parts, eq(parts.id, partEvents.partId))
      .where(eq(parts.courseId, courseId));
    expect(events).toHaveLength(3);
    expect(events.every((event) => event.action === "created" && event.detail.source === "csv-import")).toBe(true);
  });
});

describe("the parts table", () => {
  it("runs the same number of statements for 10 and for 1,000 parts", async () => {
    const courseId = await newCourse("P-LIST");
    const batch = (from: number, to: number) =>
      Array.from({ length: to - from }, (_, i) => ({
        courseId,
        kind: "sphere" as const,
        label: `S-${String(from + i).padStart(4, "0")}`,
        material: "steel",
        diameterMm: 4,
        massG: 0.263,
      }));
    const statementsFor = async () => {
      const spy = vi.spyOn(pool, "query");
      try {
        const page = await listParts(db, courseId, { page: 2, pageSize: 25, kind: "sphere", search: "S-" });
        return { statements: spy.mock.calls.length, page };
      } finally {
        spy.mockRestore();
      }
    };
    await db.insert(parts).values(batch(0, 10));
    const small = await statementsFor();
    await db.insert(parts).values(batch(10, 1000));
    const large = await statementsFor();
    expect(small.statements).toBe(2);
    expect(large.statements).toBe(small.statements);
    expect(small.page.total).toBe(10);
    expect(large.page).toMatchObject({ total: 1000, rows: expect.arrayContaining([expect.objectContaining({ label: "S-0025" })]) });
    expect(large.page.rows).toHaveLength(25);
  });
});

describe("inventory export", () => {
  it("neutralises cells a spreadsheet would run as formulas", async () => {
    const courseId = await newCourse("P-CSV");
    await createPart(db, { courseId, actorId: instructorId, input: sphere("S-1", { material: "+SUM(A1:A9)", notes: "=1+1" }) });
    const request = appRequest(`/courses/${courseId}/inventory.csv`, { cookie: await sessionCookieFor(instructorId) });
    const response = await inventoryCsvLoader({ request, params: { courseId }, context: new RouterContextProvider() } as never);
    expect(response.headers.get("Content-Type")).toBe("text/csv; charset=utf-8");
    const [row] = Papa.parse<Record<string, string>>((await response.text()).replace(/^\uFEFF/, ""), {
      header: true,
      skipEmptyLines: true,
    }).data;
    expect(row).toMatchObject({
      kind: "sphere",
      label: "S-1",
      material: "'+SUM(A1:A9)",
      notes: "'=1+1",
      status: "in_service",
      kit_number: "",
    });
  });
});

describe("a fluid lot's page", () => {
  // Water at 0.1 MPa, mPa·s: IAPWS 2008 (Huber et al. 2009, J. Phys. Chem. Ref. Data 38, 101), values from
  // memory; they agree within 0.1 % with the LSBU water data table (1.307, 1.002, 0.797, 0.653 cP).
  const water = [
    { temperatureC: 10, viscosityPaS: 1.3059e-3 },
    { temperatureC: 20, viscosityPaS: 1.0016e-3 },
    { temperatureC: 30, viscosityPaS: 0.7972e-3 },
    { temperatureC: 40, viscosityPaS: 0.6527e-3 },
  ];

  it("shows the reduction engine's Andrade fit of the stored points, which follows water within 2 % from 10 to 40 °C", async () => {
    const courseId = await newCourse("P-FIT");
    // Stored out of order: the page sorts the points by temperature.
    const input: PartInput = {
      kind: "fluid_lot",
      label: "W-1",
      fluidName: "water",
      densityKgM3: 998,
      calibration: [water[2], water[0], water[3], water[1]],
      notes: null,
    };
    const { part } = await createPart(db, { courseId, actorId: instructorId, input });
    const page = await getPartPage(db, instructorOf(courseId), part.id);
    const calibration = page!.calibration!;

    const engineFit = fitFluidViscosity(water.map((point) => ({ temperature: point.temperatureC, viscosity: point.viscosityPaS })));
    // Same fit up to the order of summation (the lot stores its points in the order they were typed).
    const { residual, ...fit } = calibration.fit;
    const { residual: engineResidual, ...engineRest } = engineFit;
    expect(fit).toEqual({
      ...engineRest,
      a: expect.closeTo(engineFit.a, 9),
      b: expect.closeTo(engineFit.b, 6),
      maxRelativeResidual: expect.closeTo(engineFit.maxRelativeResidual, 12),
    });
    expect(residual?.degreesOfFreedom).toBe(2);
    expect(residual!.standardError / engineResidual!.standardError).toBeCloseTo(1, 9);
    expect(residual!.sxx / engineResidual!.sxx).toBeCloseTo(1, 9);
    expect(calibration.quoted.map((row) => row.temperatureC)).toEqual([15, 20, 25, 30]);
    expect(calibration.quoted[1].viscosityPaS).toBeCloseTo(viscosityAt(engineFit, 20), 12);
    expect(calibration.quoted.some((row) => row.extrapolated)).toBe(false);
    // The two-parameter Andrade form cannot follow water's curvature exactly: about 1–2 % over 30 K.
    expect(calibration.points.map((point) => point.temperatureC)).toEqual([10, 20, 30, 40]);
    for (const point of calibration.points) {
      expect(Math.abs(point.residualPercent)).toBeLessThan(2);
      expect(point.residualPercent).toBeCloseTo((point.viscosityPaS / viscosityAt(engineFit, point.temperatureC) - 1) * 100, 9);
    }
    expect(Math.abs(calibration.quoted[1].viscosityPaS / 1.0016e-3 - 1)).toBeLessThan(0.02);
  });
});
