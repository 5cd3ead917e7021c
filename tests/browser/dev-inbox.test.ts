import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { sendEmail } from "~/server/email/send-email.server";
import { axeViolations, openBrowser, seriousOrCritical, type BrowserSession } from "../support/browser";

type CaughtForTest = { id: string; subject: string; links: string[] };

async function caughtFor(to: string): Promise<CaughtForTest[]> {
  const response = await fetch(`${inject("baseUrl")}/api/dev/emails?to=${encodeURIComponent(to)}`);
  expect(response.status).toBe(200);
  return ((await response.json()) as { emails: CaughtForTest[] }).emails;
}

describe("development inbox in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  beforeAll(async () => {
    browser = await openBrowser();
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("shows a message the worker delivered to the catcher, its HTML sandboxed, and the template previews", async () => {
    const to = "inbox.reader@example.org";
    await sendEmail(createDatabase(pool), {
      to,
      template: "password-reset",
      props: { url: `${inject("baseUrl")}/reset/browser-test`, expiresInMinutes: 30 },
    });
    let emails: CaughtForTest[] = [];
    for (let tries = 0; tries < 160 && emails.length === 0; tries++) {
      await new Promise((resolve) => setTimeout(resolve, 250));
      emails = await caughtFor(to);
    }
    expect(emails.map((email) => email.subject)).toEqual(["Choose a new Benchpost password"]);
    expect(emails[0].links).toContain(`${inject("baseUrl")}/reset/browser-test`);

    const page = await browser.context.newPage();
    await page.goto(`${inject("baseUrl")}/dev/inbox?message=${emails[0].id}`);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toBe("Development inbox");
    const frame = page.locator("iframe");
    await expect(frame.getAttribute("sandbox")).resolves.toBe("");
    await expect(page.frameLocator("iframe").getByText("Choose a new password", { exact: true }).first().textContent()).resolves.toBe(
      "Choose a new password",
    );
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    // One column: the message read comes first, full width, above the caught slips; no list beside a reading pane.
    await expect(page.locator("aside").count()).resolves.toBe(0);
    const order = await page.evaluate(() => {
      const shown = document.getElementById("shown-heading")!.getBoundingClientRect();
      const caught = document.getElementById("caught-heading")!.getBoundingClientRect();
      return { shownAbove: shown.bottom <= caught.top, sameLeft: Math.abs(shown.left - caught.left) < 40 };
    });
    expect(order).toEqual({ shownAbove: true, sameLeft: true });
    // The slip of the message being read says so in words, not only by its frame.
    await expect(page.locator('section[aria-labelledby="caught-heading"] a[aria-current="page"]').textContent()).resolves.toBe(
      "Reading it above: Choose a new Benchpost password",
    );

    await page.getByRole("link", { name: "kit-shipped" }).click();
    await page.waitForURL(/preview=kit-shipped/);
    await expect(page.getByRole("heading", { level: 2, name: /Preview: Your Demo/ }).textContent()).resolves.toMatch(/kit DEMO-K-007/);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
  });
});
