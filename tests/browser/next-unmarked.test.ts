import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { buildDemoScenario, DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, signOut, type BrowserSession } from "../support/browser";

/**
 * A TA goes from their overview's "next to mark" to the desk and on through the hand-ins still to mark
 * with Alt+N, keyboard only. The demo's drag lab is used: its Wednesday TA has marked two thirds of
 * their bench, and no other suite marks in it. Nothing is saved.
 */
describe("next to mark, with the keyboard, in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  const ta = buildDemoScenario().tas[1].email;
  let lab: { id: string; course_id: string };
  /** The TA's students of the lab with a hand-in still to mark, in the desk's order (by name). */
  let toMark: string[];

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1400, height: 1000 } });
    lab = (
      await db.execute<typeof lab>(sql`
        select l.id, l.course_id from labs l join courses c on c.id = l.course_id
        where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'drag' and l.title not like 'Browser test%'
        order by l.created_at limit 1`)
    ).rows[0];
    // The desk's rule: a counted hand-in with no mark, a criterion scored by hand still empty, or a reopened mark.
    toMark = (
      await db.execute<{ name: string }>(sql`
        select u.name from drop_logs d
        join drop_log_versions v on v.id = d.latest_version_id
        join course_memberships s on s.id = d.membership_id and s.role = 'student' and s.removed_at is null
        join users u on u.id = s.user_id
        left join marks mk on mk.lab_id = d.lab_id and mk.membership_id = d.membership_id
        where d.lab_id = ${lab.id}
          and s.cohort_id in (select a.cohort_id from ta_cohort_assignments a join course_memberships t on t.id = a.membership_id
            join users tu on tu.id = t.user_id where tu.email = ${ta} and t.course_id = ${lab.course_id})
          and (mk.id is null or mk.reopened_at is not null or exists (select 1 from rubric_criteria rc
            where rc.lab_id = d.lab_id and rc.kind <> 'auto' and not (mk.scores ? rc.id::text)))
        order by u.name, s.id`)
    ).rows.map((row) => row.name);
    expect(toMark.length, "the Wednesday TA has at least three hand-ins of the drag lab to mark").toBeGreaterThanOrEqual(3);
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("opens a hand-in from the overview, then the next ones to mark with Alt+N, from the panel and from a cell", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, ta, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${lab.course_id}`);
    const list = page.getByRole("region", { name: "Next to mark" });
    const link = list.locator(`a[href*="/labs/${lab.id}/marking?student="]`).first();
    await link.waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    const linkText = (await link.textContent())!;
    const first = linkText.slice(0, linkText.lastIndexOf(", "));
    expect(toMark).toContain(first);

    // Keyboard only: the link, Enter; the desk opens with that student's hand-in beside the table.
    await link.focus();
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/marking\?student=/);
    const heading = page.locator("#panel-heading");
    await expect.poll(() => heading.textContent()).toBe(first);

    // Alt+N from the open panel: the next student still to mark in the desk's order, wrapping round.
    const after = (name: string) => toMark[(toMark.indexOf(name) + 1) % toMark.length];
    await page.keyboard.press("Alt+N");
    await expect.poll(() => heading.textContent()).toBe(after(first));
    await page.keyboard.press("Alt+N");
    await expect.poll(() => heading.textContent()).toBe(after(after(first)));

    // Escape closes the panel and puts the focus back on the student's row; Alt+N from that cell goes on from there.
    const current = (await heading.textContent())!;
    await page.keyboard.press("Escape");
    await heading.waitFor({ state: "detached" });
    await expect(
      page.evaluate(() => document.activeElement?.closest("tr")?.querySelector('[data-col="1"]')?.textContent?.trim()),
    ).resolves.toBe(current);
    await page.keyboard.press("Alt+N");
    await expect.poll(() => heading.textContent()).toBe(after(current));
    await expect(page.getByText("Alt+N, from anywhere on the desk, opens the next hand-in still to mark").isVisible()).resolves.toBe(true);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await signOut(page, base);
    await page.close();
  });
});
