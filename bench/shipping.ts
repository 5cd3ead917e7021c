/**
 * `npm run bench:shipping`: ship a cohort of 500 in one action. Each round sets up a course of its own
 * (500 students with addresses, 250 kits on the shelf and loose parts for 250 more), then times the
 * server's side of shipping them: plan and pack, create the shipment, and run the label job until every
 * label is bought and every kit is in transit with its e-mail in the outbox. The carrier answers at
 * once, in this process, so its latency is not counted (the budget leaves it out). As a floor
 * measured in the same run: one bare INSERT of 500 rows, and 500 calls to the instant carrier.
 * Budget: 5 s.
 */
import { randomUUID } from "node:crypto";
import { createBenchDatabase, summarise } from "./support";

const STUDENTS = 500;
const ON_SHELF = 250;
const ROUNDS = 3;
const BUDGET_MS = 5_000;

const bench = await createBenchDatabase();
const { and, count, eq, sql } = await import("drizzle-orm");
const { db } = await import("~/server/db.server");
const schema = await import("~/db/schema");
const { insertMany } = await import("~/server/bulk-insert.server");
const { planKitAssignment, commitKitAssignment } = await import("~/server/shipping/kit-assignment.server");
const { createShipment, buyLabels } = await import("~/server/shipping/shipments.server");
const { kitParcel } = await import("~/server/shipping/carrier.server");
type Carrier = import("~/server/shipping/shipments.server").Carrier;

const labelPdf = Buffer.from("%PDF-1.4\n% a label\n");
const instantCarrier: Carrier = {
  async buyLabel(request) {
    return {
      ok: true,
      carrierShipmentId: `shp_${request.reference}`,
      carrier: "Parcelwise",
      service: "Ground",
      trackingNumber: `PW${request.reference.replaceAll("-", "").slice(0, 12)}`,
      labelPdf,
    };
  },
};
const address = (name: string) => ({ name, line1: "4 Quarry Lane", city: "Tillbury", postcode: "TB1 4QL", country: "GB" });

async function setUpCourse(round: number) {
  const [course] = await db
    .insert(schema.courses)
    .values({ title: "Cohort shipping", code: `ship-${round}`, term: "Bench", timeZone: "UTC", returnAddress: address("Fluids lab") })
    .returning();
  const [cohort] = await db.insert(schema.cohorts).values({ courseId: course.id, name: "Everyone" }).returning();
  const [instructor] = await db
    .insert(schema.users)
    .values({ email: `instructor@ship${round}.example`, name: "Instructor" })
    .returning();
  await db.insert(schema.courseMemberships).values({ courseId: course.id, userId: instructor.id, role: "instructor" });
  const [lab] = await db
    .insert(schema.labs)
    .values({
      courseId: course.id,
      title: "Drag on a settling sphere",
      kind: "drag",
      opensAt: new Date(),
      dueAt: new Date(Date.now() + 86_400_000),
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.5 },
    })
    .returning();
  const students = Array.from({ length: STUDENTS }, (_, index) => ({ index, userId: randomUUID(), membershipId: randomUUID() }));
  await insertMany(
    db,
    schema.users,
    students.map((s) => ({ id: s.userId, email: `student${s.index}@ship${round}.example`, name: `Student ${s.index}` })),
  );
  await insertMany(
    db,
    schema.courseMemberships,
    students.map((s) => ({ id: s.membershipId, courseId: course.id, userId: s.userId, role: "student" as const, cohortId: cohort.id })),
  );
  await insertMany(
    db,
    schema.shippingAddresses,
    students.map((s) => ({ courseId: course.id, membershipId: s.membershipId, ...address(`Student ${s.index}`) })),
  );
  const lotId = randomUUID();
  const kitParts = Array.from({ length: STUDENTS }, (_, index) => ({ index, sphereId: randomUUID(), columnId: randomUUID() }));
  await insertMany(db, schema.parts, [
    {
      id: lotId,
      courseId: course.id,
      kind: "fluid_lot" as const,
      label: "GLY-B",
      fluidName: "glycerol",
      densityKgM3: 1260,
      diameterMm: null,
      innerDiameterMm: null,
      bottlesOnHand: STUDENTS,
    },
    ...kitParts.flatMap((p) => [
      {
        id: p.sphereId,
        courseId: course.id,
        kind: "sphere" as const,
        label: `S-${p.index}`,
        fluidName: null,
        densityKgM3: null,
        diameterMm: 3,
        innerDiameterMm: null,
        bottlesOnHand: null,
      },
      {
        id: p.columnId,
        courseId: course.id,
        kind: "column" as const,
        label: `C-${p.index}`,
        fluidName: null,
        densityKgM3: null,
        diameterMm: null,
        innerDiameterMm: 40,
        bottlesOnHand: null,
      },
    ]),
  ]);
  // Half the cohort's kits are on the shelf already; the job makes up the other half from loose parts.
  const shelf = kitParts.slice(0, ON_SHELF).map((p) => ({ ...p, kitId: randomUUID() }));
  await insertMany(
    db,
    schema.kits,
    shelf.map((k) => ({ id: k.kitId, courseId: course.id, number: `K-${String(k.index + 1).padStart(3, "0")}` })),
  );
  await insertMany(
    db,
    schema.kitParts,
    shelf.flatMap((k) => [
      { kitId: k.kitId, partId: k.sphereId, exclusive: true },
      { kitId: k.kitId, partId: k.columnId, exclusive: true },
      { kitId: k.kitId, partId: lotId, exclusive: false },
    ]),
  );
  return { courseId: course.id, cohortId: cohort.id, labId: lab.id, instructorId: instructor.id };
}

