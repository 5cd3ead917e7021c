/**
 * Handing in a drop log: the server's reduction, idempotency, immutable numbered versions, the due
 * time and cut-off across a daylight-saving change, the statements a hand-in costs, and that students
 * of one lab do not wait on each other's hand-ins.
 */
import { AppError } from "~/lib/app-error";
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { TZDate } from "@date-fns/tz";
import { and, asc, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { courses, dropLogPhotos, emailOutbox, dropLogs, dropLogVersions, kitParts, kits, labCohorts, labs, parts } from "~/db/schema";
import {
  calibrationUncertainty,
  fitFluidViscosity,
  reduceFallingSphere,
  viscosityAt,
  viscosityTemperatureCoefficient,
} from "~/lib/reduction";
import type { CourseAccess } from "~/server/auth/access.server";
import { db, type Database } from "~/server/db.server";
import { loadCountedHandIns } from "~/server/comparison/class-comparison.server";
import { loadStudentMarkRows } from "~/server/marking/mark-rows.server";
import {
  ensureDropLog,
  getDropLogForStudent,
  handInDropLog,
  listVersions,
  previewDropLog,
  saveDraft,
} from "~/server/drop-logs/hand-in.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { countAllStatements, countStatements } from "../support/count-statements";
import { SECOND_LOT_DENSITY, createTwoLotKit, type TwoLotKit } from "../support/two-lot-kit";

let fixture: AccessFixture;
let secondSphereId: string;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };
const calibration = [
  { temperatureC: 20, viscosityPaS: 1.41 },
  { temperatureC: 25, viscosityPaS: 0.94 },
];

function accessOf(actor: "ownStudent" | "sameCohortStudent"): CourseAccess {
  return {
    user: { id: fixture.userIds[actor], email: `${actor}@hand-in.example`, name: actor, sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "hand-in-A", term: "Test term", timeZone: "Europe/Dublin" },
    membership: { id: fixture.membershipIds[actor], role: "student", cohortId: fixture.cohortId },
    cohortIds: [fixture.cohortId],
  } as unknown as CourseAccess;
}

async function createLab(values: Partial<typeof labs.$inferInsert> = {}) {
  const day = 24 * 3600 * 1000;
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title: "Settling in glycerol",
      kind: "drag",
      status: "published",
      opensAt: new Date(Date.now() - day),
      dueAt: new Date(Date.now() + day),
      requiredDrops: 5,
      resolutions,
      ...values,
    })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: fixture.cohortId });
  return lab;
}

const drops = [7.41, 7.52, 7.47, 7.38, 7.5, 7.44];
const inputFor = (sphereId: string, extra: Record<string, unknown> = {}) => ({ sphereId, temperatureC: 22.4, drops, ...extra });

