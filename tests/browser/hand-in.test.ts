import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { labCohorts, labs } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

describe("handing in a drop log from a phone in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  let student: { email: string; course_id: string; cohort_id: string; sphere_label: string };
  let labId: string;
  let glycerolLotId: string;

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 390, height: 844 } });
    // A demo student whose kit at home holds a sphere, a column and a calibrated fluid lot.
    const found = await db.execute<typeof student>(sql`
      select u.email, m.course_id, m.cohort_id, min(s.label) as sphere_label
      from courses c
      join course_memberships m on m.course_id = c.id and m.role = 'student' and m.removed_at is null and m.cohort_id is not null
      join users u on u.id = m.user_id
      join kits k on k.holder_membership_id = m.id and k.state = 'at_home'
      join kit_parts ks on ks.kit_id = k.id join parts s on s.id = ks.part_id and s.kind = 'sphere' and s.diameter_mm is not null and s.mass_g is not null
      where c.code = ${demoCourse.code} and c.term = ${demoCourse.term}
        and exists (select 1 from kit_parts kc join parts p on p.id = kc.part_id where kc.kit_id = k.id and p.kind = 'column' and p.timed_distance_mm is not null)
        and exists (select 1 from kit_parts kf join parts p on p.id = kf.part_id where kf.kit_id = k.id and p.kind = 'fluid_lot' and jsonb_array_length(p.calibration) > 0)
      group by u.email, m.course_id, m.cohort_id
      order by u.email
      limit 1`);
    student = found.rows[0];
    expect(student, "the demo has a student with a complete kit at home").toBeDefined();
    // Demo kits hold both fluid lots, and this lab ticks none: the student has to say which bottle.
    const lot = await db.execute<{ id: string }>(
      sql`select id from parts where course_id = ${student.course_id} and kind = 'fluid_lot' and label = 'GLY-95A'`,
    );
    glycerolLotId = lot.rows[0].id;
    const day = 24 * 3600 * 1000;
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: student.course_id,
        title: "Browser test: drag on a sphere",
        kind: "drag",
        status: "published",
        instructions: "Release each sphere at the surface and time it between the two bands.",
        opensAt: new Date(Date.now() - day),
        dueAt: new Date(Date.now() + 3 * day),
        requiredDrops: 5,
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
        publishedAt: new Date(),
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: student.cohort_id });
    labId = lab.id;
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("a student types temperature and drops, sees the live preview, hands in and sees the stored version", async () => {
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${student.course_id}/labs`);
    await page.getByRole("link", { name: "Browser test: drag on a sphere" }).click();
    await page.getByRole("heading", { name: "Your drop log" }).waitFor();
    await expect(page.getByText("Release each sphere at the surface").isVisible()).resolves.toBe(true);

    await page.getByLabel("Fluid temperature").fill("21.5");
    // A column pasted from a stopwatch app lands in one row per time.
    const first = page.getByLabel("Drop 1 time in seconds");
    await first.focus();
    await page.evaluate(() => {
      const data = new DataTransfer();
      data.setData("text/plain", "4.12\n4.08\n4.15\n4.10");
      document.activeElement!.dispatchEvent(new ClipboardEvent("paste", { clipboardData: data, bubbles: true, cancelable: true }));
    });
    await page.getByLabel("Drop 4 time in seconds").waitFor();
    // A second column over typed drops asks first, with the focus on the question; Escape keeps the log.
    await page.getByLabel("Drop 4 time in seconds").focus();
    await page.evaluate(() => {
      const data = new DataTransfer();
      data.setData("text/plain", "9.1\n9.2");
      document.activeElement!.dispatchEvent(new ClipboardEvent("paste", { clipboardData: data, bubbles: true, cancelable: true }));
    });
    const question = page.getByRole("group", { name: /2 drop times from the clipboard, and the log already has 4 drops/ });
    await question.waitFor();
    await expect(page.evaluate(() => document.activeElement?.textContent)).resolves.toBe("Add after drop 4");
    await page.keyboard.press("Escape");
    await question.waitFor({ state: "detached" });
    await expect(page.getByLabel("Drop 5 time in seconds").count()).resolves.toBe(0);
    await expect(page.getByLabel("Drop 4 time in seconds").inputValue()).resolves.toBe("4.10");
    await page.getByRole("button", { name: "Add a drop" }).click();
    await page.getByLabel("Drop 5 time in seconds").fill("-4.11");
    await expect(page.getByText("A time cannot be negative.").isVisible()).resolves.toBe(true);
    await page.getByLabel("Drop 5 time in seconds").fill("4.11");

    const preview = page.getByRole("region", { name: /Preview/ });
    // Nothing is chosen for the student while the kit holds two lots this lab allows.
    await page.getByText(/Choose which fluid lot you used: GLY-95A, SYR-2B/).waitFor();
    await page.getByLabel("Fluid lot (bottle)").selectOption(glycerolLotId);
    await preview.getByText("Mean time").waitFor();
    // The mean of 4.12, 4.08, 4.15, 4.10, 4.11 is 4.112 s.
    await preview.getByText("4.112 s").waitFor();
    await expect(preview.getByText("Reynolds number").isVisible()).resolves.toBe(true);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    await page.getByRole("button", { name: "Hand in" }).click();
    await page.getByText(/Version 1 is handed in/).waitFor();
    const stored = page.getByRole("listitem", { name: "Version 1" });
    await stored.getByText("counts").waitFor();
    await expect(stored.locator("dd", { hasText: "4.112 s" }).isVisible()).resolves.toBe(true);
    await expect(stored.getByText(/drops 4\.12, 4\.08, 4\.15, 4\.1, 4\.11 s/).isVisible()).resolves.toBe(true);
    // The stored version's uncertainty budget is there, collapsed until the student opens it.
    const budgetTable = stored.getByRole("table", { name: /Uncertainty budget of/ });
    await expect(budgetTable.isVisible()).resolves.toBe(false);
    await stored.locator("summary", { hasText: "Uncertainty budget" }).click();
    await budgetTable.waitFor();
    await expect(budgetTable.getByRole("rowheader", { name: "Sphere diameter d" }).isVisible()).resolves.toBe(true);
    await expect(stored.getByRole("region", { name: "Parts used" }).isVisible()).resolves.toBe(true);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);

    const [version] = (
      await db.execute<{ version: number; n: number; fluid_lot_id: string }>(sql`
        select v.version, jsonb_array_length(v.input->'drops') as n, v.fluid_lot_id from drop_log_versions v join drop_logs d on d.id = v.drop_log_id where d.lab_id = ${labId}`)
    ).rows;
    expect(version).toEqual({ version: 1, n: 5, fluid_lot_id: glycerolLotId });
  });
});
