/**
 * A cohort's kits out and back in Chromium: ten invited students (not yet accepted) are packed kits
 * made up from loose parts, their labels are bought from the fake carrier by the worker, the one print
 * job has a page per kit, the carrier desk's return parcels are imported, and the ten kits are checked
 * in together with every part's condition. The cohort, people and parts are this test's own.
 */
import { randomUUID } from "node:crypto";
import { and, eq, inArray, like } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { cohorts, courses, invitations, kitParts, kits, labs, parts, shippingAddresses, users } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { moveKits } from "~/server/kits/kits.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";
import { pageTexts } from "../support/pdf-text";

const COHORT_SIZE = 10;
const two = (index: number) => String(index + 1).padStart(2, "0");

describe("shipping a cohort and checking it back in, in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const database = createDatabase(pool);
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser();
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  /** A new cohort of invited students with addresses, and loose parts enough for a kit each. */
  async function cohortToShip() {
    const [course] = await database
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    const [cohort] = await database.insert(cohorts).values({ courseId: course.id, name: "Late starters (browser)" }).returning();
    const invited = await database
      .insert(invitations)
      .values(
        Array.from({ length: COHORT_SIZE }, (_, index) => ({
          courseId: course.id,
          email: `late.starter${two(index)}@students.browser.example`,
          name: `Late Starter ${two(index)}`,
          role: "student" as const,
          cohortId: cohort.id,
          tokenHash: randomUUID(),
          expiresAt: new Date(Date.now() + 7 * 86_400_000),
        })),
      )
      .returning();
    await database.insert(shippingAddresses).values(
      invited.map((invitation, index) => ({
        courseId: course.id,
        invitationId: invitation.id,
        name: invitation.name!,
        line1: `${index + 3} Lantern Row`,
        city: "Harrowgate",
        country: "IE",
      })),
    );
    await database.insert(parts).values(
      Array.from({ length: COHORT_SIZE }, (_, index) => [
        {
          courseId: course.id,
          kind: "sphere" as const,
          label: `BR-S${two(index)}`,
          material: "steel",
          diameterMm: 4.0,
          diameterResolutionMm: 0.001,
          massG: 0.262,
          massResolutionG: 0.001,
        },
        {
          courseId: course.id,
          kind: "column" as const,
          label: `BR-C${two(index)}`,
          innerDiameterMm: 40,
          timedDistanceMm: 300,
          runInMm: 120,
          marginBelowMm: 60,
        },
      ]).flat(),
    );
    const [drag] = await database
      .select({ title: labs.title })
      .from(labs)
      .where(and(eq(labs.courseId, course.id), eq(labs.kind, "drag")));
    const [instructor] = await database.select({ id: users.id }).from(users).where(eq(users.email, buildDemoScenario().instructor.email));
    return {
      courseId: course.id,
      cohortId: cohort.id,
      instructorId: instructor.id,
      invitationIds: invited.map((row) => row.id),
      labTitle: drag.title,
    };
  }

  it("packs ten kits for invited students, buys their labels, prints one page per kit, imports the returns and checks them in", async () => {
    const { courseId, cohortId, instructorId, invitationIds, labTitle } = await cohortToShip();
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, buildDemoScenario().instructor.email, DEMO_PASSWORD);

    // Ship a cohort: the whole filtered cohort (no one ticked), previewed, packed, then labelled.
    await page.goto(`${base}/courses/${courseId}/kits`);
    await page.getByRole("link", { name: "Ship a cohort" }).click();
    await page.getByLabel("Cohort").selectOption(cohortId);
    await page.getByRole("button", { name: "Show", exact: true }).click();
    await page.getByText("Late Starter 10").waitFor();
    await page.getByLabel("Lab the kits are for").selectOption({ label: labTitle });
    await page.getByRole("button", { name: "Preview kits" }).click();
    await page.getByRole("heading", { name: `The plan: ${COHORT_SIZE} kits` }).waitFor();
    await page.getByRole("button", { name: `Pack these ${COHORT_SIZE} kits` }).click();
    // Kits on the shelf that suit the lab go first; the others are made up from this test's loose parts.
    await page.getByText(new RegExp(`^${COHORT_SIZE} kits packed \\(\\d+ made up from loose parts\\)`)).waitFor();
    await page.getByRole("button", { name: `Buy labels for the ${COHORT_SIZE} kits packed` }).click();
    // The worker buys them from the fake carrier; the page follows its progress.
    await page.getByText(`${COHORT_SIZE} of ${COHORT_SIZE} labels bought.`).waitFor({ timeout: 30_000 });
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    const shipped = await database
      .select({ id: kits.id, number: kits.number, state: kits.state, trackingNumber: kits.trackingNumber })
      .from(kits)
      .where(inArray(kits.holderInvitationId, invitationIds));
    expect(shipped).toHaveLength(COHORT_SIZE);
    expect(shipped.every((kit) => kit.state === "in_transit" && /^TP\d{16}$/.test(kit.trackingNumber ?? ""))).toBe(true);

    // One print job: a page per kit, each naming its kit and the tracking number on its label.
    const printHref = await page.getByRole("link", { name: "Print slips and labels" }).getAttribute("href");
    const pdf = await page.request.get(`${base}${printHref}`);
    expect(pdf.headers()["content-type"]).toBe("application/pdf");
    const texts = await pageTexts(new Uint8Array(await pdf.body()));
    expect(texts).toHaveLength(COHORT_SIZE);
    for (const kit of shipped)
      expect(texts.filter((text) => text.includes(kit.number) && text.includes(kit.trackingNumber!))).toHaveLength(1);

    // The carrier desk's file of the parcels coming back.
    await page.goto(`${base}/courses/${courseId}/kits/tracking-import`);
    await page.getByLabel("Returns: kits coming back to us").check();
    const rows = shipped.map((kit, index) => `${kit.number},RT-BROWSER-${two(index)},Parcelwise,2027-03-01`);
    await page.getByLabel(/paste the rows/).fill(["Reference,Tracking number,Carrier,Ship date", ...rows].join("\n"));
    await page.getByRole("button", { name: "Preview the pasted rows" }).click();
    await page.getByRole("button", { name: `Import ${COHORT_SIZE} return parcels` }).click();
    await page.getByText(/Imported/).waitFor();
    const back = await database.select({ state: kits.state }).from(kits).where(inArray(kits.holderInvitationId, invitationIds));
    expect(back.map((kit) => kit.state)).toEqual(Array(COHORT_SIZE).fill("coming_back"));

    // Bulk check-in: a condition for every part, the shortcut for nine kits and a damaged sphere in one.
    await page.goto(`${base}/courses/${courseId}/kits/check-in`);
    for (const kit of shipped) await page.getByLabel(`Kit ${kit.number}`, { exact: false }).check();
    await page.getByRole("button", { name: "Check these in" }).click();
    const checkIn = page.getByRole("button", { name: `Check the ${COHORT_SIZE} kits in` });
    await checkIn.click();
    // Nothing said about the parts: refused at each part, nothing checked in.
    await page.getByText("Choose this part's condition, or tick all parts fine.").first().waitFor();
    expect(
      await database
        .select({ id: kits.id })
        .from(kits)
        .where(and(inArray(kits.holderInvitationId, invitationIds), eq(kits.state, "checked_in"))),
    ).toEqual([]);
    // A fresh page: after a refusal, the page that answered it does not keep a second shortcut ticked
    // (a defect left open, named in the note).
    await page.reload();
    // A kit made up from this test's parts has one of its spheres damaged.
    const [{ kitId: damagedId }] = await database
      .select({ kitId: kitParts.kitId })
      .from(kitParts)
      .innerJoin(parts, eq(parts.id, kitParts.partId))
      .where(and(eq(parts.courseId, courseId), like(parts.label, "BR-S%")))
      .limit(1);
    const damaged = shipped.find((kit) => kit.id === damagedId)!;
    const fine = shipped.filter((kit) => kit !== damaged);
    for (const kit of fine)
      await page
        .getByRole("group", { name: new RegExp(`^Kit ${kit.number}\\b`) })
        .getByLabel(/^All parts fine/)
        .check();
    // The shortcut cannot hide a damaged part: that kit's parts are each given their condition.
    const conditions = page.getByRole("group", { name: new RegExp(`^Kit ${damaged.number}\\b`) }).getByLabel(/^Condition of /);
    for (let index = 0; index < (await conditions.count()); index++) await conditions.nth(index).selectOption("fine");
    await page.getByLabel(new RegExp(`^Condition of BR-S\\d+ in kit ${damaged.number}$`)).selectOption("damaged");
    await checkIn.click();
    await page.getByText(`${COHORT_SIZE} kits checked in.`).waitFor();

    const after = await database
      .select({ state: kits.state })
      .from(kits)
      .where(
        inArray(
          kits.id,
          shipped.map((kit) => kit.id),
        ),
      );
    expect(after.map((kit) => kit.state)).toEqual(Array(COHORT_SIZE).fill("checked_in"));
    const spheres = await database
      .select({ label: parts.label, status: parts.status })
      .from(parts)
      .where(
        and(
          eq(parts.courseId, courseId),
          inArray(
            parts.label,
            Array.from({ length: COHORT_SIZE }, (_, index) => `BR-S${two(index)}`),
          ),
        ),
      );
    expect(spheres.filter((sphere) => sphere.status === "retired")).toHaveLength(1);
    expect(spheres.filter((sphere) => sphere.status === "in_service")).toHaveLength(COHORT_SIZE - 1);
    // Back on the shelf, as after a real term: the demo's shelf kits this test took are there for the other suites.
    await moveKits(database, { courseId, actorId: instructorId, kitIds: shipped.map((kit) => kit.id), move: { to: "on_shelf" } });
    await page.close();
  });
});