beforeAll(async () => {
  process.env.STORAGE_DIR = await mkdtemp(path.join(tmpdir(), "benchpost-hand-in-"));
  fixture = await createAccessFixture("hand-in");
  await db.update(courses).set({ timeZone: "Europe/Dublin" }).where(eq(courses.id, fixture.courseId));
  // A kit for the second student of cohort one, with its own sphere and column and the shared fluid lot.
  const [lot] = await db
    .select({ id: parts.id })
    .from(parts)
    .where(and(eq(parts.courseId, fixture.courseId), eq(parts.kind, "fluid_lot")));
  const [sphere, column] = await db
    .insert(parts)
    .values([
      { courseId: fixture.courseId, kind: "sphere", label: "S-2", material: "steel", diameterMm: 3.175, massG: 0.1307 },
      { courseId: fixture.courseId, kind: "column", label: "C-2", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
    ])
    .returning();
  secondSphereId = sphere.id;
  const [kit] = await db
    .insert(kits)
    .values({ courseId: fixture.courseId, number: "K-02", state: "at_home", holderMembershipId: fixture.membershipIds.sameCohortStudent })
    .returning();
  await db.insert(kitParts).values([
    { kitId: kit.id, partId: sphere.id },
    { kitId: kit.id, partId: column.id },
    { kitId: kit.id, partId: lot.id, exclusive: false },
  ]);
});

describe("the server's reduction", () => {
  it("equals the engine's for the same inputs converted to SI by hand", async () => {
    const lab = await createLab();
    const { version } = await handInDropLog(db, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      input: inputFor(fixture.sphereId),
      idempotencyKey: "reduction-equal-1",
    });
    const [stored] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, version.id));

    const fit = fitFluidViscosity(calibration.map((point) => ({ temperature: point.temperatureC, viscosity: point.viscosityPaS })));
    const lotCalibration = calibrationUncertainty(fit, 22.4);
    const expected = reduceFallingSphere({
      mode: "drag",
      sphere: { diameter: 3e-3, mass: 0.11e-3 },
      fluid: {
        density: 1260,
        viscosity: viscosityAt(fit, 22.4),
        temperature: 22.4,
        viscosityTemperatureCoefficient: viscosityTemperatureCoefficient(fit, 22.4),
        viscosityDegreesOfFreedom: lotCalibration.degreesOfFreedom,
      },
      column: { timedDistance: 0.2, innerDiameter: 0.04, runIn: 0.1 },
      drops,
      g: 9.80665,
      wallCorrection: "faxen",
      dragModel: "schiller-naumann",
      uncertainties: {
        diameter: 0.01e-3 / Math.sqrt(12),
        mass: 0.001e-3 / Math.sqrt(12),
        distance: 1e-3 / Math.sqrt(12),
        time: 0.01 / Math.sqrt(12),
        // The lab's 0.1 °C resolution and, saved before it was asked, the default ±0.5 °C accuracy (a/√3).
        temperature: Math.hypot(0.1 / Math.sqrt(12), 0.5 / Math.sqrt(3)),
        fluidDensity: 0,
        // No bore uncertainty on the column: the lab's 0.01 mm diameter resolution.
        columnDiameter: 0.01e-3 / Math.sqrt(12),
        fluidViscosity: lotCalibration.relative * viscosityAt(fit, 22.4),
      },
      requiredDrops: 5,
    });
    const { warnings, ...reduction } = stored.reduction;
    expect(reduction).toEqual(JSON.parse(JSON.stringify(expected)));
    expect(Array.isArray(warnings)).toBe(true);
    expect(stored.reynolds).toBeCloseTo(expected.reynolds, 6);
    expect(stored.dragCoefficient).toBeCloseTo(expected.dragCoefficient, 4);
    expect(stored.normalisedFigure).toBeCloseTo(
      expected.dragCoefficient / (expected.mode === "drag" ? expected.referenceDragCoefficient : NaN),
      4,
    );
    expect(stored.kitRecords).toMatchObject({ sphere: { diameterMm: 3, massG: 0.11, source: "kit" }, column: { timedDistanceMm: 200 } });
  });

  it("uses the kit's sphere record, keeps the student's own and warns when they differ by more than 2 %", async () => {
    const lab = await createLab();
    const { version } = await handInDropLog(db, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      input: inputFor(fixture.sphereId, { ownDiameterMm: "3.02", ownMassG: "0.118" }),
      idempotencyKey: "own-measurements-1",
    });
    const [stored] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, version.id));
    expect(stored.input).toMatchObject({ ownDiameterMm: 3.02, ownMassG: 0.118 });
    expect(stored.kitRecords).toMatchObject({ sphere: { diameterMm: 3, massG: 0.11 } });
    const codes = (stored.reduction.warnings as { code: string }[]).map((warning) => warning.code);
    // 3.02 mm is 0.7 % from the record: no warning; 0.118 g is 7 %: a warning.
    expect(codes).toContain("own-mass-disagrees-with-kit");
    expect(codes).not.toContain("own-diameter-disagrees-with-kit");
  });

  it("refuses input with a message per drop row", async () => {
    const lab = await createLab();
    const refusal = await handInDropLog(db, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      input: inputFor(fixture.sphereId, { drops: ["7.4", "abc", "-2", "900", "0.01"] }),
      idempotencyKey: "bad-rows-1",
    }).catch((error: unknown) => error);
    expect(refusal).toBeInstanceOf(AppError);
    const issues = (refusal as AppError).issues!.map((issue) => [issue.path.join("."), issue.message]);
    expect(issues.map(([path]) => path)).toEqual(["drops.1", "drops.2", "drops.3", "drops.4"]);
    expect(issues[1][1]).toMatch(/negative/);
    expect(issues[2][1]).toMatch(/600 s/);
  });

  it("refuses a sphere that is not in the student's kit", async () => {
    const lab = await createLab();
    const refusal = await handInDropLog(db, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      input: inputFor(secondSphereId),
      idempotencyKey: "other-sphere-1",
    }).catch((error: unknown) => error);
    expect(refusal).toMatchObject({ code: "sphere_not_in_kit" });
  });
});

