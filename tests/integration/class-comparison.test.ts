/**
 * The class comparison on a real PostgreSQL: labels read live and written by the relabel job, a method
 * change relabelling in one transaction, hand-ins that never wait for each other, kit-part bias, and
 * constant statement counts whatever the class size.
 */
import { RouterContextProvider } from "react-router";
import { and, count, eq, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { comparisonLabelChanges, comparisonLabels, kitParts, kits, labCohorts, labs, parts } from "~/db/schema";
import type { CourseAccess } from "~/server/auth/access.server";
import {
  COMPARISON_TABLE_PAGE_SIZE,
  getLabComparison,
  loadComparisonLab,
  previewLabSettings,
  relabelLab,
  updateComparisonSettings,
} from "~/server/comparison/class-comparison.server";
import { listPartBias } from "~/server/comparison/part-quality.server";
import { db } from "~/server/db.server";
import { handInDropLog } from "~/server/drop-logs/hand-in.server";
import { queues } from "~/server/jobs/boss.server";
import { createAccessFixture, type AccessFixture } from "../support/access-fixture";
import { appRequest, sessionCookieFor } from "../support/app-requests";
import { quietClass, seedClass } from "../support/comparison-class";
import { countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let instructorAccess: CourseAccess;

const day = 24 * 3600 * 1000;
const resolutions = { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 };

function accessOf(actor: "ownStudent" | "sameCohortStudent" | "instructor", role: "student" | "instructor"): CourseAccess {
  return {
    user: { id: fixture.userIds[actor], email: `${actor}@cc.example`, name: actor, sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "cc-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds[actor], role, cohortId: role === "student" ? fixture.cohortId : null },
    cohortIds: [fixture.cohortId, fixture.otherCohortId],
  } as unknown as CourseAccess;
}

async function newLab(title: string, kind: "drag" | "viscometry" = "drag") {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId: fixture.courseId,
      title,
      kind,
      status: "published",
      opensAt: new Date(Date.now() - day),
      dueAt: new Date(Date.now() + day),
      resolutions,
    })
    .returning();
  await db.insert(labCohorts).values({ labId: lab.id, cohortId: fixture.cohortId });
  return (await loadComparisonLab(db, fixture.courseId, lab.id))!;
}

const storedLabels = (labId: string) => db.select().from(comparisonLabels).where(eq(comparisonLabels.labId, labId));
const historyCount = async (labId: string) =>
  (await db.select({ n: count() }).from(comparisonLabelChanges).where(eq(comparisonLabelChanges.labId, labId)))[0].n;

beforeAll(async () => {
  fixture = await createAccessFixture("cc");
  instructorAccess = accessOf("instructor", "instructor");
  // A second kit, for sameCohortStudent: the same kind of sphere and column, the shared fluid lot.
  const [fluidLot] = await db
    .select()
    .from(parts)
    .where(and(eq(parts.courseId, fixture.courseId), eq(parts.label, "F-1")));
  const [kit] = await db
    .insert(kits)
    .values({ courseId: fixture.courseId, number: "K-02", state: "at_home", holderMembershipId: fixture.membershipIds.sameCohortStudent })
    .returning();
  const [sphere, column] = await db
    .insert(parts)
    .values([
      { courseId: fixture.courseId, kind: "sphere", label: "S-2", material: "steel", diameterMm: 3, massG: 0.11 },
      { courseId: fixture.courseId, kind: "column", label: "C-2", innerDiameterMm: 40, timedDistanceMm: 200, runInMm: 100 },
    ])
    .returning();
  await db.insert(kitParts).values([
    { kitId: kit.id, partId: sphere.id },
    { kitId: kit.id, partId: column.id },
    { kitId: kit.id, partId: fluidLot.id, exclusive: false },
  ]);
});

describe("a method change", () => {
  it("relabels every hand-in in one transaction, and the history grows by the changed ones", async () => {
    const lab = await newLab("Method change");
    await seedClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      members: [...quietClass(), { figure: 1.31 }, { figure: 1.16 }].map((figure) => (typeof figure === "number" ? { figure } : figure)),
      label: "mc",
    });
    const first = await relabelLab(db, lab.id);
    expect(first).toMatchObject({ labelled: 39, changed: 39 });
    const before = new Map((await storedLabels(lab.id)).map((row) => [row.dropLogId, row.label]));
    // Grubbs at α = 0.05 removes both planted figures from so tight a class; Tukey at k = 1.5 calls 1.16 only suspect.
    expect([...before.values()].filter((label) => label === "outlier")).toHaveLength(2);

    const outcome = await updateComparisonSettings(db, {
      access: instructorAccess,
      lab,
      settings: { method: "iqr", alpha: 0.05, maxOutliers: 3, k: 1.5 },
    });
    const after = await storedLabels(lab.id);
    const changed = after.filter((row) => before.get(row.dropLogId) !== row.label).length;
    expect(changed).toBeGreaterThan(0);
    expect(outcome.changed).toBe(changed);
    expect(await historyCount(lab.id)).toBe(39 + changed);
    // now() is the transaction's start time: one value for every row means one transaction wrote them all.
    expect(new Set(after.map((row) => row.computedAt.toISOString())).size).toBe(1);
    expect(after.every((row) => row.method.method === "iqr")).toBe(true);
    const [saved] = await db.select().from(labs).where(eq(labs.id, lab.id));
    expect(saved.comparisonMethod).toBe("iqr");
  });
});

