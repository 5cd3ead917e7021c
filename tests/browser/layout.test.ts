/**
 * Every page of the demo, for each kind of person, at a laptop's 1280×800 and a phone's 390×844: the
 * page never scrolls sideways, and no text inside a plot (an <svg>) renders under 11 CSS px, measured
 * as drawn (the computed font size times the SVG's scale on screen). The pages a person may not open
 * answer 403 or 404 and are left to the authorization matrix. Only reads the demo.
 */
import { sql } from "drizzle-orm";
import type { Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, inject, it } from "vitest";
import { createDatabase, createPool } from "~/server/db.server";
import { DEMO_PASSWORD, buildDemoScenario, demoCourse } from "../../seeds/demo-scenario";
import {
  axeViolations,
  gotoHydrated,
  openBrowser,
  seriousOrCritical,
  signInWithPassword,
  signOut,
  type BrowserSession,
} from "../support/browser";

const viewports = [
  { width: 1280, height: 800 },
  { width: 390, height: 844 },
] as const;
const smallestPlotTextPx = 11;

type Ids = {
  course: string;
  archivedCourse: string;
  dragLab: string;
  viscometryLab: string;
  handIn: string;
  studentMembership: string;
  studentEmail: string;
  kit: string;
  sphere: string;
  fluidLot: string;
  shipment: string;
  problem: string;
};

/** The pages of app/routes.ts (each course page of the frame, the printable packing slip, the dev inbox). */
function pagesOf(ids: Ids): string[] {
  const course = `/courses/${ids.course}`;
  const lab = (labId: string) => [
    `${course}/labs/${labId}`,
    `${course}/labs/${labId}/comparison`,
    `${course}/labs/${labId}/edit`,
    `${course}/labs/${labId}/dashboard`,
    `${course}/labs/${labId}/extensions`,
    `${course}/labs/${labId}/marking`,
    `${course}/labs/${labId}/rubric`,
    `${course}/labs/${labId}/moderation`,
  ];
  return [
    "/",
    "/account",
    "/courses/new",
    course,
    `${course}/settings`,
    `${course}/carry-over`,
    `${course}/members`,
    `${course}/members/${ids.studentMembership}`,
    `${course}/members/${ids.studentMembership}/record`,
    `${course}/roster`,
    `${course}/audit`,
    `${course}/mark-book`,
    `${course}/mark-book/settings`,
    `${course}/kits`,
    `${course}/kits/new`,
    `${course}/kits/problems`,
    `${course}/kits/problems/${ids.problem}`,
    `${course}/kits/tracking-import`,
    `${course}/kits/overdue`,
    `${course}/kits/check-in`,
    `${course}/kits/${ids.kit}`,
    `${course}/kits/${ids.kit}/packing-slip`,
    `${course}/parts`,
    `${course}/parts/new`,
    `${course}/parts/import`,
    `${course}/parts/${ids.sphere}`,
    `${course}/parts/${ids.fluidLot}`,
    `${course}/shipments`,
    `${course}/shipments/new`,
    `${course}/shipments/${ids.shipment}`,
    `${course}/my-kit`,
    `${course}/my-address`,
    `${course}/addresses/import`,
    `${course}/labs`,
    `${course}/labs/new`,
    ...lab(ids.dragLab),
    ...lab(ids.viscometryLab),
    `${course}/labs/${ids.dragLab}/hand-ins/${ids.handIn}`,
    `${course}/messages`,
    `${course}/messages/new`,
    `/courses/${ids.archivedCourse}`,
    "/dev/inbox",
  ];
}

