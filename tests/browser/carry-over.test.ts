/**
 * The instructor finds last term's archived course under "Archived courses", sees that it is
 * read-only, and starts next term from it: the preview follows the typed number of days, and the new
 * course opens with its labs as drafts. Only adds to the demo (a course with a term of its own).
 */
import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { DEMO_PASSWORD, DEMO_DOMAIN } from "../../seeds/demo-scenario";
import { lastTerm } from "../../seeds/seed-last-term";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

describe("starting next term from an archived course", () => {
  let browser: BrowserSession;
  beforeAll(async () => {
    browser = await openBrowser();
  });
  afterAll(async () => {
    await browser.close();
  });

  it("previews the moved dates and opens the new course", async () => {
    const baseUrl = inject("baseUrl");
    const page = await browser.context.newPage();
    await signInWithPassword(page, baseUrl, `instructor@${DEMO_DOMAIN}`, DEMO_PASSWORD);
    await page.goto(baseUrl);
    await page.getByText(/^Archived courses/).click();
    await page.getByRole("link", { name: new RegExp(lastTerm) }).click();
    await page.getByText("This course is archived and read-only").waitFor();

    await page.getByRole("link", { name: "Settings" }).click();
    await page.getByRole("link", { name: "Start next term from this course" }).click();
    await page.getByRole("heading", { level: 1, name: "Start next term from this course" }).waitFor();
    const term = `Browser ${randomBytes(3).toString("hex")}`;
    await page.getByLabel("Term").fill(term);
    const firstNewDue = page.locator("tbody tr").nth(1).locator("td").nth(2);
    const before = await firstNewDue.textContent();
    await page.getByLabel(/Move every date by/).fill("189");
    await expect.poll(() => firstNewDue.textContent()).not.toBe(before);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    await Promise.all([
      page.waitForURL((url) => url.pathname.endsWith("/settings") && url.searchParams.has("carried")),
      page.getByRole("button", { name: "Start the new course" }).click(),
    ]);
    await page.getByText("The new course is open, its labs as drafts.").waitFor();
    await expect(page.getByText(term).first().isVisible()).resolves.toBe(true);
  });
});
