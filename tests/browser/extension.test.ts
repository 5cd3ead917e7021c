import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { instantToWallClock } from "~/lib/labs/wall-clock";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, signOut, type BrowserSession } from "../support/browser";

/**
 * Extensions in Chromium: the demo's student with a learning-support plan sees their own due time for
 * the drag lab, whose class deadline has passed, and hands in on time; the instructor ticks students on
 * a hand-in dashboard and gives them a later due time in one go.
 */
describe("extensions in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1280, height: 1000 } });
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("a student with their own extension sees their due time, not the class's, and hands in after the class deadline without being late", async () => {
    const found = await db.execute<{
      email: string;
      course_id: string;
      lab_id: string;
      lab_title: string;
      class_due: Date;
      own_due: Date;
      membership_id: string;
    }>(sql`
      select u.email, l.course_id, l.id as lab_id, l.title as lab_title, l.due_at as class_due, e.due_at as own_due, m.id as membership_id
      from lab_extensions e
      join labs l on l.id = e.lab_id and l.kind = 'drag'
      join courses c on c.id = l.course_id and c.code = ${demoCourse.code} and c.term = ${demoCourse.term}
      join course_memberships m on m.id = e.membership_id
      join users u on u.id = m.user_id
      limit 1`);
    const student = found.rows[0];
    expect(student, "the demo gives one drag-lab student their own extension").toBeDefined();
    const classDue = new Date(student.class_due).toISOString();
    const ownDue = new Date(student.own_due).toISOString();
    // The demo's point: the class deadline is behind us, the student's own ahead.
    expect(Date.parse(classDue)).toBeLessThan(Date.now());
    expect(Date.parse(ownDue)).toBeGreaterThan(Date.now());

    const page = await browser.context.newPage();
    await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
    // The instants the page shows, however each was written out.
    const shownInstants = async () =>
      (await page.locator("time").evaluateAll((times) => times.map((time) => time.getAttribute("dateTime") ?? ""))).map(Date.parse);
    await page.goto(`${base}/courses/${student.course_id}/labs`);
    await page.getByRole("link", { name: student.lab_title }).waitFor();
    expect(await shownInstants()).toContain(Date.parse(ownDue));
    expect(await shownInstants()).not.toContain(Date.parse(classDue));

    await page.getByRole("link", { name: student.lab_title }).click();
    await page.getByRole("heading", { name: "Your drop log" }).waitFor();
    expect(await shownInstants()).toContain(Date.parse(ownDue));
    expect(await shownInstants()).not.toContain(Date.parse(classDue));

    await page.getByLabel("Fluid temperature").fill("21.0");
    const first = page.getByLabel("Drop 1 time in seconds");
    await first.focus();
    await page.evaluate(() => {
      const data = new DataTransfer();
      data.setData("text/plain", ["2.41", "2.38", "2.44", "2.40", "2.39", "2.42", "2.43", "2.37", "2.41", "2.40"].join("\n"));
      document.activeElement!.dispatchEvent(new ClipboardEvent("paste", { clipboardData: data, bubbles: true, cancelable: true }));
    });
    await page.getByLabel("Drop 10 time in seconds").waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await page.getByRole("button", { name: "Hand in" }).click();
    const handedIn = page.getByText(/Version \d+ is handed in/);
    await handedIn.waitFor();
    expect(await handedIn.textContent()).not.toContain("(late)");

    const versions = await db.execute<{ late: boolean; submitted_at: Date }>(sql`
      select v.late, v.submitted_at from drop_log_versions v join drop_logs d on d.id = v.drop_log_id
      where d.lab_id = ${student.lab_id} and d.membership_id = ${student.membership_id}`);
    expect(versions.rows).toHaveLength(1);
    expect(new Date(versions.rows[0].submitted_at).getTime()).toBeGreaterThan(Date.parse(classDue));
    expect(versions.rows[0].late).toBe(false);
    await signOut(page, base);
    await page.close();
  });

  it("the instructor ticks two students on the hand-in dashboard and gives them a later due time in one go", async () => {
    const [lab] = (
      await db.execute<{ id: string; course_id: string; due_at: Date; time_zone: string }>(sql`
        select l.id, l.course_id, l.due_at, c.time_zone from labs l join courses c on c.id = l.course_id
        where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'viscometry'`)
    ).rows;
    const newDue = new Date(new Date(lab.due_at).getTime() + 2 * 86_400_000);
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, "instructor@harrowgate.example", DEMO_PASSWORD);
    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}/dashboard`);
    const rows = page
      .getByRole("table")
      .filter({ has: page.getByRole("columnheader", { name: "Key result" }) })
      .locator("tbody tr");
    // The last two rows: the Wednesday bench, sorted last by name, which the demo has not extended.
    const count = await rows.count();
    const names = await Promise.all(
      [count - 2, count - 1].map(async (index) => (await rows.nth(index).locator("th").textContent())!.trim()),
    );
    for (const name of names) await page.getByLabel(`Select ${name}`).check();

    const form = page.getByRole("region", { name: "Give the selected students a later due time" });
    await expect(form.getByText("2 selected.").isVisible()).resolves.toBe(true);
    await form.getByLabel("New due time").fill(instantToWallClock(newDue, lab.time_zone));
    await form.getByLabel("Reason").fill("Field trip clashed with the bench day");
    await form.getByRole("button", { name: "Give these 2 students the new due time" }).click();
    await form.getByText(/^2 students are now due/).waitFor();
    // The selection is cleared once the write is done.
    await expect(page.getByLabel(`Select ${names[0]}`).isChecked()).resolves.toBe(false);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    const stored = await db.execute<{ name: string; due_at: Date; reason: string }>(sql`
      select u.name, e.due_at, e.reason from lab_extensions e join course_memberships m on m.id = e.membership_id join users u on u.id = m.user_id
      where e.lab_id = ${lab.id} order by u.name`);
    expect(stored.rows.map((row) => row.name).sort()).toEqual([...names].sort());
    // The wall-clock field holds minutes: the stored due time is the new one to the minute.
    for (const row of stored.rows) expect(Math.floor(new Date(row.due_at).getTime() / 60_000)).toBe(Math.floor(newDue.getTime() / 60_000));

    await form.getByRole("link", { name: "See every extension" }).click();
    const table = page.getByRole("table", { name: /^Extensions of/ });
    await table.getByText("Field trip clashed with the bench day").first().waitFor();
    await expect(table.getByText("Whole cohort: Thursday bench").isVisible()).resolves.toBe(true);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await page.close();
  });
});
