/**
 * The invitation form is a list of people that works with scripts off: a row is added by the server's
 * answer, a refused row keeps every row as typed with the refusal at its field, and nothing is sent
 * until every row is right.
 */
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it, onTestFinished } from "vitest";
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

  it("sends an invitation again and withdraws another from the list of invitations not yet accepted", async () => {
    const [course] = await createDatabase(pool)
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    // A browser of its own, so that this test signs in whatever ran before it.
    const own = await openBrowser({ javaScriptEnabled: false });
    onTestFinished(() => own.close());
    const page = await own.context.newPage();
    await signInWithPassword(page, base, buildDemoScenario().instructor.email, DEMO_PASSWORD);
    await page.goto(`${base}/courses/${course.id}/members`);
    await page.getByRole("group", { name: "Person 1" }).getByLabel("E-mail address").fill("no.script.again@students.harrowgate.example");
    await page.getByRole("button", { name: "Add another person" }).click();
    await page.getByRole("group", { name: "Person 2" }).getByLabel("E-mail address").fill("no.script.gone@students.harrowgate.example");
    await page.getByRole("button", { name: "Send the 2 invitations" }).click();
    await page.getByText(/^Invitations e-mailed to no\.script\.again/).waitFor();
    const firstLink = (await emailTo(base, "no.script.again@students.harrowgate.example", /invit/i)).links.find((link) =>
      link.includes("/invitations/"),
    )!;

    await page.getByRole("button", { name: "Send again to no.script.again@students.harrowgate.example" }).click();
    await page.getByText("Invitation sent again to no.script.again@students.harrowgate.example, with a new link").waitFor();
    await page.getByRole("button", { name: "Withdraw the invitation to no.script.gone@students.harrowgate.example" }).click();
    await page.getByText("Invitation to no.script.gone@students.harrowgate.example withdrawn").waitFor();
    const pending = page.getByRole("region", { name: "Invitations not yet accepted" });
    const listed = (address: string) => pending.getByRole("listitem").filter({ hasText: address }).count();
    expect(await listed("no.script.gone@students.harrowgate.example")).toBe(0);
    expect(await listed("no.script.again@students.harrowgate.example")).toBe(1);

    await page.goto(firstLink);
    await page.getByText("This invitation was replaced by a newer one").waitFor();
  });
});
