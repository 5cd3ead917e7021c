import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import {
  axeViolations,
  emailTo,
  openBrowser,
  seriousOrCritical,
  signInWithPassword,
  signOut,
  type BrowserSession,
} from "../support/browser";

/**
 * A TA marks at the desk with the keyboard and a bulk action; the instructor closes and releases the
 * marking; a student then reads the released mark, and the e-mail saying so reaches the catcher.
 * The demo's viscometry lab is used: it has a rubric whose first criterion is scored by levels and
 * nothing of it is released.
 */
describe("marking at the desk in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  const ta = "gerhard.luettgen@staff.harrowgate.example";
  let lab: { id: string; course_id: string; first_criterion: string; levels: { points: number }[] };

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1400, height: 1000 } });
    const found = await db.execute<typeof lab>(sql`
      select l.id, l.course_id, rc.id as first_criterion, rc.levels
      from labs l join courses c on c.id = l.course_id
      join rubric_criteria rc on rc.lab_id = l.id and rc.position = 0 and rc.kind = 'levels'
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'viscometry'`);
    lab = found.rows[0];
    expect(lab, "the demo's viscometry lab has a levels criterion first").toBeDefined();
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  const levelsOf = async () =>
    (
      await db.execute<{ name: string; level: number | null; marked_by: string | null }>(sql`
        select u.name, (mk.scores -> ${lab.first_criterion} ->> 'level')::int as level, mb.email as marked_by
        from marks mk join course_memberships m on m.id = mk.membership_id join users u on u.id = m.user_id left join users mb on mb.id = mk.marked_by_id
        where mk.lab_id = ${lab.id}`)
    ).rows;

  it("a TA sets levels with number keys, moves with the arrows, and applies one level to three selected rows", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, ta, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}/marking`);
    const rows = page.locator("tbody tr");
    const nameOf = async (index: number) => (await rows.nth(index).locator('[data-col="1"]').textContent())!.trim();
    const [first, second] = [await nameOf(0), await nameOf(1)];

    // Keyboard only: the first student's name, right to the first criterion, "2"; down a row, "3".
    await page.locator('[data-row="0"][data-col="1"]').focus();
    await page.keyboard.press("ArrowRight");
    await page.keyboard.press("2");
    await page.keyboard.press("ArrowDown");
    await page.keyboard.press("3");
    await expect.poll(() => rows.nth(0).getByRole("status").textContent()).toBe("Saved");
    await expect.poll(() => rows.nth(1).getByRole("status").textContent()).toBe("Saved");
    const afterKeys = await levelsOf();
    expect(afterKeys.find((row) => row.name === first)).toMatchObject({ level: 2, marked_by: ta });
    expect(afterKeys.find((row) => row.name === second)).toMatchObject({ level: 3, marked_by: ta });
    // The total shown was computed in the browser before the server answered, and agrees with it.
    await expect.poll(() => rows.nth(1).locator("td").nth(-2).textContent()).toMatch(new RegExp(`^\\d+(\\.\\d+)? / \\d+`));

    // Space selects rows from any cell; one bulk action gives the three of them level 1.
    for (const index of [2, 3, 4]) {
      await page.locator(`[data-row="${index}"][data-col="1"]`).focus();
      await page.keyboard.press(" ");
    }
    const bulk = page.getByRole("region", { name: "Change the selected students" });
    await expect.poll(() => bulk.textContent()).toContain("3 selected");
    await bulk.getByLabel("Level").selectOption("1");
    await bulk.getByRole("button", { name: "Apply to 3" }).click();
    await expect.poll(() => bulk.getByRole("status").textContent()).toMatch(/^Done: 3 marks changed/);
    const bulkNames = await Promise.all([2, 3, 4].map(nameOf));
    const afterBulk = await levelsOf();
    for (const name of bulkNames) expect(afterBulk.find((row) => row.name === name)?.level).toBe(1);

    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await signOut(page, base);
    await page.close();
  });

  it("the instructor closes and releases the marking; a student reads their mark and is e-mailed once", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, "instructor@harrowgate.example", DEMO_PASSWORD);
    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}/moderation`);
    await page.getByRole("button", { name: "Close the marking to TAs" }).click();
    await page.getByText("Marking is closed to TAs").waitFor();
    // The lab still takes hand-ins and the marks are partial: release asks whom, and to confirm.
    const release = page.getByRole("form", { name: "Release the marks" });
    await expect.poll(() => release.getByRole("button").textContent()).toBe("Choose whom to release");
    await release.getByLabel(/Every marked student/).check();
    await release.getByLabel("Release anyway, while hand-ins are still possible").check();
    await release.getByRole("button", { name: /^Release \d+ marks? and e-mail their students$/ }).click();
    await page.getByText(/^Released \d+ marks/).waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await signOut(page, base);

    const [student] = (
      await db.execute<{ email: string; total: number }>(sql`
        select u.email, mk.total from marks mk join course_memberships m on m.id = mk.membership_id join users u on u.id = m.user_id
        join users mb on mb.id = mk.marked_by_id
        where mk.lab_id = ${lab.id} and mk.released_at is not null and mb.email = ${ta} order by u.email limit 1`)
    ).rows;
    const email = await emailTo(base, student.email, /^Your mark for Falling-ball viscometry .* is ready$/);
    expect(email.links.some((link) => link.includes(`/labs/${lab.id}`))).toBe(true);
    const inbox = (await (await fetch(`${base}/api/dev/emails?to=${encodeURIComponent(student.email)}`)).json()) as {
      emails: { subject: string }[];
    };
    expect(inbox.emails.filter((message) => message.subject === email.subject)).toHaveLength(1);

    await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}`);
    const mark = page.getByRole("region", { name: /^Your mark:/ });
    await expect
      .poll(() => mark.getByRole("heading", { level: 2 }).textContent())
      .toMatch(new RegExp(`^Your mark: ${student.total} / \\d+`));
    expect(await mark.getByRole("table").textContent()).toContain("Level ");
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await page.close();
  });
});
