import { and, eq, inArray } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { emailOutbox, kitEvents, kitParts, kits, partEvents, parts } from "~/db/schema";
import { db } from "~/server/db.server";
import { reportKitProblem } from "~/server/kits/kit-problems.server";
import { checkInKit, confirmArrival, createKit, listKits, moveKits } from "~/server/kits/kits.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countStatements } from "../support/count-statements";

let fixture: AccessFixture;
let instructorId: string;

beforeAll(async () => {
  fixture = await createAccessFixture("kits");
  instructorId = fixture.userIds.instructor;
});

/** Parts for one kit: a sphere, a column, and (shared between kits) a fluid lot. */
async function partsForKit(suffix: string, fluidLotId?: string) {
  const [sphere, column] = await db
    .insert(parts)
    .values([
      { courseId: fixture.courseId, kind: "sphere", label: `S-${suffix}`, material: "steel", diameterMm: 4, massG: 0.262 },
      {
        courseId: fixture.courseId,
        kind: "column",
        label: `C-${suffix}`,
        innerDiameterMm: 40,
        timedDistanceMm: 300,
        runInMm: 120,
        marginBelowMm: 60,
      },
    ])
    .returning();
  const lotId =
    fluidLotId ??
    (
      await db
        .insert(parts)
        .values({
          courseId: fixture.courseId,
          kind: "fluid_lot",
          label: `F-${suffix}`,
          fluidName: "glycerol",
          densityKgM3: 1249,
          calibration: [{ temperatureC: 20, viscosityPaS: 0.545 }],
        })
        .returning()
    )[0].id;
  return { sphereId: sphere.id, columnId: column.id, fluidLotId: lotId };
}

async function kitState(kitId: string) {
  const [kit] = await db.select().from(kits).where(eq(kits.id, kitId));
  return kit;
}

const base = () => ({ courseId: fixture.courseId, actorId: instructorId });

