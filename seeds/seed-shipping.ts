/**
 * The demo's kits at term scale: every student's address in Harrowgate, an invented town; the Thursday
 * bench's parcels bought through the local fake carrier (with the carrier's own tracking numbers);
 * two kits asked back early and now overdue; and a broken thermometer reported and replaced. Invented
 * demo data: never a test's expected value.
 */
import type { Faker } from "@faker-js/faker";
import { and, asc, eq, inArray } from "drizzle-orm";
import {
  cohorts,
  courseMemberships,
  courses,
  kitEvents,
  kitParts,
  kitProblemUpdates,
  kitProblems,
  kits,
  partEvents,
  parts,
  shipmentItems,
  shipments,
  shippingAddresses,
  users,
} from "~/db/schema";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import type { Database } from "~/server/db.server";
import { createEasyPostCarrier, kitParcel, type Carrier } from "~/server/shipping/carrier.server";
import { FAKE_CARRIER_API_KEY, startFakeCarrier } from "~/server/shipping/fake-carrier.server";
import { demoCohortNames } from "./demo-scenario";
import { KIT_SENT_DAYS_AGO } from "./seed-kits";

const DAY_MS = 86_400_000;
const daysAgo = (days: number) => new Date(Date.now() - days * DAY_MS);
const dayOf = (instant: Date) => instant.toISOString().slice(0, 10);

const town = { city: "Harrowgate", region: "Co. Fenmore", country: "IE" } as const;
const streets = ["Quarry Lane", "Mill Race Road", "Tanner's Row", "Orchard Terrace", "Bellfield Close", "Weir Street", "Chapel Hill"];

export const demoReturnAddress: PostalAddress = {
  name: "Harrowgate Institute of Technology, Kit Store",
  line1: "Fluids Laboratory, Block C",
  line2: "Quarry Road",
  ...town,
  phone: null,
};

export async function seedShipping(db: Database, faker: Faker, { courseId, instructorId }: { courseId: string; instructorId: string }) {
  const students = await db
    .select({
      membershipId: courseMemberships.id,
      userId: users.id,
      name: users.name,
      cohortName: cohorts.name,
      kitId: kits.id,
      kitNumber: kits.number,
      kitState: kits.state,
    })
    .from(courseMemberships)
    .innerJoin(users, eq(users.id, courseMemberships.userId))
    .innerJoin(cohorts, eq(cohorts.id, courseMemberships.cohortId))
    .leftJoin(kits, eq(kits.holderMembershipId, courseMemberships.id))
    .where(and(eq(courseMemberships.courseId, courseId), eq(courseMemberships.role, "student")))
    .orderBy(asc(users.email));

  const addressOf = new Map<string, PostalAddress>(
    students.map((student) => [
      student.membershipId,
      { name: student.name, line1: `${faker.number.int({ min: 1, max: 140 })} ${faker.helpers.arrayElement(streets)}`, ...town },
    ]),
  );
  // The end of term, a few weeks ahead: the kits at home are not late yet.
  await db
    .update(courses)
    .set({ returnAddress: demoReturnAddress, kitReturnBy: dayOf(new Date(Date.now() + 40 * DAY_MS)) })
    .where(eq(courses.id, courseId));
  await db.insert(shippingAddresses).values(
    students.map((student) => ({
      courseId,
      membershipId: student.membershipId,
      updatedById: instructorId,
      ...addressOf.get(student.membershipId)!,
    })),
  );

  const thursday = students.filter((student) => student.cohortName === demoCohortNames[2] && student.kitId);
  const shipped = thursday.filter((student) => ["in_transit", "at_home", "coming_back"].includes(student.kitState!));
  const atHome = students.filter((student) => student.kitState === "at_home" && student.cohortName === demoCohortNames[0]);
  // The labels come from the fake carrier, started here for the purpose, through the app's own client.
  const fake = await startFakeCarrier({ port: 0, log: () => {} });
  try {
    const carrier = createEasyPostCarrier({ apiKey: FAKE_CARRIER_API_KEY, apiUrl: fake.apiUrl });
    const buy = (label: Omit<DemoLabel, "carrier" | "addressOf">) => buyDemoLabel(db, { ...label, carrier, addressOf });
    await shipCohort(db, buy, { courseId, instructorId, kits: shipped });
    await askBackEarly(db, { instructorId, kits: atHome.slice(0, 2) });
    await replaceThermometer(db, buy, { courseId, instructorId, student: atHome[2] });
  } finally {
    await fake.close();
  }
}

type DemoLabel = {
  carrier: Carrier;
  addressOf: Map<string, PostalAddress>;
  item: { id: string; kitId: string };
  membershipId: string;
  at: Date;
};
type BuyDemoLabel = (label: Omit<DemoLabel, "carrier" | "addressOf">) => Promise<{ carrier: string; trackingNumber: string }>;

/** Buys one label as the label job would, and keeps the carrier's answer on the shipment item. */
async function buyDemoLabel(db: Database, { carrier, addressOf, item, membershipId, at }: DemoLabel) {
  const outcome = await carrier.buyLabel({
    reference: item.id,
    from: demoReturnAddress,
    to: addressOf.get(membershipId)!,
    parcel: kitParcel,
    carrierShipmentId: null,
  });
  if (!outcome.ok) throw new Error(`The fake carrier refused a demo label: ${outcome.message}`);
  await db
    .update(shipmentItems)
    .set({
      status: "bought",
      attempts: 1,
      carrierShipmentId: outcome.carrierShipmentId,
      carrier: outcome.carrier,
      service: outcome.service,
      trackingNumber: outcome.trackingNumber,
      labelPdf: outcome.labelPdf,
      updatedAt: at,
    })
    .where(eq(shipmentItems.id, item.id));
  return outcome;
}

