/**
 * Shipping a cohort: kits planned from the shelf and packed in one transaction (invited students
 * included), shipments created once per request key, and the label job's result for each kit.
 */
import { and, eq, inArray, sql } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import {
  cohorts,
  courseMemberships,
  courses,
  emailOutbox,
  invitations,
  kitParts,
  kits,
  labs,
  parts,
  shipmentItems,
  shippingAddresses,
  users,
} from "~/db/schema";
import { db } from "~/server/db.server";
import { createKit } from "~/server/kits/kits.server";
import { commitKitAssignment, planKitAssignment, type CandidateKey } from "~/server/shipping/kit-assignment.server";
import { buyLabels, createShipment, getShipment, retryFailedItems, type Carrier } from "~/server/shipping/shipments.server";
import { countAllStatements } from "../support/count-statements";

type LabelRequest = Parameters<Carrier["buyLabel"]>[0];
type LabelOutcome = Awaited<ReturnType<Carrier["buyLabel"]>>;

const address = (name: string) => ({ name, line1: "4 Quarry Lane", city: "Tillbury", postcode: "TB1 4QL", country: "GB" });

/** A course with an instructor, a cohort, `students` members (with addresses unless told) and one invited student. */
async function shippingCourse(label: string, students: string[], { withoutAddress = [] as string[] } = {}) {
  const [course] = await db
    .insert(courses)
    .values({ title: "Settling Spheres", code: label, term: "Test term", timeZone: "UTC", returnAddress: address("Fluids lab") })
    .returning();
  const [cohort] = await db.insert(cohorts).values({ courseId: course.id, name: "Cohort one" }).returning();
  const people = await db
    .insert(users)
    .values(["Instructor", ...students].map((name) => ({ email: `${name.toLowerCase()}@${label}.example`, name })))
    .returning();
  const memberships = await db
    .insert(courseMemberships)
    .values(
      people.map((person, index) => ({
        courseId: course.id,
        userId: person.id,
        role: index === 0 ? ("instructor" as const) : ("student" as const),
        cohortId: index === 0 ? null : cohort.id,
      })),
    )
    .returning();
  const [invitation] = await db
    .insert(invitations)
    .values({
      courseId: course.id,
      email: `ada@${label}.example`,
      name: "Ada Invited",
      role: "student",
      cohortId: cohort.id,
      tokenHash: `hash-${label}`,
      expiresAt: new Date(Date.now() + 7 * 24 * 3600 * 1000),
    })
    .returning();
  const membershipOf = Object.fromEntries(students.map((name, index) => [name, memberships[index + 1].id]));
  await db
    .insert(shippingAddresses)
    .values([
      ...students
        .filter((name) => !withoutAddress.includes(name))
        .map((name) => ({ courseId: course.id, membershipId: membershipOf[name], ...address(name) })),
      { courseId: course.id, invitationId: invitation.id, ...address("Ada Invited") },
    ]);
  return { courseId: course.id, instructorId: people[0].id, membershipOf, invitationId: invitation.id };
}

async function addParts(courseId: string, rows: Partial<typeof parts.$inferInsert>[]) {
  const inserted = await db
    .insert(parts)
    .values(rows.map((row) => ({ courseId, kind: "sphere" as const, label: "?", ...row })))
    .returning();
  return Object.fromEntries(inserted.map((part) => [part.label, part.id]));
}

const sphere = (label: string, diameterMm: number) => ({ kind: "sphere" as const, label, material: "steel", diameterMm, massG: 0.2 });
const column = (label: string, innerDiameterMm: number) => ({
  kind: "column" as const,
  label,
  innerDiameterMm,
  timedDistanceMm: 300,
  runInMm: 100,
});
const lot = (label: string, bottlesOnHand: number | null) => ({
  kind: "fluid_lot" as const,
  label,
  fluidName: "glycerol",
  densityKgM3: 1260,
  bottlesOnHand,
});

async function addLab(courseId: string, allowedPartIds: string[]) {
  const [lab] = await db
    .insert(labs)
    .values({
      courseId,
      title: "Drag on a steel sphere",
      kind: "drag",
      opensAt: new Date(),
      dueAt: new Date(Date.now() + 7 * 24 * 3600 * 1000),
      resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
      allowedPartIds,
    })
    .returning();
  return lab.id;
}