/** What a page measures: its sideways overflow and its plots' smallest text as drawn. */
async function measure(page: Page) {
  return page.evaluate(() => {
    const root = document.documentElement;
    const texts = [...document.querySelectorAll<SVGTextElement>("svg text")].filter((text) => text.textContent?.trim());
    const sizes = texts.map((text) => {
      const ctm = text.getScreenCTM();
      const scale = ctm ? Math.hypot(ctm.a, ctm.b) : 1;
      return { px: parseFloat(getComputedStyle(text).fontSize) * scale, text: text.textContent!.trim() };
    });
    const smallest = sizes.reduce((least, size) => (least && least.px <= size.px ? least : size), null as null | (typeof sizes)[number]);
    // The outermost element past the right edge (document order puts it before what it holds), to name in a failure.
    // Inside a scrolling box (a wide table's wrapper, the course's room bar) an element may pass the edge: the page does not scroll for it.
    const clipped = (element: Element) => {
      for (let box = element.parentElement; box && box !== document.body; box = box.parentElement)
        if (getComputedStyle(box).overflowX !== "visible") return true;
      return false;
    };
    // Text too can pass its box's edge (a long unbroken word), so text runs are measured too.
    const walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
    const runs: { element: Element; right: number }[] = [];
    for (let node = walker.nextNode(); node; node = walker.nextNode()) {
      const range = document.createRange();
      range.selectNodeContents(node);
      if (node.parentElement) runs.push({ element: node.parentElement, right: range.getBoundingClientRect().right });
    }
    const widest = [
      ...[...document.body.querySelectorAll<HTMLElement>("*")].map((element) => ({
        element,
        right: element.getBoundingClientRect().right,
      })),
      ...runs,
    ].find(({ element, right }) => right > root.clientWidth + 0.5 && !clipped(element));
    const name = (element: Element) =>
      `${element.tagName.toLowerCase()}${element.id ? `#${element.id}` : ""}${element.className && typeof element.className === "string" ? `.${element.className.split(" ").slice(0, 3).join(".")}` : ""}`;
    return {
      scrollWidth: root.scrollWidth,
      clientWidth: root.clientWidth,
      widest: widest
        ? `${name(widest.element)} to ${Math.round(widest.right)} px: "${widest.element.textContent?.trim().slice(0, 60)}"`
        : null,
      smallestText: smallest ? { px: Math.round(smallest.px * 100) / 100, text: smallest.text } : null,
    };
  });
}

/** The page after React has hydrated it and its plots have measured their width. */
async function openHydrated(page: Page, url: string) {
  const status = await gotoHydrated(page, url);
  await page.waitForLoadState("networkidle");
  // Two frames: the plots' ResizeObserver reports, then React draws them at the measured width.
  await page.evaluate(() => new Promise((resolve) => requestAnimationFrame(() => requestAnimationFrame(resolve))));
  return status;
}