describe("a kit's journey", () => {
  it("goes from the shelf to the student's home and back, keeping every step, the e-mail and the parts' condition", async () => {
    const { sphereId, columnId, fluidLotId } = await partsForKit("J1");
    const kit = await createKit(db, { ...base(), number: "J-1", partIds: [sphereId, columnId, fluidLotId] });
    const student = fixture.membershipIds.sameCohortStudent;

    await moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "packed", holderMembershipId: student } });
    await moveKits(db, {
      ...base(),
      kitIds: [kit.id],
      move: { to: "in_transit", shipping: { carrier: "Parcelwise", trackingNumber: "PW123", shippedOn: "2027-01-18" } },
    });
    const shippedMail = await db
      .select()
      .from(emailOutbox)
      .where(and(eq(emailOutbox.template, "kit-shipped"), eq(emailOutbox.courseId, fixture.courseId)));
    expect(shippedMail.map((mail) => mail.toAddress)).toEqual(["samecohortstudent@kits.example"]);
    expect(shippedMail[0].props).toMatchObject({ kitNumber: "J-1", trackingNumber: "PW123" });

    await confirmArrival(db, { ...base(), actorId: fixture.userIds.sameCohortStudent, kitId: kit.id, complete: true });
    await moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "coming_back" } });
    await checkInKit(db, {
      ...base(),
      kitId: kit.id,
      conditions: { [sphereId]: "damaged", [fluidLotId]: "missing" },
      remeasure: [columnId],
    });

    const after = await kitState(kit.id);
    expect(after).toMatchObject({ state: "checked_in", holderMembershipId: null });
    const partStatus = Object.fromEntries(
      (
        await db
          .select({ id: parts.id, status: parts.status })
          .from(parts)
          .where(inArray(parts.id, [sphereId, columnId, fluidLotId]))
      ).map((p) => [p.id, p.status]),
    );
    // The broken sphere is retired; the column goes for re-measurement; a lost bottle leaves its lot in service.
    expect(partStatus).toEqual({ [sphereId]: "retired", [columnId]: "remeasure", [fluidLotId]: "in_service" });
    const stillInKit = (await db.select({ partId: kitParts.partId }).from(kitParts).where(eq(kitParts.kitId, kit.id))).map(
      (row) => row.partId,
    );
    expect(stillInKit).toEqual([columnId]);

    const moves = await db
      .select({ from: kitEvents.fromState, to: kitEvents.toState })
      .from(kitEvents)
      .where(and(eq(kitEvents.kitId, kit.id), eq(kitEvents.action, "moved")));
    expect(moves.map((move) => `${move.from}→${move.to}`)).toEqual([
      "on_shelf→packed",
      "packed→in_transit",
      "in_transit→at_home",
      "at_home→coming_back",
      "coming_back→checked_in",
    ]);
    const conditionEvents = await db
      .select()
      .from(partEvents)
      .where(and(eq(partEvents.action, "checked_in"), inArray(partEvents.partId, [sphereId, columnId])));
    expect(conditionEvents).toHaveLength(2);

    await moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "on_shelf" } });
    expect((await kitState(kit.id)).state).toBe("on_shelf");
  });

  it("tells the course's instructors when a student reports a problem, and keeps it on the kit", async () => {
    const { sphereId } = await partsForKit("R1");
    const kit = await createKit(db, { ...base(), number: "R-1", partIds: [sphereId] });
    await moveKits(db, {
      ...base(),
      kitIds: [kit.id],
      move: { to: "packed", holderMembershipId: fixture.membershipIds.otherCohortStudent },
    });
    await moveKits(db, {
      ...base(),
      kitIds: [kit.id],
      move: { to: "in_transit", shipping: { carrier: "Parcelwise", trackingNumber: "PW9", shippedOn: "2027-01-18" } },
    });
    await confirmArrival(db, {
      ...base(),
      actorId: fixture.userIds.otherCohortStudent,
      kitId: kit.id,
      complete: false,
      note: "No thermometer in the box.",
    });
    await reportKitProblem(db, {
      courseId: fixture.courseId,
      kitId: kit.id,
      actorId: fixture.userIds.otherCohortStudent,
      partId: sphereId,
      problem: "damaged",
      note: "Chipped.",
    });

    const mail = await db
      .select()
      .from(emailOutbox)
      .where(and(eq(emailOutbox.template, "kit-problem"), eq(emailOutbox.courseId, fixture.courseId)));
    expect(mail.map((m) => [m.toAddress, m.props.problem, m.props.partLabel])).toEqual([
      ["instructor@kits.example", "incomplete", null],
      ["instructor@kits.example", "damaged", "S-R1"],
    ]);
    const reports = await db
      .select()
      .from(kitEvents)
      .where(and(eq(kitEvents.kitId, kit.id), eq(kitEvents.action, "reported")));
    expect(reports.map((r) => r.note)).toEqual(["No thermometer in the box.", "Chipped."]);
  });

  it("refuses an illegal move and changes nothing", async () => {
    const { sphereId } = await partsForKit("J2");
    const kit = await createKit(db, { ...base(), number: "J-2", partIds: [sphereId] });
    await expect(moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "at_home" } })).rejects.toThrow(/cannot go to at home/);
    await expect(moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "in_transit" } })).rejects.toMatchObject({ code: "kit_refused" });
    expect((await kitState(kit.id)).state).toBe("on_shelf");
    expect(
      await db
        .select()
        .from(kitEvents)
        .where(and(eq(kitEvents.kitId, kit.id), eq(kitEvents.action, "moved"))),
    ).toEqual([]);
  });

  it("moves many kits in one transaction: when one may not move, none does", async () => {
    const first = await createKit(db, { ...base(), number: "B-1", partIds: [] });
    const second = await createKit(db, { ...base(), number: "B-2", partIds: [] });
    await moveKits(db, { ...base(), kitIds: [first.id], move: { to: "retired" } });
    await expect(moveKits(db, { ...base(), kitIds: [first.id, second.id], move: { to: "retired" } })).rejects.toThrow(
      /Kit B-1 \(retired\)/,
    );
    expect((await kitState(second.id)).state).toBe("on_shelf");

    const third = await createKit(db, { ...base(), number: "B-3", partIds: [] });
    const { moved } = await moveKits(db, { ...base(), kitIds: [second.id, third.id], move: { to: "retired", note: "end of term" } });
    expect(moved).toBe(2);
    expect([(await kitState(second.id)).state, (await kitState(third.id)).state]).toEqual(["retired", "retired"]);
  });

  it("packs one kit per student and puts a sphere in one kit only, while a fluid lot fills many", async () => {
    const { sphereId, fluidLotId } = await partsForKit("J4");
    const kit = await createKit(db, { ...base(), number: "J-4", partIds: [sphereId, fluidLotId] });
    await expect(createKit(db, { ...base(), number: "J-5", partIds: [sphereId] })).rejects.toThrow(/already sit in another kit/);
    const shared = await createKit(db, { ...base(), number: "J-5", partIds: [fluidLotId] });
    expect(shared.number).toBe("J-5");

    // ownStudent already holds the fixture's kit.
    await expect(
      moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "packed", holderMembershipId: fixture.membershipIds.ownStudent } }),
    ).rejects.toThrow(/already holds kit K-01/);
    await expect(
      moveKits(db, { ...base(), kitIds: [kit.id], move: { to: "packed", holderMembershipId: fixture.membershipIds.assignedTa } }),
    ).rejects.toThrow(/students of this course only/);
  });
});

