/**
 * The limits on set-up photos, through the built app: none once the lab takes no more hand-ins from
 * the student (by their own window), at most MAX_PHOTOS_PER_DROP_LOG per drop log and
 * MAX_PHOTO_BYTES_PER_STUDENT per student, a rate limit on uploads, and no trace of a refused upload.
 */
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { and, eq } from "drizzle-orm";
import { beforeAll, describe, expect, it } from "vitest";
import { courseMemberships, dropLogPhotos, dropLogs, labExtensions, labs, users } from "~/db/schema";
import { MAX_PHOTO_BYTES_PER_STUDENT, MAX_PHOTOS_PER_DROP_LOG, MAX_PHOTOS_PER_UPLOAD } from "~/lib/drop-logs/photo-limits";
import { consume } from "~/server/auth/rate-limit.server";
import { db } from "~/server/db.server";
import { ensureDropLog } from "~/server/drop-logs/hand-in.server";
import { appOrigin, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let handle: AppHandler;

const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52]);
const photos = (count: number) => Array.from({ length: count }, (_, i) => new File([png], `set-up-${i}.png`, { type: "image/png" }));

type Student = { userId: string; membershipId: string; cookie: string };

/** A student of cohort one with nothing handed in, so each test counts only its own photos. */
async function newStudent(name: string): Promise<Student> {
  const [user] = await db
    .insert(users)
    .values({ email: `${name}@photo-limits.example`, name })
    .returning();
  const [membership] = await db
    .insert(courseMemberships)
    .values({ courseId: fixture.courseId, userId: user.id, role: "student", cohortId: fixture.cohortId })
    .returning();
  return { userId: user.id, membershipId: membership.id, cookie: await sessionCookieFor(user.id) };
}

function upload(student: Student, files: File[]): Promise<Response> {
  const form = new FormData();
  for (const file of files) form.append("photo", file);
  return handle(
    new Request(new URL(`/courses/${fixture.courseId}/labs/${fixture.labId}/photos`, appOrigin()), {
      method: "POST",
      body: form,
      headers: { Cookie: student.cookie, Origin: appOrigin() },
    }),
  );
}

async function photosOf(student: Student) {
  return db
    .select({ id: dropLogPhotos.id, bytes: dropLogPhotos.bytes })
    .from(dropLogPhotos)
    .innerJoin(dropLogs, eq(dropLogs.id, dropLogPhotos.dropLogId))
    .where(eq(dropLogs.membershipId, student.membershipId));
}

const day = 24 * 3600 * 1000;

beforeAll(async () => {
  process.env.STORAGE_DIR = await mkdtemp(path.join(tmpdir(), "benchpost-photo-limits-"));
  handle = await createAppHandler();
  fixture = await createAccessFixture("photo-limits");
});

describe("photos for a lab that takes no more hand-ins", () => {
  it("are refused with 409 when the lab is closed", async () => {
    const student = await newStudent("closed-lab");
    await db.update(labs).set({ status: "closed" }).where(eq(labs.id, fixture.labId));
    try {
      const response = await upload(student, photos(1));
      expect(response.status).toBe(409);
      expect((await response.json()).error).toMatch(/closed/);
    } finally {
      await db.update(labs).set({ status: "published" }).where(eq(labs.id, fixture.labId));
    }
    expect(await photosOf(student)).toEqual([]);
  });

  it("are refused past the student's own cut-off, and taken while their extension runs", async () => {
    const [lab] = await db.select().from(labs).where(eq(labs.id, fixture.labId));
    const late = await newStudent("past-cutoff");
    const extended = await newStudent("extended");
    // Due yesterday with no late hand-ins: closed for everyone but the student with an extension.
    await db
      .update(labs)
      .set({ dueAt: new Date(Date.now() - day), lateCutoffAt: null })
      .where(eq(labs.id, fixture.labId));
    await db
      .insert(labExtensions)
      .values({ labId: fixture.labId, membershipId: extended.membershipId, dueAt: new Date(Date.now() + day), reason: "Kit arrived late" });
    try {
      const refused = await upload(late, photos(1));
      expect(refused.status).toBe(409);
      expect((await refused.json()).error).toMatch(/due time has passed/);
      expect(await photosOf(late)).toEqual([]);
      expect((await upload(extended, photos(1))).status).toBe(200);
      expect(await photosOf(extended)).toHaveLength(1);
    } finally {
      await db.update(labs).set({ dueAt: lab.dueAt, lateCutoffAt: lab.lateCutoffAt }).where(eq(labs.id, fixture.labId));
    }
  });
});