describe("the generalized ESD method", () => {
  it("is saved as the lab's method, relabels with Rosner's R and λ, and is counted in the preview", async () => {
    const lab = await newLab("ESD method");
    // NIST/SEMATECH e-Handbook §1.3.5.17.3 (Rosner 1983): as figures e^x the 54 values give 3 outliers at α = 0.05, r = 10.
    const rosner = [
      -0.25, 0.68, 0.94, 1.15, 1.2, 1.26, 1.26, 1.34, 1.38, 1.43, 1.49, 1.49, 1.55, 1.56, 1.58, 1.65, 1.69, 1.7, 1.76, 1.77, 1.81, 1.91,
      1.94, 1.96, 1.99, 2.06, 2.09, 2.1, 2.14, 2.15, 2.23, 2.24, 2.26, 2.35, 2.37, 2.4, 2.47, 2.54, 2.62, 2.64, 2.9, 2.92, 2.92, 2.93, 3.21,
      3.26, 3.3, 3.59, 3.68, 4.3, 4.64, 5.34, 5.42, 6.01,
    ];
    await seedClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      members: rosner.map((x) => ({ figure: Math.exp(x) })),
      label: "esd",
    });
    const settings = { method: "esd" as const, alpha: 0.05, maxOutliers: 10, k: 1.5 };
    await updateComparisonSettings(db, { access: instructorAccess, lab, settings });
    const stored = await storedLabels(lab.id);
    expect(stored.filter((row) => row.label === "outlier")).toHaveLength(3);
    expect(stored.every((row) => row.method.method === "esd")).toBe(true);
    expect(stored.find((row) => row.label === "outlier")!.reason).toMatch(/R3 = 3\.18 > λ3 = 3\.14 at α = 0\.05, n = 54$/);
    const [saved] = await db.select().from(labs).where(eq(labs.id, lab.id));
    expect(saved.comparisonMethod).toBe("esd");
    const reloaded = (await loadComparisonLab(db, fixture.courseId, lab.id))!;
    expect(reloaded.settings.method).toBe("esd");
    const preview = await previewLabSettings(db, reloaded, settings);
    expect(preview.previews[0].counts.outlier).toBe(3);
    // Grubbs is masked on these data (R₁ = 3.118 < λ₁ = 3.158): the preview's Grubbs row at α = 0.05 counts none.
    const grubbsRow = preview.previews.find((row) => row.settings.method === "grubbs" && row.settings.alpha === 0.05)!;
    expect(grubbsRow.counts.outlier).toBe(0);
  });
});