describe("layout at 1280×800 and 390×844 in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");
  let ids: Ids;
  const scenario = buildDemoScenario();

  beforeAll(async () => {
    browser = await openBrowser();
    const row = async <T>(query: ReturnType<typeof sql>) => {
      const found = (await db.execute<T & Record<string, unknown>>(query)).rows[0];
      expect(found, String(query.queryChunks[0])).toBeDefined();
      return found;
    };
    const course = await row<{ id: string; carried_from_id: string }>(
      sql`select id, carried_from_id from courses where code = ${demoCourse.code} and term = ${demoCourse.term}`,
    );
    const labOf = async (kind: string) =>
      (await row<{ id: string }>(sql`select id from labs where course_id = ${course.id} and kind = ${kind} order by created_at limit 1`))
        .id;
    const dragLab = await labOf("drag");
    // A hand-in of a student of the first TA's cohort (the TA we sign in as), with a kit at home.
    const [firstTaCohort] = scenario.tas[0].cohorts;
    const handIn = await row<{ id: string; membership_id: string; email: string }>(sql`
      select d.id, d.membership_id, u.email
      from drop_logs d
      join course_memberships m on m.id = d.membership_id
      join cohorts c on c.id = m.cohort_id and c.position = ${firstTaCohort}
      join users u on u.id = m.user_id
      join kits k on k.holder_membership_id = m.id
      where d.lab_id = ${dragLab} and d.latest_version_id is not null
      order by u.email
      limit 1`);
    const part = async (kind: string) =>
      (await row<{ id: string }>(sql`select id from parts where course_id = ${course.id} and kind = ${kind} order by label limit 1`)).id;
    ids = {
      course: course.id,
      archivedCourse: course.carried_from_id,
      dragLab,
      viscometryLab: await labOf("viscometry"),
      handIn: handIn.id,
      studentMembership: handIn.membership_id,
      studentEmail: handIn.email,
      kit: (await row<{ id: string }>(sql`select id from kits where holder_membership_id = ${handIn.membership_id}`)).id,
      sphere: await part("sphere"),
      fluidLot: await part("fluid_lot"),
      shipment: (await row<{ id: string }>(sql`select id from shipments where course_id = ${course.id} order by created_at limit 1`)).id,
      problem: (await row<{ id: string }>(sql`select id from kit_problems where course_id = ${course.id} order by created_at limit 1`)).id,
    };
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  const people = [
    { role: "instructor", email: () => scenario.instructor.email },
    { role: "TA", email: () => scenario.tas[0].email },
    { role: "student", email: () => ids.studentEmail },
    { role: "visitor", email: () => null },
  ];

  it.each(people)(
    "no page scrolls sideways and no plot text is under 11 px, for the $role",
    async ({ email }) => {
      // Each person in a signed-out browser, whatever an earlier one left behind.
      await browser.context.clearCookies();
      const page = await browser.context.newPage();
      const who = email();
      const pages = who ? pagesOf(ids) : ["/", "/sign-in", "/sign-up", "/forgot-password"];
      if (who) await signInWithPassword(page, base, who, DEMO_PASSWORD);
      const problems: string[] = [];
      let opened = 0;
      let plotsSeen = 0;
      for (const path of pages) {
        for (const viewport of viewports) {
          await page.setViewportSize(viewport);
          const status = await openHydrated(page, `${base}${path}`);
          if (status === 403 || status === 404) continue;
          expect(status, path).toBe(200);
          opened++;
          const { scrollWidth, clientWidth, widest, smallestText } = await measure(page);
          const at = `${path} at ${viewport.width}×${viewport.height}`;
          if (scrollWidth > clientWidth) problems.push(`${at}: ${scrollWidth} px wide in ${clientWidth} (${widest})`);
          if (smallestText) {
            plotsSeen++;
            if (smallestText.px < smallestPlotTextPx) problems.push(`${at}: plot text "${smallestText.text}" at ${smallestText.px} px`);
          }
        }
      }
      if (who) await signOut(page, base);
      await page.close();
      expect(opened, "pages opened").toBeGreaterThan(who ? 10 : 3);
      if (who && who !== ids.studentEmail) expect(plotsSeen, "pages with plots measured").toBeGreaterThan(0);
      expect(problems).toEqual([]);
    },
    600_000,
  );
});

describe("axe on the screens this change touched, in Chromium", () => {
  let browser: BrowserSession;
  const pool = createPool(inject("databaseUrl"));
  const db = createDatabase(pool);
  const base = inject("baseUrl");

  beforeAll(async () => {
    browser = await openBrowser({ viewport: { width: 390, height: 844 } });
  });
  afterAll(async () => {
    await browser.close();
    await pool.end();
  });

  it("the course settings, the new lab form, a lab's comparison, a fluid lot and the account page have no serious or critical issue", async () => {
    const course = (
      await db.execute<{ id: string }>(sql`select id from courses where code = ${demoCourse.code} and term = ${demoCourse.term}`)
    ).rows[0].id;
    const lab = (
      await db.execute<{ id: string }>(sql`select id from labs where course_id = ${course} and kind = 'drag' order by created_at limit 1`)
    ).rows[0].id;
    const lot = (
      await db.execute<{ id: string }>(sql`select id from parts where course_id = ${course} and kind = 'fluid_lot' order by label limit 1`)
    ).rows[0].id;
    const page = await browser.context.newPage();
    await signInWithPassword(page, base, `instructor@harrowgate.example`, DEMO_PASSWORD);
    for (const path of [
      `/courses/${course}/settings`,
      `/courses/${course}/labs/new`,
      `/courses/${course}/labs/${lab}/comparison`,
      `/courses/${course}/parts/${lot}`,
      "/account",
    ]) {
      expect(await openHydrated(page, `${base}${path}`), path).toBe(200);
      expect(seriousOrCritical(await axeViolations(page)), path).toEqual([]);
    }
    // The phone menu holds Sign out.
    await page.getByText("Menu", { exact: true }).click();
    await expect(
      page.getByRole("navigation", { name: "Main" }).getByRole("button", { name: "Sign out" }).first().isVisible(),
    ).resolves.toBe(true);
    await signOut(page, base);
    await page.close();
  });
});
