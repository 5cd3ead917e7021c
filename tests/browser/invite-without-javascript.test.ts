/**
 * The invitation form is a list of people that works with scripts off: a row is added by the server's
 * answer, a refused row keeps every row as typed with the refusal at its field, and nothing is sent
 * until every row is right.
 */
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { courses } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import { emailTo, openBrowser, signInWithPassword, type BrowserSession } from "../support/browser";

describe("inviting people without JavaScript", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser({ javaScriptEnabled: false });
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("adds a second person, refuses a member at that row, then invites both", async () => {
    const [course] = await createDatabase(pool)
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    const { instructor } = buildDemoScenario();
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, instructor.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${course.id}/members`);

    const first = page.getByRole("group", { name: "Person 1" });
    const second = page.getByRole("group", { name: "Person 2" });
    await first.getByLabel("E-mail address").fill("no.script.one@students.harrowgate.example");
    await page.getByRole("button", { name: "Add another person" }).click();
    await second.waitFor();
    expect(await first.getByLabel("E-mail address").inputValue()).toBe("no.script.one@students.harrowgate.example");

    await second.getByLabel("E-mail address").fill(instructor.email);
    await page.getByRole("button", { name: "Send the 2 invitations" }).click();
    await page.getByText("No invitation was sent: see the marked rows.").waitFor();
    const refused = second.getByLabel("E-mail address");
    expect(await refused.getAttribute("aria-invalid")).toBe("true");
    const describedBy = (await refused.getAttribute("aria-describedby")) ?? "";
    expect(await page.locator(`[id="${describedBy.split(" ").at(-1)}"]`).innerText()).toBe(
      "This person is a member of the course already.",
    );
    expect(await first.getByLabel("E-mail address").inputValue()).toBe("no.script.one@students.harrowgate.example");
    expect(await first.getByLabel("E-mail address").getAttribute("aria-invalid")).toBeNull();

    await refused.fill("no.script.two@students.harrowgate.example");
    await second.getByLabel("Role").selectOption("ta");
    await page.getByRole("button", { name: "Send the 2 invitations" }).click();
    await page
      .getByText("Invitations e-mailed to no.script.one@students.harrowgate.example, no.script.two@students.harrowgate.example.")
      .waitFor();
    for (const address of ["no.script.one@students.harrowgate.example", "no.script.two@students.harrowgate.example"])
      expect((await emailTo(base, address, /invit/i)).links.some((link) => link.includes("/invitations/"))).toBe(true);
  });
});