describe("the parts a hand-in names", () => {
  let kit: TwoLotKit;
  const refusalOf = (promise: Promise<unknown>) =>
    promise.then(
      () => null,
      (error: unknown) => error as AppError,
    );
  const handIn = (labId: string, input: Record<string, unknown>, key: string) =>
    handInDropLog(db, { access: kit.access, labId, input: { temperatureC: 22.4, drops, ...input }, idempotencyKey: key });

  beforeAll(async () => {
    kit = await createTwoLotKit(fixture, "hand-in-parts");
  });

  it("asks which bottle and which column when the lab allows two of each in the kit, at the field, with 400", async () => {
    const lab = await createLab();
    const noLot = await refusalOf(handIn(lab.id, { sphereId: kit.spheres[0], columnId: kit.columns[0] }, "parts-no-lot"));
    expect(noLot).toMatchObject({
      code: "part_not_chosen",
      status: 400,
      issues: [{ path: ["fluidLotId"], message: expect.stringMatching(/F-1, F-2/) }],
    });
    const noColumn = await refusalOf(handIn(lab.id, { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[1] }, "parts-no-column"));
    expect(noColumn).toMatchObject({ code: "part_not_chosen", status: 400, issues: [{ path: ["columnId"] }] });
    // The live preview refuses the same way, so the form shows it while the student types.
    await expect(
      previewDropLog(db, {
        access: kit.access,
        labId: lab.id,
        input: { sphereId: kit.spheres[0], columnId: kit.columns[0], temperatureC: 22, drops },
      }),
    ).rejects.toMatchObject({
      code: "part_not_chosen",
      issues: [{ path: ["fluidLotId"] }],
    });
  });

  it("reduces against the lot and column chosen, not the first of the kit", async () => {
    const lab = await createLab();
    const second = await handIn(
      lab.id,
      { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[1], columnId: kit.columns[1] },
      "parts-second-lot",
    );
    const first = await handIn(
      lab.id,
      { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[0], columnId: kit.columns[0] },
      "parts-first-lot",
    );
    const rows = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, second.version.id));
    const [firstRow] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, first.version.id));
    expect(rows[0]).toMatchObject({ fluidLotId: kit.fluidLots[1], columnId: kit.columns[1] });
    // F-2's recorded density and C-4's bore and band distance, as createTwoLotKit records them.
    expect(rows[0].kitRecords).toMatchObject({
      fluidLot: { id: kit.fluidLots[1], label: "F-2", densityKgM3: SECOND_LOT_DENSITY },
      column: { label: "C-4", innerDiameterMm: 50, timedDistanceMm: 250 },
    });
    expect(firstRow.kitRecords).toMatchObject({
      fluidLot: { label: "F-1", densityKgM3: 1260 },
      column: { label: "C-3", timedDistanceMm: 200 },
    });
  });

  it("takes the lab's only allowed lot in the kit when none is named, and refuses the other one", async () => {
    const lab = await createLab({ allowedPartIds: [kit.fluidLots[1], kit.columns[0]] });
    const { version } = await handIn(lab.id, { sphereId: kit.spheres[1] }, "parts-only-allowed");
    const [stored] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, version.id));
    // No sphere ticked: any sphere of the kit, here the second.
    expect(stored).toMatchObject({ sphereId: kit.spheres[1], fluidLotId: kit.fluidLots[1], columnId: kit.columns[0] });
    const otherLot = await refusalOf(handIn(lab.id, { sphereId: kit.spheres[1], fluidLotId: kit.fluidLots[0] }, "parts-lot-not-allowed"));
    expect(otherLot).toMatchObject({
      code: "part_not_allowed",
      status: 400,
      issues: [{ path: ["fluidLotId"], message: expect.stringMatching(/does not use fluid lot F-1; choose one of F-2/) }],
    });
    const otherColumn = await refusalOf(handIn(lab.id, { sphereId: kit.spheres[1], columnId: kit.columns[1] }, "parts-column-not-allowed"));
    expect(otherColumn).toMatchObject({ code: "part_not_allowed", status: 400, issues: [{ path: ["columnId"] }] });
  });

  it("refuses a lot, a column or a sphere that is not in the student's kit", async () => {
    const lab = await createLab();
    const chosen = { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[0], columnId: kit.columns[0] };
    const lot = await refusalOf(handIn(lab.id, { ...chosen, fluidLotId: kit.foreignFluidLotId }, "parts-foreign-lot"));
    expect(lot).toMatchObject({
      code: "part_not_in_kit",
      status: 400,
      issues: [{ path: ["fluidLotId"], message: "That fluid lot is not in your kit." }],
    });
    const column = await refusalOf(handIn(lab.id, { ...chosen, columnId: kit.foreignColumnId }, "parts-foreign-column"));
    expect(column).toMatchObject({
      code: "part_not_in_kit",
      status: 400,
      issues: [{ path: ["columnId"], message: "That column is not in your kit." }],
    });
    const sphere = await refusalOf(handIn(lab.id, { ...chosen, sphereId: kit.foreignSphereId }, "parts-foreign-sphere"));
    expect(sphere).toMatchObject({ code: "sphere_not_in_kit", status: 400, issues: [{ path: ["sphereId"] }] });
    // A part of the kit named for the wrong kind (a column as the lot) is not a lot of the kit.
    const wrongKind = await refusalOf(handIn(lab.id, { ...chosen, fluidLotId: kit.columns[0] }, "parts-wrong-kind"));
    expect(wrongKind).toMatchObject({ code: "part_not_in_kit", issues: [{ path: ["fluidLotId"] }] });
    expect(await getDropLogForStudent(db, { labId: lab.id, membershipId: kit.access.membership.id })).toBeNull();
  });

  it("refuses a sphere of the kit that the lab does not allow", async () => {
    const lab = await createLab({ allowedPartIds: [kit.spheres[0]] });
    const refusal = await refusalOf(
      handIn(lab.id, { sphereId: kit.spheres[1], fluidLotId: kit.fluidLots[0], columnId: kit.columns[0] }, "parts-sphere-not-allowed"),
    );
    expect(refusal).toMatchObject({
      code: "part_not_allowed",
      status: 400,
      issues: [{ path: ["sphereId"], message: expect.stringMatching(/does not use sphere S-4; choose one of S-3/) }],
    });
  });

  it("keeps the chosen lot and column in the draft", async () => {
    const lab = await createLab();
    await saveDraft(db, {
      access: kit.access,
      labId: lab.id,
      draft: { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[1], columnId: kit.columns[1], drops: ["7.4"] },
    });
    const dropLog = await getDropLogForStudent(db, { labId: lab.id, membershipId: kit.access.membership.id });
    expect(dropLog?.draft).toMatchObject({ fluidLotId: kit.fluidLots[1], columnId: kit.columns[1] });
  });

  it("accepts a hand-in while the kit is in transit, and stores a warning that the comparison shows", async () => {
    const lab = await createLab();
    const chosen = { sphereId: kit.spheres[0], fluidLotId: kit.fluidLots[0], columnId: kit.columns[0] };
    const atHome = await handIn(lab.id, chosen, "parts-at-home");
    await db.update(kits).set({ state: "in_transit" }).where(eq(kits.id, kit.kitId));
    try {
      const inTransit = await handIn(lab.id, chosen, "parts-in-transit");
      const [homeRow] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, atHome.version.id));
      const [transitRow] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, inTransit.version.id));
      const codes = (row: typeof homeRow) => (row.reduction.warnings as { code: string }[]).map((warning) => warning.code);
      expect(codes(homeRow)).not.toContain("kit-not-at-home");
      expect(transitRow.reduction.warnings).toContainEqual({
        code: "kit-not-at-home",
        level: "warn",
        field: "form",
        message: expect.stringMatching(/Kit K-03 was recorded as “In transit”/),
      });
      expect(transitRow.warningCount).toBe(homeRow.warningCount + 1);
      expect(transitRow.kitRecords).toMatchObject({ kit: { number: "K-03", state: "in_transit" } });
      const counted = await loadCountedHandIns(db, lab.id);
      expect(counted.find((row) => row.versionId === inTransit.version.id)?.kitNotAtHome).toBe("In transit");
      // The marking desk's row says it too, and the fixture student's hand-in at home does not.
      const deskRows = await loadStudentMarkRows(db, lab, { cohortIds: [fixture.cohortId] });
      expect(deskRows.find((row) => row.membershipId === kit.access.membership.id)?.handIn).toMatchObject({
        versionId: inTransit.version.id,
        kitNotAtHome: "In transit",
      });
      await handInDropLog(db, {
        access: accessOf("ownStudent"),
        labId: lab.id,
        input: inputFor(fixture.sphereId),
        idempotencyKey: "parts-own-at-home",
      });
      const ownRow = (await loadStudentMarkRows(db, lab, { cohortIds: [fixture.cohortId] })).find(
        (row) => row.membershipId === fixture.membershipIds.ownStudent,
      );
      expect(ownRow?.handIn).toMatchObject({ kitNotAtHome: null });
    } finally {
      await db.update(kits).set({ state: "at_home" }).where(eq(kits.id, kit.kitId));
    }
  });
});

