import { readFileSync } from "node:fs";
import { sql } from "drizzle-orm";
import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_DOMAIN, DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

/**
 * The instructor opens the term mark book, sorts it by the term total, filters it to one student and
 * downloads the export, which holds that student's released marks. Other suites may release more
 * marks of the demo meanwhile: every figure checked is read from the database at the time, and this
 * suite changes nothing but the audit trail.
 */
describe("the term mark book in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  let courseId: string;

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1400, height: 1000 } });
    const found = await db.execute<{ id: string }>(
      sql`select id from courses where code = ${demoCourse.code} and term = ${demoCourse.term}`,
    );
    courseId = found.rows[0].id;
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  /** The term total column's texts, top to bottom, as numbers (null for "—"). */
  const totalsShown = async (page: import("playwright-core").Page) => {
    const headers = await page.locator("thead th").allTextContents();
    const column = headers.findIndex((text) => text.startsWith("Term total"));
    const cells = await page.locator(`tbody tr td:nth-child(${column + 1})`).allTextContents();
    return cells.map((text) => (text.trim() === "—" ? null : Number.parseFloat(text)));
  };

  it("sorts by the term total, filters to one student and exports what is shown", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, `instructor@${DEMO_DOMAIN}`, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${courseId}`);
    await page.getByRole("navigation", { name: "Course" }).getByRole("link", { name: "Mark book" }).click();
    await expect.poll(() => page.getByRole("heading", { level: 1 }).textContent()).toBe("Mark book");
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    // Ascending first, then descending: the highest total on top, students without one last.
    await page.getByRole("link", { name: /^Term total, sort ascending/ }).click();
    await expect.poll(() => new URL(page.url()).searchParams.get("sort")).toBe("total");
    await page.getByRole("link", { name: /^Term total, sort descending/ }).click();
    await expect.poll(() => new URL(page.url()).searchParams.get("sort")).toBe("-total");
    const totals = await totalsShown(page);
    const numbers = totals.filter((total): total is number => total !== null);
    expect(numbers.length, "the demo has released marks").toBeGreaterThan(0);
    expect(numbers).toEqual([...numbers].sort((a, b) => b - a));
    expect(totals.slice(0, numbers.length)).toEqual(numbers);

    // A student with a released mark, as the database has it now.
    const [student] = (
      await db.execute<{ name: string; email: string; lab: string; percent: number }>(sql`
        select u.name, u.email, l.title as lab,
          100 * mk.total / (select sum(rc.max_points) from rubric_criteria rc where rc.lab_id = l.id) as percent
        from marks mk join labs l on l.id = mk.lab_id join course_memberships m on m.id = mk.membership_id join users u on u.id = m.user_id
        where l.course_id = ${courseId} and mk.released_at is not null
        order by u.email limit 1`)
    ).rows;
    await page.getByLabel("Name or e-mail contains").fill(student.email);
    await page.getByRole("button", { name: "Show" }).click();
    await expect.poll(() => page.locator("tbody tr").count()).toBe(1);
    expect(await page.locator("tbody tr").first().textContent()).toContain(student.name);
    expect(new URL(page.url()).searchParams.get("sort"), "the filter keeps the order").toBe("-total");

    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByRole("link", { name: "Export the mark book (CSV)" }).click(),
    ]);
    expect(download.suggestedFilename()).toMatch(/mark-book\.csv$/);
    const csv = readFileSync((await download.path())!, "utf8").replace(/^\uFEFF/, "");
    const { data } = Papa.parse<Record<string, string>>(csv, { header: true, skipEmptyLines: true });
    expect(new Set(data.map((row) => row.email))).toEqual(new Set([student.email]));
    const line = data.find((row) => row.lab === student.lab);
    expect(line?.standing).toBe("released");
    expect(Number(line?.percent)).toBeCloseTo(student.percent, 1);
    await page.close();
  });

  it("sorts and filters without JavaScript, through links and a GET form", async () => {
    const plain = await openBrowser({ viewport: { width: 1400, height: 1000 }, javaScriptEnabled: false });
    try {
      const page = await plain.context.newPage();
      await signInWithPassword(page, base, `instructor@${DEMO_DOMAIN}`, DEMO_PASSWORD);
      await page.goto(`${base}/courses/${courseId}/mark-book`);
      await page.getByRole("link", { name: /^Cohort, sort ascending/ }).click();
      await page.waitForURL(/sort=cohort/);
      const [first] = (
        await db.execute<{ email: string }>(sql`
          select u.email from course_memberships m join users u on u.id = m.user_id
          where m.course_id = ${courseId} and m.role = 'student' and m.removed_at is null order by u.email limit 1`)
      ).rows;
      await page.getByLabel("Name or e-mail contains").fill(first.email);
      await page.getByRole("button", { name: "Show" }).click();
      await page.waitForURL(/search=/);
      expect(new URL(page.url()).searchParams.get("sort"), "the form carries the order").toBe("cohort");
      expect(await page.locator("tbody tr").count()).toBe(1);
      expect(await page.locator("tbody tr").first().textContent()).toContain(first.email);
    } finally {
      await plain.close();
    }
  });
});