describe("planning kits for a cohort", () => {
  let course: Awaited<ReturnType<typeof shippingCourse>>;
  let part: Record<string, string>;
  let labId: string;
  let shelfKitId: string;

  beforeAll(async () => {
    course = await shippingCourse("plan", ["Bea", "Cal", "Dan", "Eve"]);
    part = await addParts(course.courseId, [
      sphere("S-E", 3),
      column("C-E", 40),
      lot("F-0", 0),
      lot("F-2", 3),
      sphere("S-1", 3),
      sphere("S-2", 4),
      sphere("S-W", 45),
      sphere("S-X", 3),
      column("C-1", 40),
      column("C-2", 40),
      column("C-3", 40),
    ]);
    // The lab names spheres only: S-X is not one of them; any lot and column will do.
    labId = await addLab(course.courseId, [part["S-E"], part["S-1"], part["S-2"], part["S-W"]]);
    shelfKitId = (
      await createKit(db, {
        courseId: course.courseId,
        actorId: course.instructorId,
        number: "K-07",
        partIds: [part["S-E"], part["C-E"], part["F-2"]],
      })
    ).id;
    // Eve already holds a kit.
    await db
      .insert(kits)
      .values({ courseId: course.courseId, number: "K-03", state: "at_home", holderMembershipId: course.membershipOf.Eve });
  });

  it("gives the shelf's kit first, then new kits of loose parts that suit the lab, and says why the rest get none", async () => {
    const plan = await planKitAssignment(db, { courseId: course.courseId, labId, filter: {} });
    const byName = Object.fromEntries(plan.kits.map((kit) => [kit.studentName, kit]));
    // Ada (invited, first by name) gets the kit on the shelf.
    expect(byName["Ada Invited"]).toMatchObject({ key: `i:${course.invitationId}`, kitId: shelfKitId, number: "K-07" });
    // New kits: the lab's spheres that fit a column, the lot with bottles (F-0 has none), numbers after K-07.
    expect(byName.Bea).toMatchObject({ kitId: null, number: "K-08", partLabels: ["S-1", "F-2", "C-1"] });
    expect(byName.Cal).toMatchObject({ kitId: null, number: "K-09", partLabels: ["S-2", "F-2", "C-2"] });
    // S-W is wider than every free bore, and S-X is not one of the lab's spheres.
    expect(plan.refused).toEqual([
      { key: `m:${course.membershipOf.Eve}`, studentName: "Eve", reason: "Already holds kit K-03." },
      { key: `m:${course.membershipOf.Dan}`, studentName: "Dan", reason: "No free column has a bore wider than the spheres left." },
    ]);
  });

  it("refuses a stale plan as a whole, then packs the fresh one in one transaction of a constant number of statements", async () => {
    const plan = await planKitAssignment(db, { courseId: course.courseId, labId, filter: {} });
    // Meanwhile S-2 goes into a kit made up by hand.
    const byHand = await createKit(db, { courseId: course.courseId, actorId: course.instructorId, number: "H-1", partIds: [part["S-2"]] });
    const commit = () => commitKitAssignment(db, { courseId: course.courseId, actorId: course.instructorId, labId, kits: plan.kits });
    await expect(commit()).rejects.toThrow(/The plan is out of date: S-2 was put in another kit meanwhile/);
    const packed = await db
      .select({ id: kits.id })
      .from(kits)
      .where(and(eq(kits.courseId, course.courseId), eq(kits.state, "packed")));
    expect(packed).toEqual([]);
    const [{ bottles }] = await db.select({ bottles: parts.bottlesOnHand }).from(parts).where(eq(parts.id, part["F-2"]));
    expect(bottles).toBe(3);
    await db.delete(kitParts).where(eq(kitParts.kitId, byHand.id));

    const { statements: small } = await countAllStatements(() =>
      commitKitAssignment(db, {
        courseId: course.courseId,
        actorId: course.instructorId,
        labId,
        kits: plan.kits.filter((kit) => kit.studentName === "Ada Invited"),
      }),
    );
    const { statements: large, result } = await countAllStatements(() =>
      commitKitAssignment(db, {
        courseId: course.courseId,
        actorId: course.instructorId,
        labId,
        kits: plan.kits.filter((kit) => kit.studentName !== "Ada Invited"),
      }),
    );
    expect(result).toMatchObject({ packed: 2, made: 2 });
    // The new kits add their inserts and the bottle count; the number does not grow with the kits.
    expect(large - small).toBeLessThanOrEqual(5);
    const rows = await db
      .select({ number: kits.number, state: kits.state, membership: kits.holderMembershipId, invitation: kits.holderInvitationId })
      .from(kits)
      .where(and(eq(kits.courseId, course.courseId), eq(kits.state, "packed")))
      .orderBy(kits.number);
    expect(rows).toEqual([
      { number: "K-07", state: "packed", membership: null, invitation: course.invitationId },
      { number: "K-08", state: "packed", membership: course.membershipOf.Bea, invitation: null },
      { number: "K-09", state: "packed", membership: course.membershipOf.Cal, invitation: null },
    ]);
    const [{ left }] = await db.select({ left: parts.bottlesOnHand }).from(parts).where(eq(parts.id, part["F-2"]));
    expect(left).toBe(1);
  });
});

