import { sql } from "drizzle-orm";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { buildDemoScenario, DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import {
  axeViolations,
  gotoHydrated,
  openBrowser,
  seriousOrCritical,
  signInWithPassword,
  signOut,
  type BrowserSession,
} from "../support/browser";

/**
 * A TA goes from their overview's "next to mark" to a student's marking view and on through the
 * hand-ins still to mark with Alt+N; the instructor scores one student's criteria there, keyboard
 * only. The demo's drag lab is used: its Wednesday TA has marked two thirds of their bench, its marking
 * is closed for TAs (so only the instructor changes marks), and no other suite marks in it. The one
 * mark given is taken away again at the end.
 */
describe("a student's marking view and next to mark, with the keyboard, in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  const demo = buildDemoScenario();
  const ta = demo.tas[1].email;
  let lab: { id: string; course_id: string };
  type Student = { id: string; name: string; has_mark: boolean; of_ta: boolean };
  /** The lab's students with a hand-in still to mark, in the desk's order (by name); `of_ta`: in the TA's cohorts. */
  let toMark: Student[];
  const after = (name: string, among: Student[]) => among[(among.findIndex((student) => student.name === name) + 1) % among.length].name;
  const taToMark = () => toMark.filter((student) => student.of_ta);
  const viewOf = (membershipId: string) => `${base}/courses/${lab.course_id}/labs/${lab.id}/marking/students/${membershipId}`;
  const heading = (page: Page) => page.locator("h1");
  const noSideScroll = (page: Page) => page.evaluate(() => document.documentElement.scrollWidth <= document.documentElement.clientWidth);

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1280, height: 800 } });
    lab = (
      await db.execute<typeof lab>(sql`
        select l.id, l.course_id from labs l join courses c on c.id = l.course_id
        where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'drag' and l.title not like 'Browser test%'
        order by l.created_at limit 1`)
    ).rows[0];
    // The desk's rule: a counted hand-in with no mark, a criterion scored by hand still empty, or a reopened mark.
    toMark = (
      await db.execute<(typeof toMark)[number]>(sql`
        select s.id, u.name, mk.id is not null as has_mark, s.cohort_id in (select a.cohort_id from ta_cohort_assignments a
          join course_memberships t on t.id = a.membership_id join users tu on tu.id = t.user_id
          where tu.email = ${ta} and t.course_id = ${lab.course_id}) as of_ta
        from drop_logs d
        join drop_log_versions v on v.id = d.latest_version_id
        join course_memberships s on s.id = d.membership_id and s.role = 'student' and s.removed_at is null
        join users u on u.id = s.user_id
        left join marks mk on mk.lab_id = d.lab_id and mk.membership_id = d.membership_id
        where d.lab_id = ${lab.id}
          and (mk.id is null or mk.reopened_at is not null or exists (select 1 from rubric_criteria rc
            where rc.lab_id = d.lab_id and rc.kind <> 'auto' and not (mk.scores ? rc.id::text)))
        order by u.name, s.id`)
    ).rows;
    expect(taToMark().length, "the Wednesday TA has at least three hand-ins of the drag lab to mark").toBeGreaterThanOrEqual(3);
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("opens a student's view from the overview, then the next ones to mark with Alt+N and its link", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, ta, DEMO_PASSWORD);
    await gotoHydrated(page, `${base}/courses/${lab.course_id}`);
    const list = page.getByRole("region", { name: "Next to mark" });
    const link = list.locator(`a[href*="/labs/${lab.id}/marking/students/"]`).first();
    await link.waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    const linkText = (await link.textContent())!;
    const first = linkText.slice(0, linkText.lastIndexOf(", "));
    expect(taToMark().map((student) => student.name)).toContain(first);

    // Keyboard only: the link, Enter; the student's view opens with their hand-in.
    await link.focus();
    await page.keyboard.press("Enter");
    await page.waitForURL(/\/marking\/students\//);
    await expect.poll(() => heading(page).textContent()).toBe(first);
    // The evidence first: the counted version's result with its uncertainty budget.
    await page.locator("summary", { hasText: "Uncertainty budget" }).first().waitFor();

    // Alt+N: the next student still to mark in the desk's order, wrapping round; the link does the same.
    await page.keyboard.press("Alt+N");
    await expect.poll(() => heading(page).textContent()).toBe(after(first, taToMark()));
    await page.getByRole("link", { name: /Next hand-in to mark/ }).click();
    await expect.poll(() => heading(page).textContent()).toBe(after(after(first, taToMark()), taToMark()));

    // Back to the desk, whose old ?student= addresses now open the view too.
    await page.getByRole("link", { name: "Back to the desk" }).click();
    await page.waitForURL(/\/marking$/);
    const student = taToMark().find((candidate) => candidate.name === first)!;
    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}/marking?student=${student.id}`);
    await expect.poll(() => heading(page).textContent()).toBe(first);
    expect(page.url()).toContain(`/marking/students/${student.id}`);
    await signOut(page, base);
    await page.close();
  });

  it("scores criteria with level keys and typed points, refuses an out-of-range keystroke at the field, and fits 1280 and 390 px", async () => {
    const target = toMark.find((student) => !student.has_mark);
    expect(target, "one of the lab's hand-ins to mark has no mark at all").toBeDefined();
    const page = await browser.context.newPage();
    try {
      await signInWithPassword(page, base, demo.instructor.email, DEMO_PASSWORD);
      await gotoHydrated(page, viewOf(target!.id));
      await expect.poll(() => heading(page).textContent()).toBe(target!.name);
      const setUp = page.getByRole("group", { name: "Set-up and photos" });
      const timing = page.getByRole("group", { name: "Timing technique" });
      const saved = page.getByRole("status").filter({ hasText: /^Saved$/ });

      // A level's number, while the criterion has the focus; 0 takes it away again.
      await setUp.getByRole("button").first().focus();
      await page.keyboard.press("2");
      await expect.poll(() => setUp.getByRole("button", { pressed: true }).textContent()).toContain("1 point");
      await saved.waitFor();
      await timing.getByRole("button").first().focus();
      await page.keyboard.press("4");
      await expect.poll(() => timing.getByRole("button", { pressed: true }).textContent()).toContain("3 points");
      await page.keyboard.press("0");
      await expect.poll(() => timing.getByRole("button", { pressed: true }).count()).toBe(0);
      await page.keyboard.press("3");
      await expect.poll(() => timing.getByRole("button", { pressed: true }).textContent()).toContain("2 points");
      // A key above the last level changes nothing.
      await page.keyboard.press("5");
      await expect.poll(() => timing.getByRole("button", { pressed: true }).textContent()).toContain("2 points");

      // Points: a 7 on a 0–4 criterion is not taken, and the field says why beside itself.
      const discussion = page.getByRole("textbox", { name: /Discussion of the drag coefficient/ });
      await discussion.focus();
      await page.keyboard.type("7");
      await expect.poll(() => discussion.inputValue()).toBe("");
      const why = page.locator(`[id="${await discussion.getAttribute("aria-describedby")}"]`);
      await expect.poll(() => why.textContent()).toBe("7 is not taken: give between 0 and 4 points.");
      await page.keyboard.type("3,5");
      await page.keyboard.press("Enter");
      // Kept, and shown back as the number saved.
      await expect.poll(() => discussion.inputValue()).toBe("3.5");
      await saved.waitFor();
      await expect
        .poll(
          async () =>
            (
              await db.execute<{ scores: Record<string, { points: number; level?: number }> }>(sql`
                select mk.scores from marks mk where mk.lab_id = ${lab.id} and mk.membership_id = ${target!.id}`)
            ).rows[0]?.scores,
        )
        .toSatisfy((scores) => {
          const values = Object.values(scores ?? {}) as { points: number; level?: number }[];
          return (
            values.some((score) => score.level === 2 && score.points === 1) &&
            values.some((score) => score.level === 3 && score.points === 2) &&
            values.some((score) => score.level === undefined && score.points === 3.5)
          );
        });

      // Someone else saves this mark meanwhile (its version moves on): the next change is refused as a
      // conflict, their mark is shown with who made it, and a change made again then saves.
      await db.execute(sql`update marks set version = version + 1, marked_by_id = (select id from users where email = ${ta})
        where lab_id = ${lab.id} and membership_id = ${target!.id}`);
      await setUp.getByRole("button").first().focus();
      await page.keyboard.press("3");
      await expect.poll(() => page.getByRole("status").filter({ hasText: "changed this mark meanwhile" }).count()).toBe(1);
      await expect.poll(() => setUp.getByRole("button", { pressed: true }).textContent()).toContain("1 point");
      await page.keyboard.press("3");
      await saved.waitFor();
      await expect.poll(() => setUp.getByRole("button", { pressed: true }).textContent()).toContain("2 points");

      expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
      expect(await noSideScroll(page)).toBe(true);
      await page.setViewportSize({ width: 390, height: 844 });
      await expect.poll(() => noSideScroll(page)).toBe(true);
      expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

      // Fully marked now, so Alt+N goes on to the next one after them.
      await page.keyboard.press("Alt+N");
      await expect.poll(() => heading(page).textContent()).toBe(after(target!.name, toMark));
      await signOut(page, base);
    } finally {
      await page.close();
      // The demo as it was: this student had no mark (its changes go with it).
      await db.execute(sql`delete from marks where lab_id = ${lab.id} and membership_id = ${target!.id}`);
    }
  });
});