describe("a hand-in arriving", () => {
  it("changes the others' labels at once when read, and in the stored labels once the job has run", async () => {
    const lab = (await loadComparisonLab(db, fixture.courseId, fixture.labId))!;
    const [own] = (await getLabComparison(db, instructorAccess, lab)).handIns;
    await seedClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      members: quietClass(9).map((figure) => ({ figure: own.figure * figure })),
      label: "arrive",
    });
    await relabelLab(db, lab.id);
    expect((await storedLabels(lab.id)).every((row) => row.reason.endsWith("(n = 10)"))).toBe(true);
    const historyBefore = await historyCount(lab.id);
    const jobs = () =>
      db.execute<{ n: number }>(
        sql`select count(*)::int as n from pgboss.job where name = ${queues.classComparisonRequested} and data->>'labId' = ${lab.id}`,
      );
    const jobsBefore = (await jobs()).rows[0].n;

    await handInDropLog(db, {
      access: accessOf("sameCohortStudent", "student"),
      labId: lab.id,
      idempotencyKey: "cc-arriving-hand-in",
      input: {
        sphereId: (
          await db
            .select()
            .from(parts)
            .where(and(eq(parts.courseId, fixture.courseId), eq(parts.label, "S-2")))
        )[0].id,
        temperatureC: 22,
        drops: [7.41, 7.52, 7.47, 7.38, 7.5],
      },
    });
    expect((await jobs()).rows[0].n).toBe(jobsBefore + 1);

    const live = await getLabComparison(db, instructorAccess, lab);
    expect(live.classSize).toBe(11);
    expect(live.handIns.every((handIn) => handIn.reason.endsWith("(n = 11)"))).toBe(true);
    // Until the job runs, the stored labels are the old ones; the hand-in wrote none.
    expect((await storedLabels(lab.id)).every((row) => row.reason.endsWith("(n = 10)"))).toBe(true);

    await relabelLab(db, lab.id); // the class-comparison job's handler
    const stored = await storedLabels(lab.id);
    expect(stored).toHaveLength(11);
    expect(stored.every((row) => row.reason.endsWith("(n = 11)"))).toBe(true);
    expect(await historyCount(lab.id)).toBeGreaterThanOrEqual(historyBefore + 1);
  });

  it("never waits for another hand-in, or for a relabel, still open on the same lab", async () => {
    let release!: () => void;
    const held = new Promise<void>((resolve) => (release = resolve));
    let opened!: () => void;
    const isOpen = new Promise<void>((resolve) => (opened = resolve));
    const sphereOf = async (label: string) =>
      (
        await db
          .select()
          .from(parts)
          .where(and(eq(parts.courseId, fixture.courseId), eq(parts.label, label)))
      )[0].id;
    const rollback = new Error("rolled back on purpose");
    const holder = db
      .transaction(async (tx) => {
        await handInDropLog(tx, {
          access: accessOf("ownStudent", "student"),
          labId: fixture.labId,
          idempotencyKey: "cc-held-hand-in",
          input: { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.4, 7.5, 7.45] },
        });
        await relabelLab(tx, fixture.labId);
        opened();
        await held;
        throw rollback;
      })
      .catch((error) => {
        if (error !== rollback) throw error;
      });
    await isOpen;
    const timeout = new Promise<"blocked">((resolve) => setTimeout(() => resolve("blocked"), 5000));
    const second = handInDropLog(db, {
      access: accessOf("sameCohortStudent", "student"),
      labId: fixture.labId,
      idempotencyKey: "cc-second-hand-in",
      input: { sphereId: await sphereOf("S-2"), temperatureC: 23, drops: [7.5, 7.6, 7.55] },
    });
    const outcome = await Promise.race([second, timeout]);
    release();
    await holder;
    expect(outcome).not.toBe("blocked");
  });
});

