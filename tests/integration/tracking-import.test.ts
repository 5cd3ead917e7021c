import { randomUUID } from "node:crypto";
import { and, eq, inArray } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courseMemberships, emailOutbox, kitEvents, kits, users } from "~/db/schema";
import type { TrackingRow } from "~/lib/shipping/tracking-rows";
import { db } from "~/server/db.server";
import { importTracking } from "~/server/shipping/tracking-import.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countAllStatements } from "../support/count-statements";

let fixture: AccessFixture;
beforeAll(async () => {
  fixture = await createAccessFixture("tracking");
});

/** Students of cohort one, each with a kit in `state` (held by them), numbered `${prefix}-1`…. */
async function kitsFor(prefix: string, count: number, state: "packed" | "in_transit" | "at_home" | "on_shelf" = "packed") {
  const people = await db
    .insert(users)
    .values(
      Array.from({ length: count }, (_, index) => ({
        email: `${prefix}-${index + 1}@tracking.example`.toLowerCase(),
        name: `${prefix} ${index + 1}`,
      })),
    )
    .returning({ id: users.id });
  const memberships = await db
    .insert(courseMemberships)
    .values(
      people.map((person) => ({ courseId: fixture.courseId, userId: person.id, role: "student" as const, cohortId: fixture.cohortId })),
    )
    .returning({ id: courseMemberships.id });
  return db
    .insert(kits)
    .values(
      memberships.map((membership, index) => ({
        courseId: fixture.courseId,
        number: `${prefix}-${index + 1}`,
        state,
        holderMembershipId: state === "on_shelf" ? null : membership.id,
        ...(state === "packed" || state === "on_shelf"
          ? {}
          : { carrier: "Parcelwise", trackingNumber: `OUT-${prefix}-${index + 1}`, shippedOn: "2027-01-11" }),
      })),
    )
    .returning();
}

const row = (line: number, kit: string, tracking: string, date = "2027-01-18"): TrackingRow => ({
  line,
  kit,
  tracking,
  carrier: "Parcelwise",
  date,
});
const base = () => ({ courseId: fixture.courseId, actorId: fixture.userIds.instructor });

const shippedMailTo = (kitNumbers: string[]) =>
  db
    .select({ to: emailOutbox.toAddress, props: emailOutbox.props })
    .from(emailOutbox)
    .where(and(eq(emailOutbox.courseId, fixture.courseId), eq(emailOutbox.template, "kit-shipped")))
    .then((mails) => mails.filter((mail) => kitNumbers.includes(String(mail.props.kitNumber))));

const kitsNamed = (numbers: string[]) =>
  db
    .select()
    .from(kits)
    .where(and(eq(kits.courseId, fixture.courseId), inArray(kits.number, numbers)))
    .orderBy(kits.number);