describe("photo caps", () => {
  it(`keeps at most ${MAX_PHOTOS_PER_DROP_LOG} photos on one drop log`, async () => {
    const student = await newStudent("many-photos");
    const fullUploads = Math.floor(MAX_PHOTOS_PER_DROP_LOG / MAX_PHOTOS_PER_UPLOAD);
    for (let i = 0; i < fullUploads; i++) expect((await upload(student, photos(MAX_PHOTOS_PER_UPLOAD))).status).toBe(200);
    const left = MAX_PHOTOS_PER_DROP_LOG - fullUploads * MAX_PHOTOS_PER_UPLOAD;
    // One more than fits is refused whole, and says how many still fit.
    const over = await upload(student, photos(left + 1));
    expect(over.status).toBe(409);
    expect((await over.json()).error).toContain(`at most ${left} more`);
    expect(await photosOf(student)).toHaveLength(fullUploads * MAX_PHOTOS_PER_UPLOAD);
    expect((await upload(student, photos(left))).status).toBe(200);
    expect((await upload(student, photos(1))).status).toBe(409);
    expect(await photosOf(student)).toHaveLength(MAX_PHOTOS_PER_DROP_LOG);
  });

  it("caps the bytes one student stores in the course", async () => {
    const student = await newStudent("big-photos");
    // Photos already stored, as rows, up to a few bytes below the cap: the files themselves are not needed for the sum.
    const dropLogId = await ensureDropLog(db, { labId: fixture.labId, membershipId: student.membershipId });
    await db.insert(dropLogPhotos).values({
      dropLogId,
      storageKey: `${dropLogId}/earlier`,
      contentType: "image/jpeg",
      bytes: MAX_PHOTO_BYTES_PER_STUDENT - png.length + 1,
    });
    const response = await upload(student, photos(1));
    expect(response.status).toBe(409);
    expect((await response.json()).error).toMatch(/200 MB in all/);
    expect(await photosOf(student)).toHaveLength(1);
    // The same photo fits once it is within the cap.
    await db
      .update(dropLogPhotos)
      .set({ bytes: MAX_PHOTO_BYTES_PER_STUDENT - png.length })
      .where(eq(dropLogPhotos.dropLogId, dropLogId));
    expect((await upload(student, photos(1))).status).toBe(200);
  });
});

describe("upload rate limit", () => {
  it("answers 429 with Retry-After once a student has used up their uploads", async () => {
    const student = await newStudent("rapid-uploads");
    // Spend the points the way uploads do, rather than making the uploads themselves.
    let limited = false;
    for (let i = 0; i < 100 && !limited; i++) limited = (await consume("photo-upload", student.userId)).limited;
    expect(limited).toBe(true);
    const response = await upload(student, photos(1));
    expect(response.status).toBe(429);
    expect(Number(response.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(await photosOf(student)).toEqual([]);
  });
});

describe("a refused upload", () => {
  it("leaves no drop log behind for a student who had none", async () => {
    const student = await newStudent("text-file");
    const response = await upload(student, [new File(["not a photo"], "notes.jpg", { type: "image/jpeg" })]);
    expect(response.status).toBe(415);
    expect(
      await db
        .select()
        .from(dropLogs)
        .where(and(eq(dropLogs.labId, fixture.labId), eq(dropLogs.membershipId, student.membershipId))),
    ).toEqual([]);
  });
});
