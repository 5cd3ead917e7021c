import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { courseMemberships, courses, shippingAddresses, users } from "~/db/schema";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import { axeViolations, openBrowser, seriousOrCritical, signInWithPassword, type BrowserSession } from "../support/browser";

describe("shipping addresses in Chromium", () => {
  const pool = createPool(inject("databaseUrl"));
  const base = inject("baseUrl");
  const scenario = buildDemoScenario();
  const student = scenario.students[7];
  let courseId: string;
  beforeAll(async () => {
    const [course] = await createDatabase(pool)
      .select({ id: courses.id })
      .from(courses)
      .where(and(eq(courses.code, demoCourse.code), eq(courses.term, demoCourse.term)));
    courseId = course.id;
    // The demo gives every student an address: these two start without one, as a student new to the course would.
    const newcomers = await createDatabase(pool)
      .select({ id: courseMemberships.id })
      .from(courseMemberships)
      .innerJoin(users, eq(users.id, courseMemberships.userId))
      .where(and(eq(courseMemberships.courseId, courseId), inArray(users.email, [student.email, scenario.students[9].email])));
    await createDatabase(pool)
      .delete(shippingAddresses)
      .where(
        inArray(
          shippingAddresses.membershipId,
          newcomers.map((row) => row.id),
        ),
      );
  });
  afterAll(async () => {
    await pool.end();
  });

  it("a student without JavaScript enters an address, is told at the field what is wrong, and saves it", async () => {
    const browser: BrowserSession = await openBrowser({ javaScriptEnabled: false });
    try {
      const page = await browser.context.newPage();
      await signInWithPassword(page, base, student.email, DEMO_PASSWORD);
      await page.goto(`${base}/courses/${courseId}/my-kit`);
      await page.getByRole("link", { name: "My shipping address" }).click();
      await page.getByRole("heading", { name: "My shipping address" }).waitFor();

      await page.getByLabel("Street and number").fill("40 Weir Road");
      await page.getByLabel("Town or city").fill("Fernwick");
      await page.getByLabel("Postcode").fill("1234");
      await page.getByLabel("Country").selectOption("US");
      await page.getByRole("button", { name: "Save my address" }).click();
      await page.getByText("“1234” is not a postcode there; write it like 12345 or 12345-6789.").waitFor();
      await expect(page.getByText("Enter the state as its code, such as NY.").isVisible()).resolves.toBe(true);
      await expect(page.getByLabel("Street and number").inputValue()).resolves.toBe("40 Weir Road");

      await page.getByLabel("Name on the parcel").fill(student.name);
      await page.getByLabel("Postcode").fill("12345");
      await page.getByLabel("State, province or county").fill("ny");
      await page.getByRole("button", { name: "Save my address" }).click();
      await page.getByText("Saved. Your kit goes to this address.").waitFor();
      await expect(page.getByRole("link", { name: "Download my address (JSON)" }).isVisible()).resolves.toBe(true);
    } finally {
      await browser.close();
    }
  });

  it("the address form with its messages passes axe (scripts on: the check runs in the page)", async () => {
    const browser = await openBrowser();
    try {
      const page = await browser.context.newPage();
      await signInWithPassword(page, base, scenario.students[9].email, DEMO_PASSWORD);
      await page.goto(`${base}/courses/${courseId}/my-address`);
      await page.getByLabel("Country").selectOption("AU");
      await page.getByLabel("Postcode").fill("20000");
      // Enter, not a click: the postcode's message appearing on blur moves the button down under the pointer.
      await page.getByLabel("Postcode").press("Enter");
      await page.getByText("Enter the state or territory as its code, such as NSW.").waitFor();
      await expect(page.getByText("“20000” is not a postcode there; write it like 2000.").isVisible()).resolves.toBe(true);
      expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
    } finally {
      await browser.close();
    }
  });

  it("an instructor previews pasted addresses against the course and writes the ready rows", async () => {
    const browser = await openBrowser();
    try {
      const page = await browser.context.newPage();
      await signInWithPassword(page, base, scenario.instructor.email, DEMO_PASSWORD);
      await page.goto(`${base}/courses/${courseId}/members`);
      await page.getByRole("link", { name: "Import shipping addresses" }).click();
      const other = scenario.students[8];
      const csv = [
        "email,name,line1,line2,city,region,postcode,country,phone",
        `${other.email},,7 Kiln Street,,Fernwick,,FW1 2AB,GB,`,
        "nobody@students.example,,1 Road,,Town,,,FR,",
      ].join("\n");
      await page.getByLabel(/paste the rows/).fill(csv);
      await page.getByRole("button", { name: "Preview against the course" }).click();
      await page.getByRole("heading", { name: /^Preview: 2 rows/ }).waitFor();
      await expect(page.getByText("No student of this course, or pending invitation, has this e-mail.").isVisible()).resolves.toBe(true);
      expect(seriousOrCritical(await axeViolations(page))).toEqual([]);
      await page.getByRole("button", { name: "Write 1 address" }).click();
      await page.getByText(/^Imported: 1 address written/).waitFor();
    } finally {
      await browser.close();
    }
  });
});
