/**
 * The drop log over HTTP, through the built app: photo uploads (type by content, 10 MB limit, who may
 * download), the reduce API that feeds the live preview, and the lab page's hand-in form.
 */
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { dropLogPhotos, dropLogs, kits } from "~/db/schema";
import { db } from "~/server/db.server";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { createTwoLotKit, type TwoLotKit } from "../support/two-lot-kit";

let fixture: AccessFixture;
let handle: AppHandler;
let twoLots: TwoLotKit;
const cookies: Record<string, string> = {};

const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);

function upload(actor: keyof typeof cookies, files: File[]): Request {
  const form = new FormData();
  for (const file of files) form.append("photo", file);
  return new Request(new URL(`/courses/${fixture.courseId}/labs/${fixture.labId}/photos`, appOrigin()), {
    method: "POST",
    body: form,
    headers: { Cookie: cookies[actor], Origin: appOrigin() },
  });
}

function reduce(actor: keyof typeof cookies | null, body: unknown): Request {
  return new Request(new URL("/api/v1/reduce", appOrigin()), {
    method: "POST",
    body: JSON.stringify(body),
    headers: { "Content-Type": "application/json", Origin: appOrigin(), ...(actor ? { Cookie: cookies[actor] } : {}) },
  });
}

beforeAll(async () => {
  process.env.STORAGE_DIR = await mkdtemp(path.join(tmpdir(), "benchpost-photos-"));
  handle = await createAppHandler();
  fixture = await createAccessFixture("drop-log-routes");
  for (const actor of ["ownStudent", "sameCohortStudent", "assignedTa", "unassignedTa", "instructor"] as const)
    cookies[actor] = await sessionCookieFor(fixture.userIds[actor]);
  twoLots = await createTwoLotKit(fixture, "drop-log-routes");
  cookies.twoLotStudent = await sessionCookieFor(twoLots.userId);
});

describe("photo uploads", () => {
  it("stores a PNG on the student's draft and serves it to the student and the staff of their cohort only", async () => {
    const response = await handle(upload("ownStudent", [new File([png], "column.png", { type: "image/png" })]));
    expect(response.status).toBe(200);
    const [stored] = await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.originalName, "column.png"));
    expect(stored).toMatchObject({ contentType: "image/png", bytes: png.length, versionId: null, dropLogId: fixture.dropLogId });

    const photoPath = `/courses/${fixture.courseId}/photos/${stored.id}`;
    const own = await handle(appRequest(photoPath, { cookie: cookies.ownStudent }));
    expect(own.status).toBe(200);
    expect(own.headers.get("content-type")).toBe("image/png");
    expect(new Uint8Array(await own.arrayBuffer())).toEqual(png);
    for (const actor of ["assignedTa", "instructor"])
      expect((await handle(appRequest(photoPath, { cookie: cookies[actor] }))).status).toBe(200);
    // Another student of the same cohort, and a TA of the other cohort: 403.
    for (const actor of ["sameCohortStudent", "unassignedTa"])
      expect((await handle(appRequest(photoPath, { cookie: cookies[actor] }))).status).toBe(403);
  });

  it("refuses a text file renamed to .jpg with 415, whatever type the browser claims", async () => {
    const response = await handle(upload("ownStudent", [new File(["time,seconds\n1,7.4\n"], "photo.jpg", { type: "image/jpeg" })]));
    expect(response.status).toBe(415);
    expect(await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.originalName, "photo.jpg"))).toEqual([]);
  });

  it("refuses a photo over 10 MB with 413", async () => {
    const big = new Uint8Array(10 * 1024 * 1024 + 1);
    big.set([0xff, 0xd8, 0xff, 0xe0]);
    const response = await handle(upload("ownStudent", [new File([big], "huge.jpg", { type: "image/jpeg" })]));
    expect(response.status).toBe(413);
    expect(await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.originalName, "huge.jpg"))).toEqual([]);
  });

  it("refuses uploads from staff with 403", async () => {
    expect((await handle(upload("instructor", [new File([png], "staff.png", { type: "image/png" })]))).status).toBe(403);
  });
});

