import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { openBrowser, signInWithPassword, type BrowserSession } from "../support/browser";

/**
 * The instructor re-measures the demo's glycerol lot (already corrected once by the demo), watches the
 * re-reduction's progress on the part's page (the worker beside the server runs the job), and finds
 * the drag lab's desk flagging the results that changed since they were marked.
 */
describe("re-reduction after a part correction in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  // `demo_run` is what the demo's own correction recomputed; `versions` is every hand-in on the lot now,
  // which includes any that other browser tests made since the seed.
  let target: { course_id: string; lot_id: string; lab_id: string; versions: number; demo_run: number };

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1400, height: 1000 } });
    const found = await db.execute<typeof target>(sql`
      select c.id as course_id, p.id as lot_id, l.id as lab_id,
        (select count(*)::int from drop_log_versions v where v.fluid_lot_id = p.id) as versions,
        (select r.total from rereduction_runs r where r.part_id = p.id order by r.created_at limit 1) as demo_run
      from courses c join parts p on p.course_id = c.id and p.label = 'GLY-95A'
      join labs l on l.course_id = c.id and l.kind = 'drag'
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term}`);
    target = found.rows[0];
    expect(target.demo_run, "the demo's drag hand-ins used GLY-95A").toBeGreaterThan(10);
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("re-measures the lot, shows N of M recomputed, and the desk flags the changed results", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, "instructor@harrowgate.example", DEMO_PASSWORD);
    await page.goto(`${base}/courses/${target.course_id}/parts/${target.lot_id}`);
    // The demo's own correction is listed, finished.
    await expect
      .poll(() => page.getByTestId("rereduction-progress").first().textContent())
      .toContain(`${target.demo_run} of ${target.demo_run} hand-ins recomputed`);

    await page.getByText("Re-measure", { exact: true }).click();
    await page.locator("input[name=densityKgM3]").fill("1251");
    await page.getByRole("button", { name: "Save the new measurements" }).click();
    await page.waitForURL(/saved=remeasured/);
    const progress = page.getByTestId("rereduction-progress");
    await expect.poll(() => progress.count()).toBe(2);
    // The page refreshes itself until the worker has recomputed every version.
    await expect
      .poll(() => progress.first().textContent(), { timeout: 30_000 })
      .toMatch(new RegExp(`${target.versions} of ${target.versions} hand-ins recomputed — finished`));
    const revisions = await db.execute<{ n: number }>(sql`
      select count(*)::int as n from reduction_revisions r join drop_log_versions v on v.id = r.version_id
      where v.fluid_lot_id = ${target.lot_id} and r.cause ->> 'partLabel' = 'GLY-95A' and r.cause #>> '{changes,densityKgM3,to}' = '1251'`);
    expect(revisions.rows[0].n).toBe(target.versions);

    await page.goto(`${base}/courses/${target.course_id}/labs/${target.lab_id}/marking`);
    const flags = page.getByTestId("result-changed");
    await expect.poll(() => flags.count()).toBeGreaterThan(0);
    const [, before, after] = /result changed since it was marked: ([\d.]+) → ([\d.]+) × ref/.exec((await flags.first().textContent())!)!;
    // The demo's lot was recorded 20 % less viscous than its fluid: marked figures sat well above 1, revised ones near it.
    expect(Number(before)).toBeGreaterThan(1.1);
    expect(Math.abs(Number(after) - 1)).toBeLessThan(0.1);
  });
});