describe("idempotent hand-in", () => {
  it("stores one version for the same key sent twice", async () => {
    const lab = await createLab();
    const args = { access: accessOf("ownStudent"), labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: "double-tap-1" };
    const first = await handInDropLog(db, args);
    const second = await handInDropLog(db, args);
    expect(first.duplicate).toBe(false);
    expect(second).toEqual({ version: first.version, duplicate: true });
    const dropLog = await getDropLogForStudent(db, { labId: lab.id, membershipId: fixture.membershipIds.ownStudent });
    expect(dropLog?.versions).toHaveLength(1);
  });

  it("stores one version for the same key sent concurrently", async () => {
    const lab = await createLab();
    const args = { access: accessOf("ownStudent"), labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: "concurrent-key-1" };
    const results = await Promise.all([handInDropLog(db, args), handInDropLog(db, args), handInDropLog(db, args)]);
    expect(results.filter((result) => !result.duplicate)).toHaveLength(1);
    expect(new Set(results.map((result) => result.version.id)).size).toBe(1);
    const dropLog = await getDropLogForStudent(db, { labId: lab.id, membershipId: fixture.membershipIds.ownStudent });
    expect(dropLog?.versions.map((version) => version.version)).toEqual([1]);
  });
});

describe("a hand-in's statements", () => {
  it("are six for a new version and five for a repeat, begin and commit included", async () => {
    // At the deadline every hand-in pays per statement, so the budget is pinned here: the lab and the
    // kit (two, side by side), then begin, the drop log created or locked with the lab's marking lock
    // and its versions read, one statement that stores the version with its photos, first revision,
    // receipt, relabel and delivery jobs, and commit. A repeat stops after the lock.
    const lab = await createLab();
    const args = { access: accessOf("ownStudent"), labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: "statement-budget-1" };
    const first = await countAllStatements(() => handInDropLog(db, args));
    expect(first.result.duplicate).toBe(false);
    expect(first.statements).toBe(6);
    const repeat = await countAllStatements(() => handInDropLog(db, args));
    expect(repeat.result).toEqual({ version: first.result.version, duplicate: true });
    expect(repeat.statements).toBe(5);
  });
});

