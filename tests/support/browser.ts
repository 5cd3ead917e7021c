/**
 * Real Chromium for the browser suite, through playwright-core and Debian's build. Every test file
 * opens its own profile in a fresh temporary folder and closes it afterwards.
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
import { expect } from "vitest";
import { CHROMIUM_PATH } from "../../scripts/lib/chromium";

// Without the background-networking flags Chromium keeps dialling out, which this closed network refuses.
const chromiumFlags = [
  "--headless",
  "--no-sandbox",
  "--disable-gpu",
  "--disable-quic",
  "--no-first-run",
  "--disable-background-networking",
  "--disable-component-update",
  "--disable-sync",
];

export type BrowserSession = { context: BrowserContext; close: () => Promise<void> };

/** `javaScriptEnabled: false` serves the pages as a browser with scripts off: plain forms and links only. */
export async function openBrowser(
  options: { viewport?: { width: number; height: number }; javaScriptEnabled?: boolean } = {},
): Promise<BrowserSession> {
  const profile = mkdtempSync(join(tmpdir(), "benchpost-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    args: chromiumFlags,
    viewport: options.viewport ?? { width: 1280, height: 800 },
    javaScriptEnabled: options.javaScriptEnabled ?? true,
  });
  return {
    context,
    close: async () => {
      await context.close();
      rmSync(profile, { recursive: true, force: true });
    },
  };
}

export type AxeViolation = { id: string; impact: string | null; help: string; nodes: { target: string[] }[] };

/** Runs axe-core in the page (injected from the package: @axe-core/playwright needs a newer Node). */
export async function axeViolations(page: Page): Promise<AxeViolation[]> {
  const axePath = createRequire(import.meta.url).resolve("axe-core/axe.min.js");
  // Evaluated through the DevTools protocol rather than added as a <script>: the app's CSP refuses inline scripts.
  await page.evaluate(readFileSync(axePath, "utf8"));
  return page.evaluate(async () => {
    const axe = (window as unknown as { axe: { run: (context: Document) => Promise<{ violations: AxeViolation[] }> } }).axe;
    const result = await axe.run(document);
    return result.violations.map(({ id, impact, help, nodes }) => ({ id, impact, help, nodes: nodes.map((n) => ({ target: n.target })) }));
  });
}

export function seriousOrCritical(violations: AxeViolation[]): AxeViolation[] {
  return violations.filter((violation) => violation.impact === "serious" || violation.impact === "critical");
}

/**
 * Opens `url` and waits until React has hydrated the page: a key pressed before that reaches no
 * handler (React does not replay it), so keyboard tests start here. Returns the response's status.
 */
export async function gotoHydrated(page: Page, url: string): Promise<number> {
  const response = await page.goto(url);
  // Polled through evaluate: waitForFunction compiles its predicate in the page, which the app's CSP refuses.
  await expect
    .poll(() => page.evaluate(() => Object.keys(document).some((key) => key.startsWith("__reactContainer"))), {
      message: `${url} hydrates`,
    })
    .toBe(true);
  return response?.status() ?? 0;
}

/** Signs in through the sign-in page with a password, as a person would. */
export async function signInWithPassword(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`);
  const form = page.locator("form", { has: page.getByRole("button", { name: "Sign in", exact: true }) });
  await form.getByLabel("E-mail address").fill(email);
  await form.getByLabel("Password").fill(password);
  await Promise.all([
    page.waitForURL((url) => !url.pathname.startsWith("/sign-in")),
    form.getByRole("button", { name: "Sign in", exact: true }).click(),
  ]);
}

/** Signs out on this device, so that the next sign-in can be someone else. */
export async function signOut(page: Page, baseUrl: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-out`);
  await page.getByRole("button", { name: "Sign out on this device" }).click();
  await page.getByRole("heading", { level: 1, name: /Lab courses/ }).waitFor();
}

/** Waits for the worker to hand a message to the local mail catcher, and returns the newest one's subject and links. */
export async function emailTo(baseUrl: string, to: string, subject?: RegExp): Promise<{ subject: string; links: string[] }> {
  for (let tries = 0; tries < 80; tries++) {
    const response = await fetch(`${baseUrl}/api/dev/emails?to=${encodeURIComponent(to)}`);
    const { emails } = (await response.json()) as { emails: { subject: string; links: string[] }[] };
    const match = emails.find((email) => !subject || subject.test(email.subject));
    if (match) return match;
    await new Promise((resolve) => setTimeout(resolve, 250));
  }
  throw new Error(`No e-mail${subject ? ` matching ${subject}` : ""} reached the catcher for ${to}`);
}
