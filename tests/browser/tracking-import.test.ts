import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { courses, kits } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

describe("the tracking import in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser();
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("an instructor previews a carrier's file, sees its bad line, then ships the packed kit it names", async () => {
    const database = createDatabase(pool);
    const [course] = await database
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, buildDemoScenario().instructor.email, DEMO_PASSWORD);

    await page.goto(`${base}/courses/${course.id}/kits`);
    await page.getByRole("link", { name: "Import tracking numbers (CSV)" }).click();
    const header = "REFERENCE,Tracking #,Carrier,Ship date";
    const good = "K-41,PW-BROWSER-41,Parcelwise,2027-01-18";
    await page.getByLabel(/paste the rows/).fill([header, good, "K-99,PW-BROWSER-99,Parcelwise,2027-01-18"].join("\n"));
    await page.getByRole("button", { name: "Preview the pasted rows" }).click();
    await page.getByRole("heading", { name: "Preview: 2 rows, 1 with problems" }).waitFor();
    await expect(page.getByText("There is no kit “K-99” in this course.").isVisible()).resolves.toBe(true);
    await expect(page.getByText("To in transit; the student is e-mailed the tracking number").isVisible()).resolves.toBe(true);
    await expect(page.getByRole("button", { name: /^Import \d/ }).count()).resolves.toBe(0);

    // The same line read as a return parcel: a packed kit cannot take one.
    await page.getByLabel("Returns: kits coming back to us").check();
    await expect(page.getByText(/Kit K-41 is packed: a return parcel needs/).isVisible()).resolves.toBe(true);
    await page.getByLabel("Outbound: kits going to students").check();

    await page.getByLabel(/paste the rows/).fill([header, good].join("\n"));
    await page.getByRole("button", { name: "Preview the pasted rows" }).click();
    await page.getByRole("button", { name: "Import 1 outbound parcel" }).click();
    await page.getByText(/Imported: 1 kit in transit/).waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    const [kit] = await database
      .select({ state: kits.state, trackingNumber: kits.trackingNumber })
      .from(kits)
      .where(and(eq(kits.courseId, course.id), eq(kits.number, "K-41")));
    expect(kit).toEqual({ state: "in_transit", trackingNumber: "PW-BROWSER-41" });
  });
});
