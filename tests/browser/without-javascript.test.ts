/**
 * The forms are plain HTML forms: with scripts off, Chromium posts them and the server's answer puts
 * each error at its field, keeps what was typed (never the password) and carries on when it is right.
 */
import { sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, demoCourse } from "../../seeds/demo-scenario";
import { openBrowser, type BrowserSession } from "../support/browser";

describe("forms without JavaScript", () => {
  let browser: BrowserSession;
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser({ javaScriptEnabled: false });
  });
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
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
    const [lab] = (
      await db.execute<{ id: string; course_id: string; criteria: number }>(sql`
        select l.id, l.course_id, (select count(*)::int from rubric_criteria rc where rc.lab_id = l.id) as criteria
        from labs l join courses c on c.id = l.course_id
        where c.code = ${demoCourse.code} and c.term = ${demoCourse.term}
          and not exists (select 1 from marks m where m.lab_id = l.id and m.released_at is not null)
        order by l.due_at limit 1`)
    ).rows;
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
});