describe("the hand-in receipt", () => {
  it("is queued once per version, with its number, time and zone, and not again when the hand-in is replayed", async () => {
    const lab = await createLab({ title: "Receipt lab" });
    const access = accessOf("ownStudent");
    // The outbox keeps addresses lower-cased.
    const address = access.user.email.toLowerCase();
    const receipts = () =>
      db
        .select({ dedupeKey: emailOutbox.dedupeKey, props: emailOutbox.props, subject: emailOutbox.subject, status: emailOutbox.status })
        .from(emailOutbox)
        .where(
          and(eq(emailOutbox.courseId, fixture.courseId), eq(emailOutbox.template, "hand-in-receipt"), eq(emailOutbox.toAddress, address)),
        )
        .orderBy(asc(emailOutbox.createdAt));
    const before = (await receipts()).length;
    const args = { access, labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: "receipt-key-1" };
    const first = await handInDropLog(db, args);
    const replay = await handInDropLog(db, args);
    expect(replay.duplicate).toBe(true);
    const second = await handInDropLog(db, { ...args, idempotencyKey: "receipt-key-2" });
    const sent = (await receipts()).slice(before);
    expect(sent.map((row) => row.dedupeKey)).toEqual([`hand-in-receipt:${first.version.id}`, `hand-in-receipt:${second.version.id}`]);
    expect(sent[1]).toMatchObject({
      status: "queued",
      subject: "Receipt: Receipt lab, version 2 handed in",
      props: { version: 2, timeZone: "Europe/Dublin", late: false, labTitle: "Receipt lab", courseTitle: "Settling Spheres" },
    });
    expect(sent[1].props.handedInAt).toBe(second.version.submittedAt.toISOString());
    expect(String(sent[1].props.receiptUrl)).toMatch(new RegExp(`/courses/${fixture.courseId}/labs/${lab.id}#receipt$`));
    // Each queued receipt has its delivery job, inserted on the hand-in's transaction.
    const jobs = await db.execute<{ n: number }>(
      sql`select count(*)::int as n from pgboss.job where name = 'email-delivery' and data->>'outboxId' in (select id::text from email_outbox where dedupe_key like 'hand-in-receipt:%' and to_address = ${address})`,
    );
    expect(jobs.rows[0].n).toBe(before + 2);
  });
});

