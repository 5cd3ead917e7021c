/**
 * Every safety caution on every page where the kit is handled, through the built app's request
 * handler: the packing slip that travels in the box, the kit page, the student's kit page and the
 * student's lab page.
 */
import { beforeAll, describe, expect, it } from "vitest";
import { safetyCautions, safetyCautionsDeferral } from "~/lib/safety/cautions";
import { appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { readableText } from "../support/readable-text";

let handle: AppHandler;
let fixture: AccessFixture;

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("safety");
});

async function pageText(path: string, userId: string): Promise<string> {
  const response = await handle(appRequest(path, { cookie: await sessionCookieFor(userId) }));
  expect(response.status, path).toBe(200);
  return readableText(await response.text());
}

function expectEveryCaution(text: string) {
  for (const caution of safetyCautions) expect(text, caution.topic).toContain(`${caution.topic}. ${caution.text}`);
  expect(text).toContain(safetyCautionsDeferral);
}

describe("safety cautions", () => {
  it("are all on the packing slip", async () => {
    expectEveryCaution(await pageText(`/courses/${fixture.courseId}/kits/${fixture.kitId}/packing-slip`, fixture.userIds.instructor));
  });

  it("are all on the kit page, the student's kit page and the student's lab page", async () => {
    expectEveryCaution(await pageText(`/courses/${fixture.courseId}/kits/${fixture.kitId}`, fixture.userIds.instructor));
    expectEveryCaution(await pageText(`/courses/${fixture.courseId}/my-kit`, fixture.userIds.ownStudent));
    expectEveryCaution(await pageText(`/courses/${fixture.courseId}/labs/${fixture.labId}`, fixture.userIds.ownStudent));
  });

  it("name every kind of sphere as a choking hazard, not only steel", () => {
    const spheres = safetyCautions.find((caution) => caution.topic === "Small spheres")!;
    for (const material of ["steel", "glass", "plastic"]) expect(spheres.text).toContain(material);
  });
});