/** A carrier in this process: scripted answers by the recipient's name, and every label it sold. */
function standInCarrier() {
  const sold = new Map<string, string>();
  const calls: LabelRequest[] = [];
  const label = (reference: string): LabelOutcome => ({
    ok: true,
    carrierShipmentId: `shp_${reference}`,
    carrier: "Parcelwise",
    service: "Ground",
    trackingNumber: `PW${reference.slice(0, 8)}`,
    labelPdf: Buffer.from("%PDF-1.4 label"),
  });
  const carrier: Carrier = {
    async buyLabel(request) {
      calls.push(structuredClone(request));
      if (request.carrierShipmentId && sold.has(request.carrierShipmentId)) return label(request.reference);
      const tries = calls.filter((call) => call.reference === request.reference).length;
      if (request.to.name === "Refused")
        return { ok: false, carrierShipmentId: null, code: "refused_address", message: "The postcode does not match the town." };
      if (request.to.name === "Busy" && tries === 1)
        return { ok: false, carrierShipmentId: null, code: "rate_limited", message: "Too many requests.", retryAfterSeconds: 2 };
      sold.set(`shp_${request.reference}`, request.reference);
      // The label is sold, but the answer is lost on the way back.
      if (request.to.name === "Slow" && tries === 1)
        return { ok: false, carrierShipmentId: `shp_${request.reference}`, code: "timeout", message: "No answer within 10 s." };
      return label(request.reference);
    },
  };
  return { carrier, sold, calls };
}