describe("versions", () => {
  it("are numbered, never changed, and the latest counts; the draft's photos go with the hand-in", async () => {
    const lab = await createLab();
    const access = accessOf("ownStudent");
    await saveDraft(db, { access, labId: lab.id, draft: { temperatureC: "22.", drops: ["7.4", ""] } });
    const dropLogId = await ensureDropLog(db, { labId: lab.id, membershipId: access.membership.id });
    const [photo] = await db
      .insert(dropLogPhotos)
      .values({ dropLogId, storageKey: `${dropLogId}/a`, contentType: "image/jpeg", bytes: 10 })
      .returning();

    const first = await handInDropLog(db, { access, labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: "versions-1" });
    const [firstRow] = await db.select().from(dropLogVersions).where(eq(dropLogVersions.id, first.version.id));
    const second = await handInDropLog(db, {
      access,
      labId: lab.id,
      input: inputFor(fixture.sphereId, { temperatureC: 23 }),
      idempotencyKey: "versions-2",
    });
    const third = await handInDropLog(db, {
      access,
      labId: lab.id,
      input: inputFor(fixture.sphereId, { drops: [7.6, 7.7, 7.65] }),
      idempotencyKey: "versions-3",
    });

    expect([first, second, third].map((result) => result.version.version)).toEqual([1, 2, 3]);
    const versions = await listVersions(db, dropLogId);
    expect(versions.map((version) => version.version)).toEqual([3, 2, 1]);
    expect(versions.find((version) => version.id === first.version.id)).toEqual(firstRow);
    const [log] = await db.select().from(dropLogs).where(eq(dropLogs.id, dropLogId));
    expect(log.latestVersionId).toBe(third.version.id);
    expect(log.draft).toBeNull();
    const [attached] = await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.id, photo.id));
    expect(attached.versionId).toBe(first.version.id);
  });

  it("reads a drop log with its versions and photos in one statement", async () => {
    const lab = await createLab();
    const access = accessOf("ownStudent");
    for (const key of ["few-statements-1", "few-statements-2"])
      await handInDropLog(db, { access, labId: lab.id, input: inputFor(fixture.sphereId), idempotencyKey: key });
    const { statements, result } = await countStatements(() =>
      getDropLogForStudent(db, { labId: lab.id, membershipId: access.membership.id }),
    );
    expect(result?.versions).toHaveLength(2);
    expect(statements).toBe(1);
  });
});

