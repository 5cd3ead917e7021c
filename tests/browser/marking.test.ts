import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import type { Page } from "playwright-core";
import {
  axeViolations,
  emailTo,
  gotoHydrated,
  openBrowser,
  seriousOrCritical,
  signInWithPassword,
  signOut,
  type BrowserSession,
} from "../support/browser";

/**
 * A TA marks one criterion across the class at the criterion-first desk with the keyboard, takes a
 * band of cards in one bulk action, and meets a conflict with a second page; the desk has no sideways
 * scroll on a laptop or a phone. The instructor then closes and releases the marking; a student reads
 * the released mark, and the e-mail saying so reaches the catcher. The demo's viscometry lab is used:
 * its rubric starts with a levels criterion and a 0–3 points one, and nothing of it is released.
 */
describe("marking at the desk in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  const ta = "gerhard.luettgen@staff.harrowgate.example";
  let lab: { id: string; course_id: string; first_criterion: string; range_criterion: string };

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 1280, height: 800 } });
    const found = await db.execute<typeof lab>(sql`
      select l.id, l.course_id, rc.id as first_criterion, rr.id as range_criterion
      from labs l join courses c on c.id = l.course_id
      join rubric_criteria rc on rc.lab_id = l.id and rc.position = 0 and rc.kind = 'levels'
      join rubric_criteria rr on rr.lab_id = l.id and rr.kind = 'range' and rr.min_points = 0 and rr.max_points = 3
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term} and l.kind = 'viscometry'`);
    lab = found.rows[0];
    expect(lab, "the demo's viscometry lab has a levels criterion first and a 0–3 points one").toBeDefined();
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  const levelOf = async (membershipId: string) =>
    (
      await db.execute<{ level: number | null; marked_by: string | null }>(sql`
        select (mk.scores -> ${lab.first_criterion} ->> 'level')::int as level, mb.email as marked_by
        from marks mk left join users mb on mb.id = mk.marked_by_id
        where mk.lab_id = ${lab.id} and mk.membership_id = ${membershipId}`)
    ).rows[0] ?? { level: null, marked_by: null };
  const deskUrl = (criterion: string) => `${base}/courses/${lab.course_id}/labs/${lab.id}/marking?criterion=${criterion}`;
  const noSidewaysScroll = (page: Page) =>
    page.evaluate(() => document.documentElement.scrollWidth <= document.documentElement.clientWidth);

  it("a TA scores cards with number keys, moves with j and the arrows, is told off a level that does not exist, and takes a band in one go", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, ta, DEMO_PASSWORD);
    await gotoHydrated(page, deskUrl(lab.first_criterion));
    const card = (index: number) => page.locator(`[data-card="${index}"]`);
    const idOf = async (index: number) => (await card(index).getAttribute("data-membership"))!;
    const [first, second] = [await idOf(0), await idOf(1)];
    expect(await page.locator('nav[aria-label="Criterion to mark"] a[aria-current="step"]').textContent()).toMatch(/^1Temperature control/);

    // Keyboard only: the first card, "2"; j to the next, "3"; an arrow back, and on again.
    await card(0).focus();
    await page.keyboard.press("2");
    await page.keyboard.press("j");
    await page.keyboard.press("3");
    await expect.poll(() => card(0).getByRole("status").textContent()).toBe("Saved");
    await expect.poll(() => card(1).getByRole("status").textContent()).toBe("Saved");
    expect(await levelOf(first)).toEqual({ level: 2, marked_by: ta });
    expect(await levelOf(second)).toEqual({ level: 3, marked_by: ta });
    await page.keyboard.press("ArrowUp");
    expect(await page.evaluate(() => document.activeElement?.getAttribute("data-card"))).toBe("0");
    await page.keyboard.press("ArrowDown");
    // Level 7 of three: explained on the card, in full, and nothing is sent.
    await page.keyboard.press("7");
    await expect.poll(() => card(1).getByRole("status").textContent()).toBe("There is no level 7: press 1 to 3, or 0 to clear.");
    expect(await card(1).getByRole("button", { name: "Retry" }).count()).toBe(0);
    expect(await levelOf(second)).toMatchObject({ level: 3 });
    expect(
      await card(1)
        .getByRole("button", { name: /^3: Level 3/, pressed: true })
        .count(),
    ).toBe(1);

    // The first band of cards, selected by its own button, takes level 1 in one bulk action.
    const band = page.locator("section[aria-labelledby^='band-']").first();
    await band.getByRole("button", { name: /^Select all \d+ cards? in this group$/ }).click();
    const bandIds = await band.locator("[data-card]").evaluateAll((cards) => cards.map((card) => card.getAttribute("data-membership")!));
    const bulk = page.getByRole("region", { name: "Change the selected students" });
    await expect.poll(() => bulk.textContent()).toMatch(/\d+ cards? selected/);
    // The README's picture of the desk: a band selected, the bulk change about to go.
    await page.screenshot({ path: "docs/marking-desk.png", fullPage: true });
    await bulk.getByLabel("Level").selectOption("1");
    await bulk.getByRole("button", { name: /^Apply to \d+ cards?$/ }).click();
    await expect.poll(() => bulk.getByRole("status").textContent()).toMatch(/^Done: \d+ marks? changed/);
    for (const id of bandIds) expect((await levelOf(id)).level, id).toBe(1);

    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    expect(await noSidewaysScroll(page)).toBe(true);

    // A 0–3 points criterion: 7 is refused at the keystroke, with the reason on the card.
    await gotoHydrated(page, deskUrl(lab.range_criterion));
    await card(0).focus();
    await page.keyboard.press("7");
    await expect.poll(() => card(0).getByRole("status").textContent()).toBe("7 is outside this criterion's 0–3 points: nothing was saved.");
    // Nothing of this criterion is scored yet: Alt+N goes on to the next card, and Space there selects it.
    await page.keyboard.press("Alt+KeyN");
    await expect.poll(() => page.evaluate(() => document.activeElement?.getAttribute("data-card"))).toBe("1");
    await page.keyboard.press(" ");
    expect(await card(1).getByRole("checkbox").isChecked()).toBe(true);

    // On a phone the desk stacks: no sideways scroll, also with the bulk bar and its long level names open.
    await page.setViewportSize({ width: 390, height: 844 });
    await page.goto(deskUrl(lab.first_criterion));
    await card(0).waitFor();
    expect(await noSidewaysScroll(page)).toBe(true);
    await card(0).getByRole("checkbox").check();
    await page.getByRole("region", { name: "Change the selected students" }).waitFor();
    expect(await noSidewaysScroll(page)).toBe(true);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await page.setViewportSize({ width: 1280, height: 800 });
    await page.close();
  });

  it("two pages save the same card: the second is told, shown the first one's level, and its change goes through when made again", async () => {
    const [one, two] = [await browser.context.newPage(), await browser.context.newPage()];
    await gotoHydrated(one, deskUrl(lab.first_criterion));
    await gotoHydrated(two, deskUrl(lab.first_criterion));
    // The last card: not in the band the first test changed, and the same student on both pages.
    const lastOf = (page: Page) => page.locator("[data-card]").last();
    const id = (await lastOf(one).getAttribute("data-membership"))!;
    expect(await lastOf(two).getAttribute("data-membership")).toBe(id);

    await lastOf(one).focus();
    await one.keyboard.press("1");
    await expect.poll(() => lastOf(one).getByRole("status").textContent()).toBe("Saved");
    // The second page still holds the version read before that save.
    await lastOf(two).focus();
    await two.keyboard.press("2");
    await expect.poll(() => lastOf(two).getByRole("status").textContent()).toMatch(/changed this mark meanwhile: theirs is shown/);
    expect(
      await lastOf(two)
        .getByRole("button", { name: /^1: Level 1/, pressed: true })
        .count(),
    ).toBe(1);
    expect(await levelOf(id)).toMatchObject({ level: 1 });
    // Resolved: made again from their version, the change is saved.
    await two.keyboard.press("2");
    await expect.poll(() => lastOf(two).getByRole("status").textContent()).toBe("Saved");
    expect(await levelOf(id)).toMatchObject({ level: 2 });
    await signOut(two, base);
    await one.close();
    await two.close();
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