describe("kit-part quality", () => {
  it("flags the sphere whose hand-ins differ from its peers' and not the peers, in one statement (Welch 1947, Holm 1979)", async () => {
    const [biased, fair, alsoFair] = await db
      .insert(parts)
      .values([
        { courseId: fixture.courseId, kind: "sphere", label: "S-BIAS", material: "steel", diameterMm: 3, massG: 0.11 },
        { courseId: fixture.courseId, kind: "sphere", label: "S-FAIR", material: "steel", diameterMm: 3, massG: 0.11 },
        { courseId: fixture.courseId, kind: "sphere", label: "S-FAIR-2", material: "steel", diameterMm: 3, massG: 0.11 },
      ])
      .returning();
    const lab = await newLab("Part quality");
    // Every figure is about 5 % high (the reference model's own bias in this lab): S-BIAS is a further 10 % off.
    await seedClass(db, {
      courseId: fixture.courseId,
      labId: lab.id,
      cohortId: fixture.cohortId,
      members: [
        ...[1.14, 1.15, 1.16].map((figure) => ({ figure, sphereId: biased.id })),
        ...[1.04, 1.06, 1.05].map((figure) => ({ figure, sphereId: fair.id })),
        ...[1.045, 1.055, 1.05].map((figure) => ({ figure, sphereId: alsoFair.id })),
      ],
      label: "bias",
    });
    const { statements, result } = await countStatements(() => listPartBias(db, fixture.courseId));
    expect(statements).toBe(1);
    const report = result.get(biased.id)!;
    expect(report).toMatchObject({ flagged: true });
    // By hand: geometric means 1.1499 against the six peers' 1.0499 → +9.5 %.
    expect(report.comparisons[0].relativeToPeers).toBeCloseTo(0.0952, 3);
    expect(report.comparisons[0].labTitle).toBe("Part quality");
    expect(result.get(fair.id)).toMatchObject({ flagged: false });
    expect(result.get(alsoFair.id)).toMatchObject({ flagged: false });
    // Asking for one part reads the same course-wide family.
    const single = await listPartBias(db, fixture.courseId, biased.id);
    expect([...single.keys()]).toEqual([biased.id]);
    expect(single.get(biased.id)!.testsInFamily).toBe(report.testsInFamily);
  });
});

describe("the comparison page", () => {
  it("runs the same number of SQL statements for 10 and for 1,000 hand-ins", async () => {
    const { loader } = await import("~/routes/courses.$courseId.labs.$labId.comparison");
    const cookie = await sessionCookieFor(fixture.userIds.instructor);
    const statementsFor = async (size: number) => {
      const lab = await newLab(`Size ${size}`);
      await seedClass(db, {
        courseId: fixture.courseId,
        labId: lab.id,
        cohortId: fixture.cohortId,
        members: quietClass(size).map((figure) => ({ figure })),
        label: `size${size}`,
      });
      // The second page of the table, as its link (no JavaScript needed) asks for it.
      const request = appRequest(`/courses/${fixture.courseId}/labs/${lab.id}/comparison?label=consistent&page=2`, { cookie });
      const { statements, result } = await countStatements(() =>
        loader({ request, params: { courseId: fixture.courseId, labId: lab.id }, context: new RouterContextProvider() } as never),
      );
      // The plots take every hand-in; the table one page of them.
      expect(result.points).toHaveLength(size);
      const onPage = size > COMPARISON_TABLE_PAGE_SIZE ? Math.min(size - COMPARISON_TABLE_PAGE_SIZE, COMPARISON_TABLE_PAGE_SIZE) : size;
      expect(result.handIns).toHaveLength(onPage);
      expect(result.pageInfo).toEqual({
        page: size > COMPARISON_TABLE_PAGE_SIZE ? 2 : 1,
        pageSize: COMPARISON_TABLE_PAGE_SIZE,
        total: size,
      });
      return statements;
    };
    const small = await statementsFor(10);
    expect(await statementsFor(1000)).toBe(small);
  });
});
