import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { axeViolations, openBrowser, seriousOrCritical, type BrowserSession } from "../support/browser";

describe("home page in Chromium", () => {
  let browser: BrowserSession;
  beforeAll(async () => {
    browser = await openBrowser();
  });
  afterAll(async () => {
    await browser.close();
  });

  it("shows the Benchpost title, uses the shipped Lexend font and has no serious accessibility violations", async () => {
    const page = await browser.context.newPage();
    const external: string[] = [];
    page.on("request", (request) => {
      if (!request.url().startsWith(inject("baseUrl"))) external.push(request.url());
    });
    await page.goto(inject("baseUrl"));
    await expect(page.title()).resolves.toBe("Benchpost");
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toMatch(/lab courses/i);

    const fontLoaded = await page.evaluate(async () => {
      await document.fonts.ready;
      return (
        document.fonts.check('16px "Lexend"') &&
        [...document.fonts].some((face) => face.family.includes("Lexend") && face.status === "loaded")
      );
    });
    expect(fontLoaded).toBe(true);
    expect(external, "nothing is loaded from the network").toEqual([]);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
  });
});