describe("tracking import", () => {
  it("names each kind of problem, and writes nothing while any row has one", async () => {
    const [packed, alsoPacked] = await kitsFor("ERR", 2);
    const [onShelf] = await kitsFor("SHELF", 1, "on_shelf");
    const rows = [
      row(2, packed.number, "PW-ERR-1"),
      row(3, "NO-SUCH-KIT", "PW-ERR-2"),
      row(4, onShelf.number, "PW-ERR-3"),
      row(5, packed.number, "PW-ERR-4"),
      row(6, alsoPacked.number, "PW-ERR-5", "2027-13-01"),
      row(7, alsoPacked.number.toLowerCase(), "  "),
    ];
    const result = await importTracking(db, { ...base(), direction: "outbound", importKey: randomUUID(), rows });
    expect(result.ok).toBe(false);
    expect(!result.ok && result.problems.map((check) => [check.row.line, check.problems])).toEqual([
      [3, ["There is no kit “NO-SUCH-KIT” in this course."]],
      [4, ["Kit SHELF-1 is on shelf: an outbound parcel needs a packed kit (or one in transit, to correct it)."]],
      [5, ["Kit ERR-1 is also on line 2."]],
      [6, ["“2027-13-01” is not a date we can read; write it as YYYY-MM-DD."]],
      [7, ["Kit ERR-2 is also on line 6.", "The tracking number is missing."]],
    ]);
    // Line 2 was fine, and still nothing of it was written.
    expect((await kitsNamed(["ERR-1", "ERR-2"])).map((kit) => [kit.state, kit.trackingNumber])).toEqual([
      ["packed", null],
      ["packed", null],
    ]);
    expect(await shippedMailTo(["ERR-1", "ERR-2"])).toEqual([]);
  });

  it("sends packed kits in transit with their own parcels and e-mails each student, in a constant number of statements", async () => {
    const few = await kitsFor("OUT", 2);
    const many = await kitsFor("OUTMANY", 8);
    const rowsOf = (list: typeof few, prefix: string) => list.map((kit, index) => row(index + 2, kit.number, `${prefix}${index}`));
    const small = await countAllStatements(() =>
      importTracking(db, { ...base(), direction: "outbound", importKey: randomUUID(), rows: rowsOf(few, "PWA") }),
    );
    const large = await countAllStatements(() =>
      importTracking(db, { ...base(), direction: "outbound", importKey: randomUUID(), rows: rowsOf(many, "PWB") }),
    );
    expect(small.result).toEqual({ ok: true, duplicate: false, moved: 2, corrected: 0, unchanged: 0 });
    expect(large.result).toMatchObject({ ok: true, moved: 8 });
    expect(large.statements).toBe(small.statements);

    const after = await kitsNamed(["OUT-1", "OUT-2"]);
    expect(after.map((kit) => [kit.state, kit.carrier, kit.trackingNumber, kit.shippedOn])).toEqual([
      ["in_transit", "Parcelwise", "PWA0", "2027-01-18"],
      ["in_transit", "Parcelwise", "PWA1", "2027-01-18"],
    ]);
    const mails = await shippedMailTo(["OUT-1", "OUT-2"]);
    expect(mails.map((mail) => [mail.to, mail.props.trackingNumber]).sort()).toEqual([
      ["out-1@tracking.example", "PWA0"],
      ["out-2@tracking.example", "PWA1"],
    ]);
  });

  it("corrects a parcel already in transit without a second e-mail, and leaves a kit that has its parcel alone", async () => {
    const [wrong, right] = await kitsFor("FIX", 2, "in_transit");
    const result = await importTracking(db, {
      ...base(),
      direction: "outbound",
      importKey: randomUUID(),
      rows: [row(2, wrong.number, "PW-FIXED"), { ...row(3, right.number, right.trackingNumber!), date: right.shippedOn! }],
    });
    expect(result).toEqual({ ok: true, duplicate: false, moved: 0, corrected: 1, unchanged: 1 });
    const [fixed, untouched] = await kitsNamed(["FIX-1", "FIX-2"]);
    expect([fixed.state, fixed.trackingNumber, fixed.shippedOn]).toEqual(["in_transit", "PW-FIXED", "2027-01-18"]);
    expect(untouched.updatedAt).toEqual(right.updatedAt);
    const history = await db
      .select()
      .from(kitEvents)
      .where(inArray(kitEvents.kitId, [wrong.id, right.id]));
    expect(history.map((event) => [event.kitId, event.action, event.detail.shipping?.trackingNumber])).toEqual([
      [wrong.id, "tracking_corrected", "PW-FIXED"],
    ]);
    expect(await shippedMailTo(["FIX-1", "FIX-2"])).toEqual([]);
  });

  it("commits a preview once: the same import key again writes nothing and says when it was imported", async () => {
    const [kit] = await kitsFor("ONCE", 1);
    const importKey = randomUUID();
    const commit = () => importTracking(db, { ...base(), direction: "outbound", importKey, rows: [row(2, kit.number, "PW-ONCE")] });
    const [first, second] = await Promise.all([commit(), commit()]);
    const results = [first, second].sort((a, b) => Number("duplicate" in a && a.duplicate) - Number("duplicate" in b && b.duplicate));
    expect(results[0]).toEqual({ ok: true, duplicate: false, moved: 1, corrected: 0, unchanged: 0 });
    expect(results[1]).toMatchObject({ ok: true, duplicate: true, moved: 1, committedAt: expect.any(Date) });
    expect(await shippedMailTo(["ONCE-1"])).toHaveLength(1);
    const moves = await db
      .select()
      .from(kitEvents)
      .where(and(eq(kitEvents.kitId, kit.id), eq(kitEvents.action, "moved")));
    expect(moves).toHaveLength(1);
    const audit = await db
      .select()
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, fixture.courseId), eq(auditEvents.subject, `tracking-import:${importKey}`)));
    expect(audit).toMatchObject([
      { action: "kit.tracking_imported", actorId: fixture.userIds.instructor, detail: { direction: "outbound" } },
    ]);
  });

  it("keeps a return parcel on kits coming back, next to the outbound one", async () => {
    const [home, inTransit] = [...(await kitsFor("BACK", 1, "at_home")), ...(await kitsFor("BOUNCE", 1, "in_transit"))];
    const result = await importTracking(db, {
      ...base(),
      direction: "return",
      importKey: randomUUID(),
      rows: [row(2, home.number, "RET-1", "2027-03-02"), row(3, inTransit.number, "RET-2", "2027-03-02")],
    });
    expect(result).toMatchObject({ ok: true, moved: 2 });
    const after = await kitsNamed(["BACK-1", "BOUNCE-1"]);
    expect(after.map((kit) => [kit.state, kit.trackingNumber, kit.returnCarrier, kit.returnTrackingNumber, kit.returnShippedOn])).toEqual([
      ["coming_back", "OUT-BACK-1", "Parcelwise", "RET-1", "2027-03-02"],
      ["coming_back", "OUT-BOUNCE-1", "Parcelwise", "RET-2", "2027-03-02"],
    ]);
    expect(await shippedMailTo(["BACK-1", "BOUNCE-1"])).toEqual([]);
  });

  it("takes the page's form from an instructor, and shows them a resent form as already imported", async () => {
    const [kit] = await kitsFor("FORM", 1);
    const handle = await createAppHandler();
    const form = {
      direction: "outbound",
      importKey: randomUUID(),
      rows: JSON.stringify([{ line: 2, kit: kit.number, tracking: "PW-FORM", carrier: "Parcelwise", date: "2027-01-18" }]),
    };
    const post = async (userId: string) =>
      handle(appRequest(`/courses/${fixture.courseId}/kits/tracking-import`, { form, cookie: await sessionCookieFor(userId) }));
    expect((await post(fixture.userIds.assignedTa)).status).toBe(403);
    expect((await kitsNamed(["FORM-1"]))[0].state).toBe("packed");
    const first = await post(fixture.userIds.instructor);
    expect(first.status).toBe(200);
    expect((await kitsNamed(["FORM-1"]))[0]).toMatchObject({ state: "in_transit", trackingNumber: "PW-FORM" });
    const again = await post(fixture.userIds.instructor);
    expect(again.status).toBe(200);
    expect(await again.text()).toContain("Already imported on");
    expect(await shippedMailTo(["FORM-1"])).toHaveLength(1);
  });
});
