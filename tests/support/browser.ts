/**
 * Real Chromium for the browser suite, through playwright-core and Debian's build. Every test file
 * opens its own profile in a fresh temporary folder and closes it afterwards.
 */
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { createRequire } from "node:module";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";
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

export async function openBrowser(options: { viewport?: { width: number; height: number } } = {}): Promise<BrowserSession> {
  const profile = mkdtempSync(join(tmpdir(), "benchpost-chromium-"));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM_PATH,
    args: chromiumFlags,
    viewport: options.viewport ?? { width: 1280, height: 800 },
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