describe("POST /api/v1/reduce", () => {
  it("reduces a drop log against the caller's kit, with warnings placed on fields", async () => {
    const response = await handle(
      reduce("ownStudent", {
        labId: fixture.labId,
        input: { sphereId: fixture.sphereId, temperatureC: "22", drops: ["7.4", "7.5", "7.45"] },
      }),
    );
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body.reduction.drops.n).toBe(3);
    expect(body.kitRecords.sphere).toMatchObject({ diameterMm: 3, massG: 0.11 });
    // Three drops against the lab's default ten required.
    expect(body.warnings).toContainEqual(expect.objectContaining({ code: "too-few-drops", field: "drops" }));
  });

  it("answers per-row issues with 400 in the API's error shape", async () => {
    const response = await handle(
      reduce("ownStudent", { labId: fixture.labId, input: { sphereId: fixture.sphereId, temperatureC: "22", drops: ["7.4", "x"] } }),
    );
    expect(response.status).toBe(400);
    const body = await response.json();
    expect(body.error.code).toBe("invalid_input");
    expect(body.error.issues).toEqual([{ path: ["drops", 1], message: expect.stringMatching(/seconds/) }]);
  });

  it("refuses a student without a kit (409), staff (403), an unknown lab (404) and anonymous callers (401)", async () => {
    const input = { sphereId: fixture.sphereId, temperatureC: 22, drops: [7.4] };
    expect((await handle(reduce("sameCohortStudent", { labId: fixture.labId, input }))).status).toBe(409);
    expect((await handle(reduce("instructor", { labId: fixture.labId, input }))).status).toBe(403);
    expect((await handle(reduce("ownStudent", { labId: "00000000-0000-4000-8000-000000000000", input }))).status).toBe(404);
    expect((await handle(reduce(null, { labId: fixture.labId, input }))).status).toBe(401);
  });

  it("reduces the engine's own SI input for anyone signed in, and lists the engine's issues", async () => {
    const engine = {
      mode: "viscometry",
      sphere: { diameter: 0.003, mass: 0.00011 },
      fluid: { density: 1260 },
      column: { timedDistance: 0.2 },
      drops: [7.4, 7.5, 7.45],
    };
    const ok = await handle(reduce("instructor", engine));
    expect(ok.status).toBe(200);
    expect((await ok.json()).reduction.mode).toBe("viscometry");
    const bad = await handle(reduce("instructor", { ...engine, sphere: { diameter: -1, mass: 0.00011 } }));
    expect(bad.status).toBe(400);
    expect((await bad.json()).error).toMatchObject({
      code: "not_reducible",
      issues: [expect.objectContaining({ path: ["sphere", "diameter"] })],
    });
  });
});

describe("the parts a drop log names, through the API", () => {
  const handInRequest = (body: unknown) =>
    new Request(new URL(`/api/v1/labs/${fixture.labId}/drop-logs`, appOrigin()), {
      method: "POST",
      body: JSON.stringify(body),
      headers: {
        "Content-Type": "application/json",
        "Idempotency-Key": crypto.randomUUID(),
        Origin: appOrigin(),
        Cookie: cookies.twoLotStudent,
      },
    });
  const base = () => ({
    sphereId: twoLots.spheres[0],
    fluidLotId: twoLots.fluidLots[1],
    columnId: twoLots.columns[0],
    temperatureC: 22,
    drops: [7.4, 7.5, 7.45, 7.52, 7.39],
  });

  it.each([
    ["a lot not in the kit", () => ({ fluidLotId: twoLots.foreignFluidLotId }), "part_not_in_kit", "fluidLotId"],
    ["a column not in the kit", () => ({ columnId: twoLots.foreignColumnId }), "part_not_in_kit", "columnId"],
    ["a sphere not in the kit", () => ({ sphereId: twoLots.foreignSphereId }), "sphere_not_in_kit", "sphereId"],
    ["no lot when the kit holds two", () => ({ fluidLotId: undefined }), "part_not_chosen", "fluidLotId"],
    ["no column when the kit holds two", () => ({ columnId: "" }), "part_not_chosen", "columnId"],
  ])("refuses %s with 400 at the field, in the preview and the hand-in", async (_, change, code, field) => {
    const body = { ...base(), ...change() };
    const preview = await handle(reduce("twoLotStudent", { labId: fixture.labId, input: body }));
    expect(preview.status).toBe(400);
    expect((await preview.json()).error).toMatchObject({ code, issues: [{ path: [field] }] });
    const handedIn = await handle(handInRequest(body));
    expect(handedIn.status).toBe(400);
    expect((await handedIn.json()).error).toMatchObject({ code, issues: [{ path: [field] }] });
  });

  it("hands in against the lot named, and the preview shows it", async () => {
    const preview = await handle(reduce("twoLotStudent", { labId: fixture.labId, input: base() }));
    expect(preview.status).toBe(200);
    expect((await preview.json()).kitRecords.fluidLot).toMatchObject({ id: twoLots.fluidLots[1], label: "F-2" });
    const handedIn = await handle(handInRequest(base()));
    expect(handedIn.status).toBe(201);
    const detail = await handle(appRequest(`/api/v1/labs/${fixture.labId}/drop-logs`, { cookie: cookies.twoLotStudent }));
    const [own] = (await detail.json()).dropLogs;
    expect(own.latestVersion).toMatchObject({
      fluidLotId: twoLots.fluidLots[1],
      columnId: twoLots.columns[0],
      kitRecords: { fluidLot: { label: "F-2" } },
    });
  });

  it("takes a hand-in while the kit is still packed, and the staff hand-in page and the student's page say so", async () => {
    await db.update(kits).set({ state: "packed" }).where(eq(kits.id, twoLots.kitId));
    try {
      expect((await handle(handInRequest(base()))).status).toBe(201);
      const [dropLog] = await db
        .select({ id: dropLogs.id })
        .from(dropLogs)
        .where(and(eq(dropLogs.labId, fixture.labId), eq(dropLogs.membershipId, twoLots.access.membership.id)));
      const staffPage = await handle(
        appRequest(`/courses/${fixture.courseId}/labs/${fixture.labId}/hand-ins/${dropLog.id}`, { cookie: cookies.instructor }),
      );
      expect(staffPage.status).toBe(200);
      expect(await staffPage.text()).toContain("Kit K-03 was recorded as “Packed”, not yet at home, at this hand-in");
      const studentPage = await (
        await handle(appRequest(`/courses/${fixture.courseId}/labs/${fixture.labId}`, { cookie: cookies.twoLotStudent }))
      ).text();
      expect(studentPage).toContain("Kit K-03 is recorded as “Packed”, not yet at home.");
    } finally {
      await db.update(kits).set({ state: "at_home" }).where(eq(kits.id, twoLots.kitId));
    }
  });
});

