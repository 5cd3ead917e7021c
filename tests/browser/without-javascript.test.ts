/**
 * The forms are plain HTML forms: with scripts off, Chromium posts them and the server's answer puts
 * each error at its field, keeps what was typed (never the password) and carries on when it is right.
 */
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { openBrowser, type BrowserSession } from "../support/browser";

describe("forms without JavaScript", () => {
  let browser: BrowserSession;
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser({ javaScriptEnabled: false });
  });
  afterAll(async () => {
    await browser.close();
  });

  it("signs in: a wrong password is refused above the form with the e-mail kept, the right one signs in", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${base}/sign-in`);
    const form = page.locator("form", { has: page.getByRole("button", { name: "Sign in", exact: true }) });
    await form.getByLabel("E-mail address").fill("instructor@harrowgate.example");
    await form.getByLabel("Password").fill("not-the-password");
    await form.getByRole("button", { name: "Sign in", exact: true }).click();

    await form.getByText("That e-mail address and password do not match.").waitFor();
    expect(await form.getByLabel("E-mail address").inputValue()).toBe("instructor@harrowgate.example");
    expect(await form.getByLabel("Password").inputValue()).toBe("");

    // An address the browser lets through but the server refuses (no domain ending): the message stands at the field, tied to it for screen readers.
    await form.getByLabel("E-mail address").fill("instructor@harrowgate");
    await form.getByLabel("Password").fill(DEMO_PASSWORD);
    await form.getByRole("button", { name: "Sign in", exact: true }).click();
    const email = form.getByLabel("E-mail address");
    await expect.poll(() => email.getAttribute("aria-invalid")).toBe("true");
    const describedBy = (await email.getAttribute("aria-describedby")) ?? "";
    expect(await page.locator(`[id="${describedBy.split(" ").at(-1)}"]`).innerText()).toContain(
      "Enter the e-mail address your course uses",
    );
    expect(await email.inputValue()).toBe("instructor@harrowgate");

    await email.fill("instructor@harrowgate.example");
    await form.getByLabel("Password").fill(DEMO_PASSWORD);
    await form.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.getByText(demoCourse.title).first().waitFor();
  });
});
