import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { courses } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCohortNames, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, emailTo, openBrowser, seriousOrCritical, signOut, type BrowserSession } from "../support/browser";

describe("invitation and sign-in in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const base = inject("baseUrl");
  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 390, height: 844 } });
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("an instructor invites a student, who accepts from the e-mailed link and later signs in with a password", async () => {
    const [course] = await createDatabase(pool)
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    const page = await browser.context.newPage();

    // The demo instructor signs in with the demo password.
    await page.goto(`${base}/courses/${course.id}/members`);
    await page.waitForURL(/\/sign-in\?redirectTo=/);
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    const passwordForm = page.locator("form", { has: page.getByRole("button", { name: "Sign in", exact: true }) });
    await passwordForm.getByLabel("E-mail address").fill(buildDemoScenario().instructor.email);
    await passwordForm.getByLabel("Password").fill(DEMO_PASSWORD);
    await passwordForm.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.waitForURL(`${base}/courses/${course.id}/members`);
    await page.getByRole("heading", { level: 1, name: "Members" }).waitFor();

    // …and invites a student into the second cohort.
    const student = "ada.new@students.harrowgate.example";
    await page.getByLabel("E-mail address").fill(student);
    await page.getByLabel("Name (optional)").fill("Ada Newcombe");
    await page.getByLabel("Role").selectOption("student");
    await page.getByLabel(/^Cohort/).selectOption({ label: demoCohortNames[1] });
    await page.getByRole("button", { name: "Send the invitation" }).click();
    await page.getByText(`Invitation e-mailed to ${student}`).waitFor();
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await signOut(page, base);

    // The student opens the link from the e-mail the catcher received.
    const invitationLink = (await emailTo(base, student)).links.find((link) => link.startsWith(`${base}/invitations/`));
    expect(invitationLink).toBeTruthy();
    await page.goto(invitationLink!);
    await expect(page.getByRole("heading", { level: 1 }).textContent()).resolves.toContain(demoCourse.code);
    await expect(page.getByRole("heading", { level: 1 }).locator("xpath=following-sibling::p").textContent()).resolves.toContain(
      demoCohortNames[1],
    );
    expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    await expect(page.getByLabel("Your name").inputValue()).resolves.toBe("Ada Newcombe");
    await page.getByLabel("Choose a password (optional)").fill("too short");
    await page.getByLabel("The same password again").fill("different");
    await page.getByRole("button", { name: "Accept and join the course" }).click();
    // Field errors next to the fields; the name is kept.
    await page.getByText("The two passwords are not the same.").waitFor();
    await expect(page.getByLabel("Your name").inputValue()).resolves.toBe("Ada Newcombe");
    const password = "ramps of golden syrup";
    await page.getByLabel("Choose a password (optional)").fill(password);
    await page.getByLabel("The same password again").fill(password);
    await page.getByRole("button", { name: "Accept and join the course" }).click();
    await page.getByRole("heading", { name: "Your courses" }).waitFor();
    await page.getByText(demoCourse.title).first().waitFor();

    // The link is used up.
    await page.goto(invitationLink!);
    await page.getByText("This invitation has been accepted already.").waitFor();

    // Signed out, the student signs in again with the new password.
    await signOut(page, base);
    await page.goto(`${base}/sign-in`);
    const form = page.locator("form", { has: page.getByRole("button", { name: "Sign in", exact: true }) });
    await form.getByLabel("E-mail address").fill(student);
    await form.getByLabel("Password").fill(password);
    await form.getByRole("button", { name: "Sign in", exact: true }).click();
    await page.getByRole("heading", { name: "Your courses" }).waitFor();
    await page.getByText(demoCourse.title).first().waitFor();
  });
});
