import { and, eq } from "drizzle-orm";
import { PDFDocument, StandardFonts } from "pdf-lib";
import { beforeAll, describe, expect, it } from "vitest";
import { auditEvents, courseMemberships, kitParts, kits, parts, shipmentItems, shipments, shippingAddresses, users } from "~/db/schema";
import { safetyCautions, safetyCautionsDeferral } from "~/lib/safety/cautions";
import { db } from "~/server/db.server";
import { shipmentPrintPdf } from "~/server/shipping/print.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { type AppHandler, appRequest, createAppHandler, sessionCookieFor } from "../support/app-requests";
import { countAllStatements } from "../support/count-statements";
import { pageTexts } from "../support/pdf-text";

/** A carrier's label as the carrier sends it: a 4×6 in PDF naming its tracking number. */
async function labelPdf(trackingNumber: string): Promise<Buffer> {
  const label = await PDFDocument.create();
  const font = await label.embedFont(StandardFonts.HelveticaBold);
  label.addPage([288, 432]).drawText(`PARCELWISE ${trackingNumber}`, { x: 20, y: 380, size: 14, font });
  return Buffer.from(await label.save());
}

let fixture: AccessFixture;
let handle: AppHandler;
beforeAll(async () => {
  fixture = await createAccessFixture("print");
  handle = await createAppHandler();
});

type KitSpec = { number: string; name: string; city: string; label: "bought" | "queued" | "damaged" };

/** A shipment of new kits, each packed for a new student of cohort one with an address; one statement per table. */
async function shipmentOf(specs: KitSpec[]) {
  const people = await db
    .insert(users)
    .values(specs.map((spec) => ({ email: `${spec.number.toLowerCase()}@print.example`, name: spec.name })))
    .returning({ id: users.id });
  const memberships = await db
    .insert(courseMemberships)
    .values(
      people.map((person) => ({ courseId: fixture.courseId, userId: person.id, role: "student" as const, cohortId: fixture.cohortId })),
    )
    .returning({ id: courseMemberships.id });
  await db.insert(shippingAddresses).values(
    specs.map((spec, index) => ({
      courseId: fixture.courseId,
      membershipId: memberships[index].id,
      name: spec.name,
      line1: "7 Kettle Lane",
      city: spec.city,
      postcode: "ZZ1 1ZZ",
      country: "GB",
    })),
  );
  const kitRows = await db
    .insert(kits)
    .values(
      specs.map((spec, index) => ({
        courseId: fixture.courseId,
        number: spec.number,
        state: "packed" as const,
        holderMembershipId: memberships[index].id,
      })),
    )
    .returning();
  const spheres = await db
    .insert(parts)
    .values(
      specs.map((spec) => ({
        courseId: fixture.courseId,
        kind: "sphere" as const,
        label: `S-${spec.number}`,
        material: "steel",
        diameterMm: 3,
        diameterResolutionMm: 0.01,
        massG: 0.11,
        massResolutionG: 0.001,
      })),
    )
    .returning();
  await db.insert(kitParts).values(kitRows.map((kit, index) => ({ kitId: kit.id, partId: spheres[index].id })));
  const [shipment] = await db
    .insert(shipments)
    .values({ courseId: fixture.courseId, kind: "outbound", requestKey: crypto.randomUUID(), createdById: fixture.userIds.instructor })
    .returning();
  await db.insert(shipmentItems).values(
    await Promise.all(
      specs.map(async (spec, index) =>
        spec.label === "queued"
          ? { shipmentId: shipment.id, kitId: kitRows[index].id, status: "queued" as const }
          : {
              shipmentId: shipment.id,
              kitId: kitRows[index].id,
              status: "bought" as const,
              carrier: "Parcelwise",
              service: "Ground",
              trackingNumber: `TRK-${spec.number}`,
              labelPdf: spec.label === "bought" ? await labelPdf(`TRK-${spec.number}`) : Buffer.from("not a PDF at all"),
            },
      ),
    ),
  );
  return { shipmentId: shipment.id, membershipIds: memberships.map((membership) => membership.id), kitIds: kitRows.map((kit) => kit.id) };
}

const course = () => ({ id: fixture.courseId, code: "print-A", title: "Settling Spheres" });

