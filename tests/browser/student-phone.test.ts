import { randomUUID } from "node:crypto";
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { labCohorts, labExtensions, labs } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, emailTo, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

/**
 * A student on a 390×844 phone: the overview says what is due with their own (extended) due time, they
 * hand in from there, see the receipt on the lab page and get it by e-mail. The suite adds its own lab
 * and extension to the demo and changes nothing else.
 */
describe("a student's overview and receipt on a phone in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  let student: { email: string; course_id: string; cohort_id: string; membership_id: string; time_zone: string };
  // Its own title each run: the catcher keeps earlier runs' receipts.
  const title = `Phone hand-in ${randomUUID().slice(0, 8)}`;
  let labId: string;
  let lotId: string;

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 390, height: 844 } });
    // A demo student whose kit at home holds a measured sphere, a column and a calibrated fluid lot.
    const found = await db.execute<typeof student>(sql`
      select u.email, m.course_id, m.cohort_id, m.id as membership_id, c.time_zone
      from courses c
      join course_memberships m on m.course_id = c.id and m.role = 'student' and m.removed_at is null and m.cohort_id is not null
      join users u on u.id = m.user_id
      join kits k on k.holder_membership_id = m.id and k.state = 'at_home'
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term}
        and exists (select 1 from kit_parts ks join parts p on p.id = ks.part_id where ks.kit_id = k.id and p.kind = 'sphere' and p.diameter_mm is not null and p.mass_g is not null)
        and exists (select 1 from kit_parts kc join parts p on p.id = kc.part_id where kc.kit_id = k.id and p.kind = 'column' and p.timed_distance_mm is not null)
        and exists (select 1 from kit_parts kf join parts p on p.id = kf.part_id where kf.kit_id = k.id and p.kind = 'fluid_lot' and jsonb_array_length(p.calibration) > 0)
      order by u.email desc
      limit 1`);
    student = found.rows[0];
    expect(student, "the demo has a student with a complete kit at home").toBeDefined();
    const lot = await db.execute<{ id: string }>(
      sql`select id from parts where course_id = ${student.course_id} and kind = 'fluid_lot' and label = 'GLY-95A'`,
    );
    lotId = lot.rows[0].id;
    const day = 24 * 3600 * 1000;
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: student.course_id,
        title,
        kind: "drag",
        status: "published",
        opensAt: new Date(Date.now() - day),
        dueAt: new Date(Date.now() + 2 * day),
        requiredDrops: 5,
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
        publishedAt: new Date(),
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: student.cohort_id });
    // Their own extension: two days beyond the class, on the hour so that its text is known.
    const extended = new Date(Math.ceil((Date.now() + 4 * day) / 3600_000) * 3600_000);
    await db.insert(labExtensions).values({ labId: lab.id, membershipId: student.membership_id, dueAt: extended, reason: "Phone test" });
    labId = lab.id;
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("sees what is due with their own due time, hands in, sees the receipt and gets it by e-mail", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${student.course_id}`);
    const labs = page.getByRole("region", { name: "Your labs" });
    const item = labs.getByRole("listitem").filter({ has: page.getByRole("link", { name: title }) });
    await item.waitFor();
    await expect(item.getByText("Your extension").isVisible()).resolves.toBe(true);
    await expect(item.getByText("Not handed in").isVisible()).resolves.toBe(true);
    // The due time shown is the extension's, in the course's zone, named.
    const [{ due_text: dueText, due_ms: dueMs }] = (
      await db.execute<{ due_text: string; due_ms: number }>(sql`
        select to_char(due_at at time zone ${student.time_zone}, 'HH24:MI') as due_text, (extract(epoch from due_at) * 1000)::float8 as due_ms
        from lab_extensions where lab_id = ${labId}`)
    ).rows;
    const zoneName = new Intl.DateTimeFormat("en-GB", { timeZone: student.time_zone, timeZoneName: "short" })
      .formatToParts(new Date(dueMs))
      .find((part) => part.type === "timeZoneName")!.value;
    await expect(item.locator("time").first().textContent()).resolves.toMatch(new RegExp(`, ${dueText} ${zoneName.replace("+", "\\+")}$`));
    // Phone-first: nothing is wider than the screen.
    await expect(page.evaluate(() => document.documentElement.scrollWidth)).resolves.toBeLessThanOrEqual(390);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    await item.getByRole("link", { name: title }).click();
    await page.getByRole("heading", { name: "Your drop log" }).waitFor();
    await page.getByLabel("Fluid temperature").fill("21.5");
    await page.getByLabel("Fluid lot (bottle)").selectOption(lotId);
    const times = ["4.12", "4.08", "4.15", "4.10", "4.11"];
    for (const [index, time] of times.entries()) {
      if (index > 0 && (await page.getByLabel(`Drop ${index + 1} time in seconds`).count()) === 0)
        await page.getByRole("button", { name: "Add a drop" }).click();
      await page.getByLabel(`Drop ${index + 1} time in seconds`).fill(time);
    }
    await page
      .getByRole("region", { name: /Preview/ })
      .getByText("4.112 s")
      .waitFor();
    await page.getByRole("button", { name: "Hand in" }).click();
    await page.getByText(/Version 1 is handed in/).waitFor();
    const receipt = page.getByRole("region", { name: "Receipt" });
    await receipt.waitFor();
    await expect(receipt.textContent()).resolves.toMatch(
      // To the second, the zone named by its short name (GMT, IST, CET, GMT-5…).
      /Version 1 handed in on .+ \d{2}:\d{2}:\d{2} (?:[A-Z]{3,4}|GMT[+-][\d:]+), on time\./,
    );
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    const email = await emailTo(base, student.email, new RegExp(`^Receipt: ${title}, version 1 handed in$`));
    expect(email.links.some((link) => link.endsWith(`/courses/${student.course_id}/labs/${labId}#receipt`))).toBe(true);

    // Back on the overview the lab says it is handed in, with its version, and the receipt is a tap away.
    await page.goto(`${base}/courses/${student.course_id}`);
    const after = page
      .getByRole("region", { name: "Your labs" })
      .getByRole("listitem")
      .filter({ has: page.getByRole("link", { name: title }) });
    await expect(after.textContent()).resolves.toMatch(/Handed in · version 1/);
    await after.getByRole("link", { name: "Receipt" }).click();
    await page.waitForURL(/#receipt$/);
    await page.getByRole("region", { name: "Receipt" }).waitFor();
    await page.close();
  });
});
