import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { courses } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCohortNames, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, emailTo, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

describe("roster import and shipping a kit in Chromium", () => {
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

  it("an instructor previews a roster, sees its bad row, imports the good ones, then packs and ships a kit", async () => {
    const [course] = await createDatabase(pool)
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, buildDemoScenario().instructor.email, DEMO_PASSWORD);

    await page.goto(`${base}/courses/${course.id}/roster`);
    const header = "email,name,cohort,role";
    const good = [
      `new.one@students.harrowgate.example,New One,${demoCohortNames[0]},student`,
      `new.two@students.harrowgate.example,New Two,${demoCohortNames[2]},`,
    ];
    await page.getByLabel(/paste the rows/).fill([header, ...good, "not-an-address,Broken,Nowhere,student"].join("\n"));
    await page.getByRole("button", { name: "Preview the pasted rows" }).click();
    await page.getByRole("heading", { name: "Preview: 3 rows, 1 with problems" }).waitFor();
    await expect(page.getByText("“not-an-address” is not an e-mail address.").isVisible()).resolves.toBe(true);
    // Only the rows without problems are imported; the bad one is left out, and the page says so.
    await expect(page.getByText("1 row with problems is left out").isVisible()).resolves.toBe(true);
    await page.getByRole("button", { name: "Import 2 people and send their invitations" }).click();
    await page.getByText("Imported: 2 invitations sent (2 students, 0 TAs).").waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    expect(
      (await emailTo(base, "new.two@students.harrowgate.example", /invit/i)).links.some((link) => link.includes("/invitations/")),
    ).toBe(true);

    // A kit on the shelf is packed for a student without one, then shipped.
    await page.goto(`${base}/courses/${course.id}/kits?state=on_shelf`);
    await page.getByRole("link", { name: "K-39" }).click();
    const packFor = page.getByLabel("Pack for");
    const student = (await packFor.locator("option").nth(1).textContent())!;
    await packFor.selectOption({ index: 1 });
    await page.getByRole("button", { name: "Mark packed" }).click();
    // Another suite may have sent this kit out before, so the move is awaited at the top of the history.
    const newestMove = page.locator("ol li").first();
    await newestMove.filter({ hasText: "On shelf → Packed" }).waitFor();
    await page.getByLabel("Carrier").fill("Parcelwise");
    await page.getByLabel("Tracking number").fill("PW0000012345");
    await page.getByRole("button", { name: "Mark in transit and tell the student" }).click();
    await newestMove.filter({ hasText: "Packed → In transit" }).waitFor();
    const history = (await page.locator("ol li").allTextContents()).map((entry) => entry.split(" · ").pop());
    expect(history.slice(0, 2)).toEqual(["Packed → In transit", "On shelf → Packed"]);
    expect(history.at(-1)).toBe("Made up and put on the shelf");
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    const address = student.match(/\(([^)]+)\)$/)![1];
    const shipped = await emailTo(base, address, /kit/i);
    expect(shipped.subject).toMatch(/K-39/);
  });
});
