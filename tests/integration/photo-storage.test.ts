/**
 * The photo path through the built app against the local S3 fake (s3rver), as production runs it:
 * an upload lands in the bucket under the key its row names, the access-checked route streams it back,
 * removing a draft photo deletes its object, a handed-in photo cannot be removed, and an unreachable
 * store refuses the upload with 503 and keeps nothing.
 */
import { randomUUID } from "node:crypto";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { dropLogPhotos } from "~/db/schema";
import { db } from "~/server/db.server";
import { FAKE_S3_BUCKET, startFakeS3 } from "~/server/storage/fake-s3.server";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";
import { appOrigin, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { freePort } from "../support/app-server";

const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
let fixture: AccessFixture;
let handle: AppHandler;
let cookie: string;
let objects: string;
let s3: Awaited<ReturnType<typeof startFakeS3>>;
const saved: Record<string, string | undefined> = {};

const send = (pathname: string, init: RequestInit = {}) =>
  handle(new Request(new URL(pathname, appOrigin()), { ...init, headers: { Cookie: cookie, Origin: appOrigin(), ...init.headers } }));
const upload = (name: string) => {
  const form = new FormData();
  form.append("photo", new File([png], name, { type: "image/png" }));
  return send(`/courses/${fixture.courseId}/labs/${fixture.labId}/photos`, { method: "POST", body: form });
};
const remove = (photoId: string) =>
  send(`/courses/${fixture.courseId}/photos/${photoId}`, { method: "POST", body: new URLSearchParams({ intent: "remove" }) });
const photoNamed = async (name: string) => (await db.select().from(dropLogPhotos).where(eq(dropLogPhotos.originalName, name)))[0];
const objectStatus = async (key: string) => (await fetch(`${s3.endpoint}/${FAKE_S3_BUCKET}/${key}`)).status;

beforeAll(async () => {
  objects = await mkdtemp(path.join(tmpdir(), "benchpost-photo-storage-"));
  s3 = await startFakeS3({ port: 0, directory: objects, bucket: FAKE_S3_BUCKET });
  for (const [name, value] of Object.entries(s3.environment)) {
    saved[name] = process.env[name];
    process.env[name] = value;
  }
  handle = await createAppHandler();
  fixture = await createAccessFixture("photo-storage");
  cookie = await sessionCookieFor(fixture.userIds.ownStudent);
});

afterAll(async () => {
  for (const [name, value] of Object.entries(saved)) {
    if (value === undefined) delete process.env[name];
    else process.env[name] = value;
  }
  await s3?.close();
  await rm(objects, { recursive: true, force: true });
});

describe("photos in object storage", () => {
  it("stores an upload in the bucket and serves it back through the access-checked route", async () => {
    expect((await upload("bench.png")).status).toBe(200);
    const photo = await photoNamed("bench.png");
    expect(photo.storageKey).toMatch(new RegExp(`^${fixture.labId}/`));
    const object = await fetch(`${s3.endpoint}/${FAKE_S3_BUCKET}/${photo.storageKey}`);
    expect(new Uint8Array(await object.arrayBuffer())).toEqual(png);

    const served = await send(`/courses/${fixture.courseId}/photos/${photo.id}`);
    expect(served.status).toBe(200);
    expect(served.headers.get("content-type")).toBe("image/png");
    expect(new Uint8Array(await served.arrayBuffer())).toEqual(png);
  });

  it("deletes the object when the student takes the photo off their draft", async () => {
    await upload("blurred.png");
    const photo = await photoNamed("blurred.png");
    expect(await objectStatus(photo.storageKey)).toBe(200);

    expect((await remove(photo.id)).status).toBe(200);
    expect(await objectStatus(photo.storageKey)).toBe(404);
    expect(await photoNamed("blurred.png")).toBeUndefined();
    // Twice is nothing to remove.
    expect((await remove(photo.id)).status).toBe(404);
  });

  it("keeps a photo a hand-in took: it is no longer the draft's to remove", async () => {
    await upload("handed-in.png");
    const handedIn = await send(`/api/v1/labs/${fixture.labId}/drop-logs`, {
      method: "POST",
      headers: { "Content-Type": "application/json", "Idempotency-Key": randomUUID() },
      body: JSON.stringify({ sphereId: fixture.sphereId, temperatureC: 22, drops: [7.4, 7.5, 7.45, 7.52, 7.39] }),
    });
    expect(handedIn.status).toBe(201);
    const photo = await photoNamed("handed-in.png");
    expect(photo.versionId).not.toBeNull();

    expect((await remove(photo.id)).status).toBe(404);
    expect(await objectStatus(photo.storageKey)).toBe(200);
  });

  it("refuses an upload with 503 when the store cannot be reached, keeping nothing", async () => {
    const endpoint = process.env.S3_ENDPOINT;
    // A loopback port nothing listens on.
    process.env.S3_ENDPOINT = `http://127.0.0.1:${await freePort()}`;
    try {
      const refused = await upload("unreachable.png");
      expect(refused.status).toBe(503);
      expect((await refused.json()).error).toMatch(/cannot be stored just now/);
    } finally {
      process.env.S3_ENDPOINT = endpoint;
    }
    expect(await photoNamed("unreachable.png")).toBeUndefined();
  });
});