/** The Thursday bench's kits, shipped last, went out as one shipment. */
async function shipCohort(
  db: Database,
  buy: BuyDemoLabel,
  input: { courseId: string; instructorId: string; kits: { kitId: string | null; membershipId: string }[] },
) {
  // Labels bought the day the kits were sent, that is the day they moved to in transit (seeds/seed-kits.ts).
  const shippedAt = daysAgo(KIT_SENT_DAYS_AGO);
  const [shipment] = await db
    .insert(shipments)
    .values({
      courseId: input.courseId,
      kind: "outbound",
      requestKey: "demo-thursday-bench",
      createdById: input.instructorId,
      createdAt: shippedAt,
    })
    .returning();
  const items = await db
    .insert(shipmentItems)
    .values(input.kits.map((kit) => ({ shipmentId: shipment.id, kitId: kit.kitId!, createdAt: shippedAt })))
    .returning({ id: shipmentItems.id, kitId: shipmentItems.kitId });
  const membershipOfKit = new Map(input.kits.map((kit) => [kit.kitId!, kit.membershipId]));
  for (const item of items) {
    const label = await buy({ item, membershipId: membershipOfKit.get(item.kitId)!, at: shippedAt });
    // The kit's "sent" day stays the one its history gives.
    await db.update(kits).set({ carrier: label.carrier, trackingNumber: label.trackingNumber }).where(eq(kits.id, item.kitId));
  }
}

/** Two students leaving the course were asked to send their kits back last week; neither has yet. */
async function askBackEarly(db: Database, { instructorId, kits: early }: { instructorId: string; kits: { kitId: string | null }[] }) {
  const kitIds = early.map((kit) => kit.kitId!);
  await db
    .update(kits)
    .set({ returnBy: dayOf(daysAgo(4)) })
    .where(inArray(kits.id, kitIds));
  await db.insert(kitEvents).values(
    kitIds.map((kitId) => ({
      kitId,
      actorId: instructorId,
      action: "return_requested",
      note: "Leaving the course at mid-term: kit asked back early.",
      createdAt: daysAgo(11),
    })),
  );
}

/** A thermometer that arrived cracked, reported by its student and replaced from the shelf. */
async function replaceThermometer(
  db: Database,
  buy: BuyDemoLabel,
  {
    courseId,
    instructorId,
    student,
  }: { courseId: string; instructorId: string; student: { membershipId: string; userId: string; kitId: string | null } },
) {
  const kitId = student.kitId!;
  const [broken] = await db
    .select({ id: parts.id })
    .from(kitParts)
    .innerJoin(parts, eq(parts.id, kitParts.partId))
    .where(and(eq(kitParts.kitId, kitId), eq(parts.accessoryType, "thermometer")));
  const [spare] = await db
    .insert(parts)
    .values({ courseId, kind: "accessory", label: "THM-R1", accessoryType: "thermometer", notes: "Spare, bought for replacements." })
    .returning({ id: parts.id });
  const reportedAt = daysAgo(6);
  const sentAt = daysAgo(5);
  const [problem] = await db
    .insert(kitProblems)
    .values({
      courseId,
      kitId,
      membershipId: student.membershipId,
      reportedById: student.userId,
      partId: broken.id,
      kind: "damaged",
      note: "The thermometer's glass was cracked when I opened the box; I have not used it.",
      status: "replacement_sent",
      replacementPartId: spare.id,
      createdAt: reportedAt,
      updatedAt: sentAt,
    })
    .returning({ id: kitProblems.id });
  await db.insert(kitEvents).values({
    kitId,
    actorId: student.userId,
    action: "reported",
    note: "The thermometer's glass was cracked when I opened the box; I have not used it.",
    detail: { partId: broken.id, problem: "damaged" },
    createdAt: reportedAt,
  });
  await db.update(parts).set({ status: "retired" }).where(eq(parts.id, broken.id));
  await db.delete(kitParts).where(and(eq(kitParts.kitId, kitId), eq(kitParts.partId, broken.id)));
  await db.insert(kitParts).values({ kitId, partId: spare.id });
  await db.insert(partEvents).values([
    { partId: spare.id, actorId: instructorId, action: "created", createdAt: sentAt },
    { partId: broken.id, actorId: instructorId, action: "retired", note: "Cracked in the post.", createdAt: sentAt },
  ]);
  const [shipment] = await db
    .insert(shipments)
    .values({ courseId, kind: "replacement", requestKey: "demo-thermometer", createdById: instructorId, createdAt: sentAt })
    .returning();
  const [item] = await db
    .insert(shipmentItems)
    .values({ shipmentId: shipment.id, kitId, problemId: problem.id, createdAt: sentAt })
    .returning({ id: shipmentItems.id, kitId: shipmentItems.kitId });
  await buy({ item, membershipId: student.membershipId, at: sentAt });
  await db.insert(kitProblemUpdates).values([
    { problemId: problem.id, actorId: student.userId, fromStatus: null, toStatus: "received", createdAt: reportedAt },
    {
      problemId: problem.id,
      actorId: instructorId,
      fromStatus: "received",
      toStatus: "replacement_sent",
      note: "Sorry about that: a new thermometer is on its way. Please put the cracked one in the return box.",
      detail: { replacementPartId: spare.id, shipmentItemId: item.id },
      createdAt: sentAt,
    },
  ]);
}