const timings: number[] = [];
const floors: { insert: number; carrier: number }[] = [];
for (let round = 0; round < ROUNDS; round++) {
  const course = await setUpCourse(round);

  const started = performance.now();
  const plan = await planKitAssignment(db, {
    courseId: course.courseId,
    labId: course.labId,
    filter: { cohortId: course.cohortId, kitState: "none" },
  });
  if (plan.kits.length !== STUDENTS) throw new Error(`Round ${round}: the plan has ${plan.kits.length} kits; ${plan.refused[0]?.reason}`);
  await commitKitAssignment(db, { courseId: course.courseId, actorId: course.instructorId, labId: course.labId, kits: plan.kits });
  const packed = await db
    .select({ id: schema.kits.id })
    .from(schema.kits)
    .where(and(eq(schema.kits.courseId, course.courseId), eq(schema.kits.state, "packed")));
  const { shipmentId } = await createShipment(db, {
    courseId: course.courseId,
    actorId: course.instructorId,
    kind: "outbound",
    requestKey: `bench-${round}`,
    items: packed.map((kit) => ({ kitId: kit.id })),
  });
  const outcome = await buyLabels(db, instantCarrier, shipmentId);
  timings.push(performance.now() - started);

  const [{ inTransit }] = await db
    .select({ inTransit: count() })
    .from(schema.kits)
    .where(and(eq(schema.kits.courseId, course.courseId), eq(schema.kits.state, "in_transit")));
  const [{ mails }] = await db
    .select({ mails: count() })
    .from(schema.emailOutbox)
    .where(and(eq(schema.emailOutbox.courseId, course.courseId), eq(schema.emailOutbox.template, "kit-shipped")));
  if (outcome.bought !== STUDENTS || inTransit !== STUDENTS || mails !== STUDENTS)
    throw new Error(`Round ${round}: ${outcome.bought} bought, ${inTransit} in transit, ${mails} e-mails queued of ${STUDENTS}.`);

  // The floor: one bare INSERT of 500 rows (the events of these kits), then 500 calls to the instant carrier.
  const insertStarted = performance.now();
  await insertMany(
    db,
    schema.kitEvents,
    packed.map((kit) => ({ kitId: kit.id, actorId: course.instructorId, action: "bench", note: null })),
  );
  const insertMs = performance.now() - insertStarted;
  const callsStarted = performance.now();
  for (const kit of packed)
    await instantCarrier.buyLabel({ reference: kit.id, from: address("a"), to: address("b"), parcel: kitParcel, carrierShipmentId: null });
  floors.push({ insert: insertMs, carrier: performance.now() - callsStarted });
  await db.execute(sql`delete from kit_events where action = 'bench'`);
}
const { median, best } = summarise(timings);
const floor = summarise(floors.map((f) => f.insert));
const carrierFloor = summarise(floors.map((f) => f.carrier));
console.log(
  `shipping ${STUDENTS} kits in one action (plan + pack, shipment, every label bought, kits in transit, e-mails queued): ` +
    `median ${median.toFixed(0)} ms, best ${best.toFixed(0)} ms over ${ROUNDS} rounds`,
);
console.log(
  `floor in the same run: one INSERT of ${STUDENTS} rows, median ${floor.median.toFixed(1)} ms (ratio ${(median / floor.median).toFixed(0)}×); ` +
    `${STUDENTS} instant carrier calls, median ${carrierFloor.median.toFixed(2)} ms`,
);
console.log(`budget ${BUDGET_MS} ms: ${median <= BUDGET_MS ? "PASS" : "OVER"}`);
await bench.drop();