describe("due time and cut-off across the spring clock change in Europe/Dublin", () => {
  // Irish clocks go from 01:00 GMT to 02:00 IST on the last Sunday of March: 28 March 2027.
  const local = (day: number, hour: number, minute: number) =>
    new Date(new TZDate(2027, 2, day, hour, minute, 0, "Europe/Dublin").getTime());
  let labId: string;

  beforeAll(async () => {
    const lab = await createLab({ opensAt: local(21, 9, 0), dueAt: local(28, 23, 59), lateCutoffAt: local(29, 12, 0) });
    labId = lab.id;
  });

  it("takes the due time as 23:59 Irish Summer Time, 22:59 UTC", () => {
    expect(local(28, 23, 59).toISOString()).toBe("2027-03-28T22:59:00.000Z");
  });

  it("is on time at 23:30 local, late at 00:30 the next day, refused after the cut-off", async () => {
    const access = accessOf("ownStudent");
    const hand = (key: string, now: Date) =>
      handInDropLog(db, { access, labId, input: inputFor(fixture.sphereId), idempotencyKey: key, now });
    const onTime = await hand("dst-on-time", local(28, 23, 30));
    expect(onTime.version.late).toBe(false);
    const late = await hand("dst-late", local(29, 0, 30));
    expect(late.version.late).toBe(true);
    await expect(hand("dst-refused", local(29, 12, 1))).rejects.toMatchObject({
      code: "past_cutoff",
      message: expect.stringMatching(/cut-off has passed/),
    });
    await expect(hand("dst-early", local(21, 8, 59))).rejects.toMatchObject({ code: "not_open" });
    // A retry of a stored hand-in after the cut-off gets its version back rather than a refusal.
    await expect(hand("dst-late", local(30, 9, 0))).resolves.toMatchObject({ duplicate: true, version: { id: late.version.id } });
  });
});

describe("two students handing in at the same time", () => {
  it("do not wait for each other: one student's open hand-in blocks only that student", async () => {
    const lab = await createLab();
    let release!: () => void;
    const released = new Promise<void>((resolve) => (release = resolve));
    let entered!: () => void;
    const holding = new Promise<void>((resolve) => (entered = resolve));
    // A real hand-in whose transaction stays open, with every lock it took, until released.
    const held = new Proxy(db, {
      get(target, property, receiver) {
        if (property !== "transaction") return Reflect.get(target, property, receiver);
        return (work: Parameters<Database["transaction"]>[0]) =>
          target.transaction(async (tx) => {
            const result = await work(tx);
            entered();
            await released;
            return result;
          });
      },
    });
    const first = handInDropLog(held, {
      access: accessOf("ownStudent"),
      labId: lab.id,
      input: inputFor(fixture.sphereId),
      idempotencyKey: "held-open-1",
    });
    await holding;
    try {
      const other = await Promise.race([
        handInDropLog(db, {
          access: accessOf("sameCohortStudent"),
          labId: lab.id,
          input: inputFor(secondSphereId),
          idempotencyKey: "free-to-go-1",
        }),
        new Promise<"blocked">((resolve) => setTimeout(() => resolve("blocked"), 5000)),
      ]);
      expect(other).not.toBe("blocked");
      const committed = await db
        .select({ version: dropLogVersions.version })
        .from(dropLogVersions)
        .innerJoin(dropLogs, eq(dropLogs.id, dropLogVersions.dropLogId))
        .where(eq(dropLogs.labId, lab.id))
        .orderBy(asc(dropLogVersions.version));
      // The other student's version is committed while the first student's is still open.
      expect(committed).toEqual([{ version: 1 }]);

      // The same student's second hand-in does wait for the first: versions are numbered under the lock.
      const again = handInDropLog(db, {
        access: accessOf("ownStudent"),
        labId: lab.id,
        input: inputFor(fixture.sphereId),
        idempotencyKey: "held-open-2",
      });
      const early = await Promise.race([again.then(() => "done"), new Promise((resolve) => setTimeout(() => resolve("waiting"), 500))]);
      expect(early).toBe("waiting");
      release();
      expect((await first).version.version).toBe(1);
      expect((await again).version.version).toBe(2);
    } finally {
      release();
    }
  });
});
