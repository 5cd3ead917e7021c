/**
 * The forms are plain HTML forms: with scripts off, Chromium posts them and the server's answer puts
 * each error at its field, keeps what was typed (never the password) and carries on when it is right.
 */
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { labCohorts, labs } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { openBrowser, signInWithPassword, signOut, type BrowserSession } from "../support/browser";

describe("forms without JavaScript", () => {
  let browser: BrowserSession;
  const base = inject("baseUrl");
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  beforeAll(async () => {
    browser = await openBrowser({ javaScriptEnabled: false });
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("signs in: a wrong password is refused above the form with the e-mail kept, the right one signs in", async () => {
    const page = await browser.context.newPage();
    await page.goto(`${base}/sign-in`);
    const form = page.locator("form", { has: page.getByRole("button", { name: "Sign in", exact: true }) });
    await form.getByLabel("E-mail address").fill("instructor@harrowgate.example");
    await form.getByLabel("Password").fill("not-the-password");
    await form.getByRole("button", { name: "Sign in", exact: true }).click();

    await form.getByText("That e-mail address and password do not match.").waitFor();
    expect(await form.getByLabel("E-mail address").inputValue()).toBe("instructor@harrowgate.example");
    expect(await form.getByLabel("Password").inputValue()).toBe("");

    // An address the browser lets through but the server refuses (no domain ending): the message stands at the field, tied to it for screen readers.
    await form.getByLabel("E-mail address").fill("instructor@harrowgate");
    await form.getByLabel("Password").fill(DEMO_PASSWORD);
    await form.getByRole("button", { name: "Sign in", exact: true }).click();
    const email = form.getByLabel("E-mail address");
    await expect.poll(() => email.getAttribute("aria-invalid")).toBe("true");
    const describedBy = (await email.getAttribute("aria-describedby")) ?? "";
    expect(await page.locator(`[id="${describedBy.split(" ").at(-1)}"]`).innerText()).toContain(
      "Enter the e-mail address your course uses",
    );
    expect(await email.inputValue()).toBe("instructor@harrowgate");

    await email.fill("instructor@harrowgate.example");
    await form.getByLabel("Password").fill(DEMO_PASSWORD);
    await form.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.getByText(demoCourse.title).first().waitFor();
  });

  it("lab settings and the rubric: a refused form keeps what was typed with the error at its field, and a criterion is added by its button", async () => {
    // A lab of its own, with no rubric yet: what other suites did to the demo's labs (a released mark) does not matter here.
    const [course] = (
      await db.execute<{ id: string }>(sql`select id from courses where code = ${demoCourse.code} and term = ${demoCourse.term}`)
    ).rows;
    const day = 24 * 3600 * 1000;
    const [created] = await db
      .insert(labs)
      .values({
        courseId: course.id,
        title: "Browser test: a rubric without scripts",
        kind: "drag",
        opensAt: new Date(Date.now() + day),
        dueAt: new Date(Date.now() + 8 * day),
        requiredDrops: 5,
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
      })
      .returning();
    const lab = { id: created.id, course_id: course.id, criteria: 0 };
    const page = await browser.context.newPage();
    // Signed in as the instructor by the test above (the browser context keeps the session).
    await page.goto(`${base}/courses/${lab.course_id}/labs/new`);
    await page.getByLabel("Title").fill("Settling in castor oil");
    await page.getByLabel("Opens").fill("2027-03-10T09:00");
    await page.getByLabel("Due", { exact: true }).fill("2027-03-09T09:00");
    await page.getByRole("button", { name: "Save the draft" }).click();
    await page.getByText("The due time must come after the opening time.").waitFor();
    expect(await page.getByLabel("Title").inputValue()).toBe("Settling in castor oil");
    expect(await page.getByLabel("Due", { exact: true }).getAttribute("aria-invalid")).toBe("true");

    await page.goto(`${base}/courses/${lab.course_id}/labs/${lab.id}/rubric`);
    await page.getByRole("button", { name: "Add a points criterion" }).click();
    const added = page.getByLabel(`Criterion ${lab.criteria + 1}`, { exact: true });
    await added.waitFor();
    await added.fill("Discussion of the wall effect");
    await page.getByRole("button", { name: "Save the rubric", exact: true }).last().click();
    await page.getByText("Some criteria need correcting").waitFor();
    // The new criterion's most points are left empty: the message stands there, and the title typed stays.
    const mostPoints = page.getByLabel("Most points").last();
    expect(await mostPoints.getAttribute("aria-invalid")).toBe("true");
    expect(await page.getByLabel(`Criterion ${lab.criteria + 1}`, { exact: true }).inputValue()).toBe("Discussion of the wall effect");
    const stored = await db.execute<{ n: number }>(sql`select count(*)::int as n from rubric_criteria where lab_id = ${lab.id}`);
    expect(stored.rows[0].n).toBe(lab.criteria);
    await page.close();
  });

  it("hands in a drop log: rows added by the form's own button, a bad time refused at its row with the log kept, then version 1", async () => {
    // A demo student with a complete kit at home (the last by e-mail: the other browser suites take the first), and a lab for their cohort.
    const [student] = (
      await db.execute<{ email: string; course_id: string; cohort_id: string }>(sql`
        select u.email, m.course_id, m.cohort_id
        from courses c
        join course_memberships m on m.course_id = c.id and m.role = 'student' and m.removed_at is null and m.cohort_id is not null
        join users u on u.id = m.user_id
        join kits k on k.holder_membership_id = m.id and k.state = 'at_home'
        where c.code = ${demoCourse.code} and c.term = ${demoCourse.term}
          and exists (select 1 from kit_parts ks join parts p on p.id = ks.part_id where ks.kit_id = k.id and p.kind = 'sphere' and p.diameter_mm is not null and p.mass_g is not null)
          and exists (select 1 from kit_parts kc join parts p on p.id = kc.part_id where kc.kit_id = k.id and p.kind = 'column' and p.timed_distance_mm is not null)
          and exists (select 1 from kit_parts kf join parts p on p.id = kf.part_id where kf.kit_id = k.id and p.kind = 'fluid_lot' and jsonb_array_length(p.calibration) > 0)
        order by u.email desc
        limit 1`)
    ).rows;
    const day = 24 * 3600 * 1000;
    const [lab] = await db
      .insert(labs)
      .values({
        courseId: student.course_id,
        title: "Browser test: a hand-in without scripts",
        kind: "drag",
        status: "published",
        opensAt: new Date(Date.now() - day),
        dueAt: new Date(Date.now() + 3 * day),
        requiredDrops: 3,
        resolutions: { diameterMm: 0.01, massG: 0.001, distanceMm: 1, timeS: 0.01, temperatureC: 0.1 },
        publishedAt: new Date(),
      })
      .returning();
    await db.insert(labCohorts).values({ labId: lab.id, cohortId: student.cohort_id });

    const page = await browser.context.newPage();
    // The tests above left the instructor signed in in this browser.
    await signOut(page, base);
    await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${student.course_id}/labs/${lab.id}`);
    const [lot] = (
      await db.execute<{ id: string }>(
        sql`select id from parts where course_id = ${student.course_id} and kind = 'fluid_lot' and label = 'GLY-95A'`,
      )
    ).rows;
    await page.getByLabel("Fluid lot (bottle)").selectOption(lot.id);
    await page.getByLabel("Fluid temperature").fill("21,5");
    await page.getByLabel("Drop 1 time in seconds").fill("4.12");
    // Each row button posts the form; the server keeps the log as a draft with the row added.
    await page.getByRole("button", { name: "Add a drop" }).click();
    await page.getByLabel("Drop 2 time in seconds").fill("-4.08");
    await page.getByRole("button", { name: "Add a drop" }).click();
    await page.getByLabel("Drop 3 time in seconds").fill("4.15");
    expect(await page.getByLabel("Fluid temperature").inputValue()).toBe("21,5");

    await page.getByRole("button", { name: "Hand in" }).click();
    const refusedRow = page.getByLabel("Drop 2 time in seconds");
    await expect.poll(() => refusedRow.getAttribute("aria-invalid")).toBe("true");
    const describedBy = (await refusedRow.getAttribute("aria-describedby")) ?? "";
    expect(await page.locator(`[id="${describedBy}"]`).innerText()).toBe("A time cannot be negative.");
    expect(await refusedRow.inputValue()).toBe("-4.08");
    expect(await page.getByLabel("Drop 3 time in seconds").inputValue()).toBe("4.15");
    expect(await page.getByLabel("Fluid temperature").inputValue()).toBe("21,5");

    await refusedRow.fill("4.08");
    await page.getByRole("button", { name: "Hand in" }).click();
    await page.getByText(/Version 1 is handed in/).waitFor();
    const stored = await db.execute<{ version: number; drops: number[]; temperature: number }>(sql`
      select v.version, v.input->'drops' as drops, (v.input->>'temperatureC')::float8 as temperature
      from drop_log_versions v join drop_logs d on d.id = v.drop_log_id where d.lab_id = ${lab.id}`);
    expect(stored.rows).toEqual([{ version: 1, drops: [4.12, 4.08, 4.15], temperature: 21.5 }]);
  });
});