describe("the kits table", () => {
  it("runs the same number of statements for 10 and for 300 kits, and a TA's view keeps to their cohorts", async () => {
    const course = await createAccessFixture("kit-table");
    const batch = (from: number, to: number) =>
      Array.from({ length: to - from }, (_, i) => ({ courseId: course.courseId, number: `T-${from + i}` }));
    await db.insert(kits).values(batch(0, 9));
    const small = await countStatements(() => listKits(db, course.courseId, { page: 1, pageSize: 25 }));
    await db.insert(kits).values(batch(9, 299));
    const large = await countStatements(() => listKits(db, course.courseId, { page: 2, pageSize: 25, search: "T-2" }));
    expect(small.statements).toBe(2);
    expect(large.statements).toBe(small.statements);
    expect(small.result.total).toBe(10);
    // T-2, T-20…T-29 and T-200…T-298: 1 + 10 + 99.
    expect(large.result).toMatchObject({ total: 110 });
    expect(large.result.rows).toHaveLength(25);

    const ofCohortTwo = await listKits(db, course.courseId, { page: 1, pageSize: 25, cohortIds: [course.otherCohortId] });
    expect(ofCohortTwo.total).toBe(0);
    const ofCohortOne = await listKits(db, course.courseId, { page: 1, pageSize: 25, cohortIds: [course.cohortId] });
    expect(ofCohortOne.rows.map((row) => row.number)).toEqual(["K-01"]);
  });
});

describe("the kit page", () => {
  it("answers a refused move at its form, then checks the kit in with one row per part", async () => {
    const handle: AppHandler = await createAppHandler();
    const course = await createAccessFixture("kitpage");
    const cookie = await sessionCookieFor(course.userIds.instructor);
    const post = (form: Record<string, string>) => handle(appRequest(`/courses/${course.courseId}/kits/${course.kitId}`, { cookie, form }));

    const refused = await post({ intent: "move", to: "retired", note: "worn out" });
    expect(refused.status).toBe(400);
    const page = await refused.text();
    expect(page).toMatch(/cannot go to retired/);
    expect(page).toContain("worn out");
    expect((await kitState(course.kitId)).state).toBe("at_home");

    expect((await post({ intent: "move", to: "coming_back" })).status).toBe(200);
    const inKit = await db
      .select({ id: parts.id, label: parts.label })
      .from(kitParts)
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(eq(kitParts.kitId, course.kitId));
    const id = (label: string) => inKit.find((part) => part.label === label)!.id;
    const checkedIn = await post({
      intent: "check-in",
      "parts[0].partId": id("S-1"),
      "parts[0].condition": "damaged",
      "parts[1].partId": id("C-1"),
      "parts[1].condition": "fine",
      "parts[1].remeasure": "on",
      "parts[2].partId": id("F-1"),
      "parts[2].condition": "fine",
      note: "back by post",
    });
    expect(checkedIn.status).toBe(200);
    expect((await kitState(course.kitId)).state).toBe("checked_in");
    const statuses = await db
      .select({ label: parts.label, status: parts.status })
      .from(parts)
      .where(inArray(parts.id, [id("S-1"), id("C-1"), id("F-1")]));
    expect(Object.fromEntries(statuses.map((part) => [part.label, part.status]))).toEqual({
      "S-1": "retired",
      "C-1": "remeasure",
      "F-1": "in_service",
    });
  });
});