describe("a shipment's print job", () => {
  it("has one page per kit, each with its label, kit number, tracking number, slip and cautions", async () => {
    const { shipmentId, membershipIds } = await shipmentOf([
      { number: "P-2", name: "Ada Student", city: "Brindle", label: "bought" },
      { number: "P-1", name: "Łucja Ćwik", city: "Łódź 東京", label: "bought" },
      { number: "P-3", name: "Ben Waiting", city: "Brindle", label: "queued" },
      { number: "P-4", name: "Cy Damaged", city: "Brindle", label: "damaged" },
    ]);
    const pdf = await shipmentPrintPdf(db, { course: course(), shipmentId, actorId: fixture.userIds.instructor });
    const pages = await pageTexts(pdf!);
    expect(pages).toHaveLength(4);
    // In kit-number order, and each page's label (drawn from the carrier's own PDF) carries its tracking number.
    expect(pages[0]).toContain("Kit P-1");
    expect(pages[0]).toContain("PARCELWISE TRK-P-1");
    expect(pages[1]).toContain("Kit P-2");
    expect(pages[1]).toContain("PARCELWISE TRK-P-2");
    expect(pages[1]).toMatch(/7 Kettle Lane.*ZZ1 1ZZ Brindle/);
    expect(pages[1]).toContain("S-P-2");
    expect(pages[1]).toContain("d = 3.00 mm, m = 0.110 g (rho ~ 7781 kg/m³)");
    // Every caution, whole, on every kit's slip (the lines are wrapped at spaces, so they join back).
    for (const page of pages) {
      for (const caution of safetyCautions) expect(page, caution.topic).toContain(`${caution.topic}. ${caution.text}`);
      expect(page).toContain(safetyCautionsDeferral);
    }
    // What the standard fonts cannot draw is replaced, visibly, and the page still prints.
    expect(pages[0]).toContain("For ?ucja ?wik");
    expect(pages[0]).toContain("ZZ1 1ZZ ?ód? ??");
    expect(pages[2]).toContain("Kit P-3");
    expect(pages[2]).toContain("NO LABEL YET");
    expect(pages[2]).toContain("The label is waiting to be bought.");
    expect(pages[2]).not.toContain("TRK-");
    expect(pages[3]).toContain("Kit P-4");
    expect(pages[3]).toContain("The label file could not be read");

    const audit = await db
      .select({ subject: auditEvents.subject, actorId: auditEvents.actorId })
      .from(auditEvents)
      .where(and(eq(auditEvents.courseId, fixture.courseId), eq(auditEvents.action, "address.viewed")));
    expect(audit.map((event) => event.subject).sort()).toEqual(membershipIds.map((id) => `membership:${id}`).sort());
    expect(new Set(audit.map((event) => event.actorId))).toEqual(new Set([fixture.userIds.instructor]));
  });

  it("reads a shipment of any size in the same number of statements", async () => {
    const small = await shipmentOf([{ number: "Q-1", name: "Q One", city: "Brindle", label: "bought" }]);
    const large = await shipmentOf(
      Array.from({ length: 6 }, (_, index) => ({ number: `R-${index}`, name: `R ${index}`, city: "Brindle", label: "bought" as const })),
    );
    const print = (shipmentId: string) => () => shipmentPrintPdf(db, { course: course(), shipmentId, actorId: fixture.userIds.instructor });
    const one = await countAllStatements(print(small.shipmentId));
    const six = await countAllStatements(print(large.shipmentId));
    expect(six.statements).toBe(one.statements);
    expect(await pageTexts(six.result!)).toHaveLength(6);
  });

  it("keeps a kit of many parts on one page with every caution, naming the parts it had no room for", async () => {
    const { shipmentId, kitIds } = await shipmentOf([{ number: "M-1", name: "Many Parts", city: "Brindle", label: "bought" }]);
    const accessories = await db
      .insert(parts)
      .values(
        Array.from({ length: 45 }, (_, index) => ({
          courseId: fixture.courseId,
          kind: "accessory" as const,
          label: `A-M-${index}`,
          accessoryType: "stopwatch",
        })),
      )
      .returning();
    await db.insert(kitParts).values(accessories.map((part) => ({ kitId: kitIds[0], partId: part.id })));
    const pdf = await shipmentPrintPdf(db, { course: course(), shipmentId, actorId: fixture.userIds.instructor });
    const pages = await pageTexts(pdf!);
    expect(pages).toHaveLength(1);
    expect(pages[0]).toMatch(/…and \d+ more parts: the kit's page in Benchpost lists them all\./);
    expect(pages[0]).toContain("Children. Children use the kit only");
    expect(pages[0]).toContain("These are general cautions.");
  });

  it("is a PDF for the course's instructors, refused to TAs, students and other courses' instructors", async () => {
    const { shipmentId } = await shipmentOf([{ number: "H-1", name: "Hal Http", city: "Brindle", label: "bought" }]);
    const get = async (userId: string, path = `/courses/${fixture.courseId}/shipments/${shipmentId}/print.pdf`) =>
      handle(appRequest(path, { cookie: await sessionCookieFor(userId) }));
    const response = await get(fixture.userIds.instructor);
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/pdf");
    expect(response.headers.get("cache-control")).toContain("no-store");
    expect(await pageTexts(new Uint8Array(await response.arrayBuffer()))).toEqual([expect.stringContaining("TRK-H-1")]);
    for (const actor of ["assignedTa", "ownStudent", "otherInstructor"] as const) {
      const refused = await get(fixture.userIds[actor]);
      expect(refused.status, actor).toBe(403);
      await refused.body?.cancel();
    }
    // Another course's instructor asking through their own course finds no such shipment there.
    const elsewhere = await get(fixture.userIds.otherInstructor, `/courses/${fixture.otherCourseId}/shipments/${shipmentId}/print.pdf`);
    expect(elsewhere.status).toBe(404);
    await elsewhere.body?.cancel();
  });
});