describe("the lab page's hand-in form", () => {
  it("answers a bad drop row with 400 and its message, and hands in a good log as the next version", async () => {
    const labPath = `/courses/${fixture.courseId}/labs/${fixture.labId}`;
    const form = (drops: string[], key: string) => {
      const body = new URLSearchParams({
        intent: "hand-in",
        idempotencyKey: key,
        sphereId: fixture.sphereId,
        temperatureC: "21.8",
        timedDistanceMm: "200",
      });
      drops.forEach((drop, row) => body.append(`drops[${row}]`, drop));
      return new Request(new URL(`${labPath}.data`, appOrigin()), {
        method: "POST",
        body,
        headers: { Cookie: cookies.ownStudent, Origin: appOrigin() },
      });
    };
    const refused = await handle(form(["7.4", "-1"], "page-form-key-1"));
    expect(refused.status).toBe(400);
    expect(await refused.text()).toContain("A time cannot be negative.");
    const accepted = await handle(form(["7.4", "7.5", "7.45"], "page-form-key-2"));
    expect(accepted.status).toBe(200);
    // The fixture's hand-in is version 1.
    expect(await accepted.text()).toMatch(/handedIn.*version",2/);
  });

  it("asks for the bottle at its field when the kit holds two lots the lab allows", async () => {
    const body = new URLSearchParams({
      intent: "hand-in",
      idempotencyKey: "page-form-two-lots",
      sphereId: twoLots.spheres[0],
      fluidLotId: "",
      columnId: twoLots.columns[0],
      temperatureC: "21.8",
    });
    ["7.4", "7.5", "7.45"].forEach((drop, row) => body.append(`drops[${row}]`, drop));
    const refused = await handle(
      new Request(new URL(`/courses/${fixture.courseId}/labs/${fixture.labId}.data`, appOrigin()), {
        method: "POST",
        body,
        headers: { Cookie: cookies.twoLotStudent, Origin: appOrigin() },
      }),
    );
    expect(refused.status).toBe(400);
    const text = await refused.text();
    expect(text).toContain("fluidLotId");
    expect(text).toContain("Choose which fluid lot you used: F-1, F-2.");
  });

  it("shows a student with two allowed lots the choice, and one with a single lot the lot used", async () => {
    const labPath = `/courses/${fixture.courseId}/labs/${fixture.labId}`;
    const two = await (await handle(appRequest(labPath, { cookie: cookies.twoLotStudent }))).text();
    expect(two).toMatch(/<select[^>]*name="fluidLotId"/);
    expect(two).toContain("Choose the bottle you used");
    const one = await (await handle(appRequest(labPath, { cookie: cookies.ownStudent }))).text();
    expect(one).not.toMatch(/<select[^>]*name="fluidLotId"/);
    expect(one).toMatch(/<input type="hidden" name="fluidLotId" value="[^"]+"/);
    expect(one).toContain("F-1 · glycerol");
  });
});