describe("buying a shipment's labels", () => {
  let course: Awaited<ReturnType<typeof shippingCourse>>;
  let kitOf: Record<string, string>;

  beforeAll(async () => {
    course = await shippingCourse("labels", ["Fine", "Refused", "Busy", "Slow", "Nowhere"], { withoutAddress: ["Nowhere"] });
    // The address on file for "Refused" is one the carrier refuses; the others are named for how the stand-in answers.
    await db.execute(sql`update shipping_addresses set name = 'Refused' where membership_id = ${course.membershipOf.Refused}`);
    const names = Object.keys(course.membershipOf);
    const rows = await db
      .insert(kits)
      .values(
        names.map((name, index) => ({
          courseId: course.courseId,
          number: `L-${index + 1}`,
          state: "packed" as const,
          holderMembershipId: course.membershipOf[name],
        })),
      )
      .returning();
    kitOf = Object.fromEntries(names.map((name, index) => [name, rows[index].id]));
  });

  it("creates a shipment once per request key, with its label job queued on the same transaction", async () => {
    const input = {
      courseId: course.courseId,
      actorId: course.instructorId,
      kind: "outbound" as const,
      requestKey: "labels-once",
      items: [{ kitId: kitOf.Fine }],
    };
    const first = await createShipment(db, input);
    const again = await createShipment(db, { ...input, items: [{ kitId: kitOf.Fine }, { kitId: kitOf.Busy }] });
    expect(first.created).toBe(true);
    expect(again).toEqual({ shipmentId: first.shipmentId, created: false });
    const items = await db.select().from(shipmentItems).where(eq(shipmentItems.shipmentId, first.shipmentId));
    expect(items.map((item) => item.kitId)).toEqual([kitOf.Fine]);
    const jobs = await db.execute(
      sql`select data from pgboss.job where name = 'label-purchase' and data->>'shipmentId' = ${first.shipmentId}`,
    );
    expect(jobs.rows).toHaveLength(1);
    await db.delete(shipmentItems).where(eq(shipmentItems.shipmentId, first.shipmentId));
  });

  it("gives each kit its own result, waits out a rate limit, never buys twice, and e-mails only the shipped kits' students", async () => {
    const { shipmentId } = await createShipment(db, {
      courseId: course.courseId,
      actorId: course.instructorId,
      kind: "outbound",
      requestKey: "labels-cohort",
      items: Object.values(kitOf).map((kitId) => ({ kitId })),
    });
    const { carrier, calls } = standInCarrier();
    const slept: number[] = [];
    const sleep = async (ms: number) => void slept.push(ms);
    const outcome = await buyLabels(db, carrier, shipmentId, { sleep });
    expect(outcome).toEqual({ bought: 3, failed: 2, moved: 3 });
    expect(slept).toEqual([2000]);

    const shipment = await getShipment(db, { courseId: course.courseId, shipmentId, page: 1, pageSize: 25 });
    const result = Object.fromEntries(
      shipment!.items.map((item) => [item.studentName, `${item.status} ${item.errorCode ?? item.trackingNumber?.slice(0, 2)}`]),
    );
    expect(result).toEqual({
      Fine: "bought PW",
      Busy: "bought PW",
      Slow: "bought PW",
      Refused: "failed refused_address",
      Nowhere: "failed no_address",
    });
    expect(shipment).toMatchObject({ total: 5, bought: 3, failed: 2, queued: 0 });
    // The lost answer was retried with its carrier shipment id, and the carrier sold no second label.
    const slowCalls = calls.filter((call) => call.to.name === "Slow");
    expect(slowCalls.map((call) => call.carrierShipmentId)).toEqual([null, expect.stringMatching(/^shp_/)]);
    expect(calls.some((call) => call.to.name === "Nowhere")).toBe(false);

    const states = await db
      .select({ id: kits.id, state: kits.state, tracking: kits.trackingNumber })
      .from(kits)
      .where(inArray(kits.id, Object.values(kitOf)));
    const stateOf = Object.fromEntries(states.map((kit) => [kit.id, kit.state]));
    expect([kitOf.Fine, kitOf.Busy, kitOf.Slow].map((id) => stateOf[id])).toEqual(["in_transit", "in_transit", "in_transit"]);
    expect([kitOf.Refused, kitOf.Nowhere].map((id) => stateOf[id])).toEqual(["packed", "packed"]);
    const mail = await db
      .select({ to: emailOutbox.toAddress })
      .from(emailOutbox)
      .where(and(eq(emailOutbox.template, "kit-shipped"), eq(emailOutbox.courseId, course.courseId)))
      .orderBy(emailOutbox.toAddress);
    expect(mail.map((row) => row.to)).toEqual(["busy@labels.example", "fine@labels.example", "slow@labels.example"]);

    // "Retry failed" leaves the refused address alone until it is fixed, and never touches a bought label.
    expect(await retryFailedItems(db, { courseId: course.courseId, shipmentId })).toEqual({ requeued: 0, waitingForAddress: 2 });
    await db
      .update(shippingAddresses)
      .set({ name: "Mended", updatedAt: new Date(Date.now() + 1000) })
      .where(eq(shippingAddresses.membershipId, course.membershipOf.Refused));
    expect(await retryFailedItems(db, { courseId: course.courseId, shipmentId })).toEqual({ requeued: 1, waitingForAddress: 1 });
    const before = calls.length;
    expect(await buyLabels(db, carrier, shipmentId, { sleep })).toEqual({ bought: 1, failed: 0, moved: 1 });
    expect(calls.slice(before).map((call) => call.to.name)).toEqual(["Mended"]);
    const mailAfter = await db
      .select({ to: emailOutbox.toAddress })
      .from(emailOutbox)
      .where(and(eq(emailOutbox.template, "kit-shipped"), eq(emailOutbox.courseId, course.courseId)));
    expect(mailAfter).toHaveLength(4);
  });

  it("does not show another course's shipment, nor ship another course's kits", async () => {
    const other = await shippingCourse("labels-other", ["Zed"]);
    const [kit] = await db.insert(kits).values({ courseId: other.courseId, number: "Z-1" }).returning();
    const { shipmentId } = await createShipment(db, {
      courseId: other.courseId,
      actorId: other.instructorId,
      kind: "outbound",
      requestKey: "other",
      items: [{ kitId: kit.id }],
    });
    expect(await getShipment(db, { courseId: course.courseId, shipmentId, page: 1, pageSize: 25 })).toBeNull();
    await expect(
      createShipment(db, {
        courseId: course.courseId,
        actorId: course.instructorId,
        kind: "outbound",
        requestKey: "theirs",
        items: [{ kitId: kit.id }],
      }),
    ).rejects.toThrow(/not in this course/);
    await expect(
      commitKitAssignment(db, {
        courseId: course.courseId,
        actorId: course.instructorId,
        labId: await addLab(other.courseId, []),
        kits: [{ key: `m:${course.membershipOf.Fine}` as CandidateKey, kitId: kit.id, number: "Z-1", partIds: [] }],
      }),
    ).rejects.toThrow(/no such lab/);
  });
});

describe("the shipping pages", () => {
  it("previews, packs and buys labels through the pages, each step a plain form", async () => {
    const { createAppHandler, appRequest, sessionCookieFor } = await import("../support/app-requests");
    const handle = await createAppHandler();
    const course = await shippingCourse("pages", ["Gil"]);
    const part = await addParts(course.courseId, [sphere("S-P", 3), column("C-P", 40), lot("F-P", null)]);
    const labId = await addLab(course.courseId, []);
    const cookie = await sessionCookieFor(course.instructorId);
    const path = `/courses/${course.courseId}/shipments/new`;
    expect((await handle(appRequest(path, { cookie }))).status).toBe(200);

    const missingLab = await handle(appRequest(path, { cookie, form: { intent: "preview", kitState: "none" } }));
    expect(missingLab.status).toBe(400);
    const preview = await handle(
      appRequest(`${path}.data`, { cookie, form: { intent: "preview", labId, kitState: "none", keys: `m:${course.membershipOf.Gil}` } }),
    );
    expect(preview.status).toBe(200);
    const plan = await planKitAssignment(db, { courseId: course.courseId, labId, filter: { keys: [`m:${course.membershipOf.Gil}`] } });
    expect(plan.kits.map((kit) => kit.partIds)).toEqual([[part["S-P"], part["F-P"], part["C-P"]]]);
    const packed = await handle(appRequest(path, { cookie, form: { intent: "pack", labId, plan: JSON.stringify(plan.kits) } }));
    expect(packed.status).toBe(200);
    const [kit] = await db.select().from(kits).where(eq(kits.holderMembershipId, course.membershipOf.Gil));
    expect(kit.state).toBe("packed");

    const requestKey = crypto.randomUUID();
    const buy = () => handle(appRequest(path, { cookie, form: { intent: "buy", requestKey, kitIds: kit.id, kitState: "none" } }));
    const first = await buy();
    expect(first.status).toBe(302);
    const again = await buy();
    expect(again.headers.get("location")).toBe(first.headers.get("location"));
    const shipmentPage = await handle(appRequest(first.headers.get("location")!, { cookie }));
    // React separates adjacent text with comments in the server's HTML.
    expect((await shipmentPage.text()).replaceAll("<!-- -->", "")).toContain("0 of 1 label bought");
  });
});
