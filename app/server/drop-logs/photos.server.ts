/**
 * Photos of a student's set-up: checked by their content (not their name or the browser's word),
 * kept in S3-compatible object storage (S3_BUCKET; the local disk outside the web root serves
 * development only), and listed in drop_log_photos. They hang on the drop log's
 * draft until a hand-in attaches them to the version it creates.
 */
import { AppError } from "~/lib/app-error";
import { randomUUID } from "node:crypto";
import path from "node:path";
import type { FileStorage } from "@remix-run/file-storage";
import { createFsFileStorage } from "@remix-run/file-storage/fs";
import {
  MaxFileSizeExceededError,
  MaxFilesExceededError,
  MaxTotalSizeExceededError,
  parseFormData,
  type FileUpload,
} from "@remix-run/form-data-parser";
import { and, eq, inArray, isNull, sql } from "drizzle-orm";
import { courseMemberships, dropLogPhotos, dropLogs, labs } from "~/db/schema";
import {
  MAX_PHOTO_BYTES,
  MAX_PHOTO_BYTES_PER_STUDENT,
  MAX_PHOTO_MEGABYTES,
  MAX_PHOTO_UPLOAD_BYTES,
  MAX_PHOTOS_PER_DROP_LOG,
  MAX_PHOTOS_PER_UPLOAD,
} from "~/lib/drop-logs/photo-limits";
import type { CourseAccess } from "~/server/auth/access.server";
import { consume } from "~/server/auth/rate-limit.server";
import type { Database, Executor } from "~/server/db.server";
import { ensureDropLog, refuseWhenClosed, type StudentLab } from "./hand-in.server";
import { environment } from "~/server/env.server";
import { logger } from "~/server/log.server";
import { createS3Client, createS3FileStorage } from "~/server/storage/s3-file-storage.server";

export const photoTypes = ["image/jpeg", "image/png", "image/webp"] as const;
export type PhotoType = (typeof photoTypes)[number];

const uploadCodes = {
  400: "unreadable_upload",
  409: "photo_limit",
  413: "too_large",
  415: "not_a_photo",
  429: "rate_limited",
  503: "storage_unavailable",
} as const;

/**
 * A refused upload, with the HTTP status that names why: 413 too large, 415 not a photo, 400 malformed,
 * 409 the drop log or the student's space is full, 429 too many uploads (with the wait), 503 the photo
 * store did not take the file.
 */
function uploadRefusal(status: keyof typeof uploadCodes, message: string, retryAfterSeconds?: number): AppError {
  return new AppError({ code: uploadCodes[status], status, message, retryAfterSeconds });
}

/** `STORAGE_DIR`, or `storage/` in the checkout (git-ignored); never under `public/`. */
export function storageDirectory(): string {
  return path.resolve(environment().STORAGE_DIR ?? path.join(process.cwd(), "storage"), "photos");
}

let storage: { settings: string; store: FileStorage } | undefined;
/** The configured store, made once per setting (tests point STORAGE_DIR or S3_* at stores of their own). */
function photoStorage(): FileStorage {
  const env = environment();
  const settings = env.S3_BUCKET ? `s3 ${env.S3_ENDPOINT} ${env.S3_BUCKET}` : `fs ${storageDirectory()}`;
  if (storage?.settings !== settings) {
    const store = env.S3_BUCKET
      ? createS3FileStorage(
          createS3Client({
            region: env.S3_REGION,
            endpoint: env.S3_ENDPOINT,
            credentials:
              env.S3_ACCESS_KEY_ID && env.S3_SECRET_ACCESS_KEY
                ? { accessKeyId: env.S3_ACCESS_KEY_ID, secretAccessKey: env.S3_SECRET_ACCESS_KEY }
                : undefined,
          }),
          env.S3_BUCKET,
        )
      : createFsFileStorage(storageDirectory());
    storage = { settings, store };
  }
  return storage.store;
}

/** The type a file's first bytes announce (JPEG SOI marker, PNG signature, RIFF…WEBP), or null. */
export function sniffPhotoType(head: Uint8Array): PhotoType | null {
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return "image/jpeg";
  const png = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a];
  if (head.length >= 8 && png.every((byte, i) => head[i] === byte)) return "image/png";
  const ascii = (from: number, to: number) => String.fromCharCode(...head.subarray(from, to));
  if (head.length >= 12 && ascii(0, 4) === "RIFF" && ascii(8, 12) === "WEBP") return "image/webp";
  return null;
}

type StoredPhoto = { storageKey: string; contentType: PhotoType; bytes: number; originalName: string | null };

/** The photos of the student's drop log for a lab, and the bytes of all their photos in the course: one statement. */
async function photoUsage(executor: Executor, { labId, membershipId }: { labId: string; membershipId: string }) {
  const [usage] = await executor
    .select({
      dropLogPhotos: sql<number>`count(*) filter (where ${dropLogs.labId} = ${labId})`.mapWith(Number),
      studentBytes: sql<number>`coalesce(sum(${dropLogPhotos.bytes}), 0)`.mapWith(Number),
    })
    .from(dropLogPhotos)
    .innerJoin(dropLogs, eq(dropLogs.id, dropLogPhotos.dropLogId))
    .where(eq(dropLogs.membershipId, membershipId));
  return usage;
}

const megabytes = (bytes: number) => `${Math.round(bytes / (1024 * 1024))} MB`;

/** Refuses photos that would take the drop log or the student past their caps; `adding` empty asks whether any more fit. */
function refuseOverCaps(usage: { dropLogPhotos: number; studentBytes: number }, adding: StoredPhoto[]) {
  const count = Math.max(adding.length, 1);
  const bytes = Math.max(
    adding.reduce((sum, photo) => sum + photo.bytes, 0),
    1,
  );
  if (usage.dropLogPhotos + count > MAX_PHOTOS_PER_DROP_LOG) {
    const left = MAX_PHOTOS_PER_DROP_LOG - usage.dropLogPhotos;
    throw uploadRefusal(
      409,
      `A drop log keeps at most ${MAX_PHOTOS_PER_DROP_LOG} photos; this one has ${usage.dropLogPhotos}${left > 0 ? `, so send at most ${left} more` : ""}.`,
    );
  }
  if (usage.studentBytes + bytes > MAX_PHOTO_BYTES_PER_STUDENT) {
    throw uploadRefusal(
      409,
      `Your photos in this course may take up ${megabytes(MAX_PHOTO_BYTES_PER_STUDENT)} in all, and ${megabytes(usage.studentBytes)} are used: send smaller photos.`,
    );
  }
}

/**
 * A student's upload to their draft, refused before a byte is read when the lab takes no more hand-ins
 * from them, when they upload too often or when the drop log is full. The photos are streamed to
 * storage first, then the drop log (created when there is none) and its photo rows are written in one
 * transaction that re-checks the caps under a per-student lock, so two uploads at once cannot both
 * squeeze past them. A refusal leaves no row behind and removes the files.
 */
export async function uploadDraftPhotos(
  database: Database,
  { access, context, request, now = new Date() }: { access: CourseAccess; context: StudentLab; request: Request; now?: Date },
) {
  refuseWhenClosed(context, now);
  const owner = { labId: context.lab.id, membershipId: access.membership.id };
  const limit = await consume("photo-upload", access.user.id);
  if (limit.limited)
    throw uploadRefusal(429, "You have uploaded many photos in a short time; wait a few minutes and try again.", limit.retryAfterSeconds);
  refuseOverCaps(await photoUsage(database, owner), []);
  const stored = await receivePhotos(request, `${owner.labId}/${owner.membershipId}`);
  try {
    return await database.transaction(async (tx) => {
      // Raw: an advisory lock has no query-builder form.
      await tx.execute(sql`select pg_advisory_xact_lock(hashtextextended(${`photos:${owner.membershipId}`}, 0))`);
      refuseOverCaps(await photoUsage(tx, owner), stored);
      return recordPhotos(tx, await ensureDropLog(tx, owner), stored);
    });
  } catch (error) {
    await removeStored(stored);
    throw error;
  }
}

/**
 * Reads a multipart upload as it streams in: the parser stops any part over MAX_PHOTO_BYTES before it is kept,
 * and each file is checked by its bytes before it is written, under `keyPrefix`. Returns the files
 * stored; the caller records them or removes them.
 */
async function receivePhotos(request: Request, keyPrefix: string): Promise<StoredPhoto[]> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) throw uploadRefusal(400, "Send the photos as a multipart/form-data upload.");
  const declared = Number(request.headers.get("content-length") ?? 0);
  // Refused before a byte is read when the body says it is bigger than the most we would take.
  if (declared > MAX_PHOTO_UPLOAD_BYTES) throw uploadRefusal(413, `That upload is too large: at most ${MAX_PHOTO_MEGABYTES} MB per photo.`);

  const stored: StoredPhoto[] = [];
  const refused: AppError[] = [];
  const handle = async (file: FileUpload) => {
    if (file.fieldName !== "photo" || file.size === 0) return null;
    const head = new Uint8Array(await file.slice(0, 16).arrayBuffer());
    const sniffed = sniffPhotoType(head);
    if (!sniffed) {
      refused.push(uploadRefusal(415, `${file.name || "That file"} is not a JPEG, PNG or WebP photo.`));
      return null;
    }
    const storageKey = `${keyPrefix}/${randomUUID()}`;
    try {
      await storePhoto(storageKey, file);
    } catch (error) {
      logger.error({ err: error, storageKey }, "The photo store refused a photo");
      throw uploadRefusal(503, "Photos cannot be stored just now; nothing was kept. Try again in a few minutes.", 60);
    }
    stored.push({ storageKey, contentType: sniffed, bytes: file.size, originalName: file.name ? file.name.slice(0, 200) : null });
    return null;
  };
  try {
    // The total too, for a body sent without its length (chunked).
    await parseFormData(
      request,
      { maxFileSize: MAX_PHOTO_BYTES, maxFiles: MAX_PHOTOS_PER_UPLOAD, maxTotalSize: MAX_PHOTO_UPLOAD_BYTES },
      handle,
    );
  } catch (error) {
    await removeStored(stored);
    if (error instanceof AppError) throw error;
    if (error instanceof MaxFileSizeExceededError || error instanceof MaxTotalSizeExceededError) {
      throw uploadRefusal(
        413,
        `That photo is larger than ${MAX_PHOTO_MEGABYTES} MB; send a smaller one (most phones can share a reduced size).`,
      );
    }
    if (error instanceof MaxFilesExceededError) throw uploadRefusal(400, `Send at most ${MAX_PHOTOS_PER_UPLOAD} photos at a time.`);
    throw uploadRefusal(400, "The upload could not be read; try again.");
  }
  if (refused.length) {
    await removeStored(stored);
    throw refused[0];
  }
  if (stored.length === 0) throw uploadRefusal(400, "Choose a photo to upload.");
  return stored;
}

async function removeStored(stored: StoredPhoto[]) {
  await Promise.all(stored.map((photo) => photoStorage().remove(photo.storageKey)));
}

async function recordPhotos(executor: Executor, dropLogId: string, photos: StoredPhoto[]) {
  return executor
    .insert(dropLogPhotos)
    .values(photos.map((photo) => ({ dropLogId, ...photo })))
    .returning({
      id: dropLogPhotos.id,
      contentType: dropLogPhotos.contentType,
      bytes: dropLogPhotos.bytes,
      originalName: dropLogPhotos.originalName,
    });
}

/** A photo of the course with its owner, for the download route's access check. */
export async function findPhoto(executor: Executor, courseId: string, photoId: string) {
  const [photo] = await executor
    .select({
      storageKey: dropLogPhotos.storageKey,
      contentType: dropLogPhotos.contentType,
      bytes: dropLogPhotos.bytes,
      ownerUserId: courseMemberships.userId,
      ownerCohortId: courseMemberships.cohortId,
    })
    .from(dropLogPhotos)
    .innerJoin(dropLogs, eq(dropLogs.id, dropLogPhotos.dropLogId))
    .innerJoin(labs, eq(labs.id, dropLogs.labId))
    .innerJoin(courseMemberships, eq(courseMemberships.id, dropLogs.membershipId))
    .where(and(eq(dropLogPhotos.id, photoId), eq(labs.courseId, courseId)));
  return photo ?? null;
}

/**
 * Removes a photo from the student's own draft (never one a hand-in has attached to its version): the
 * row first, then the stored object. An object the store fails to delete is logged and left, unseen:
 * the photo is gone from the draft either way. False when the student has no such draft photo.
 */
export async function removeDraftPhoto(database: Database, access: CourseAccess, photoId: string): Promise<boolean> {
  const [removed] = await database
    .delete(dropLogPhotos)
    .where(
      and(
        eq(dropLogPhotos.id, photoId),
        isNull(dropLogPhotos.versionId),
        inArray(
          dropLogPhotos.dropLogId,
          database.select({ id: dropLogs.id }).from(dropLogs).where(eq(dropLogs.membershipId, access.membership.id)),
        ),
      ),
    )
    .returning({ storageKey: dropLogPhotos.storageKey });
  if (!removed) return false;
  try {
    await photoStorage().remove(removed.storageKey);
  } catch (error) {
    logger.error({ err: error, storageKey: removed.storageKey }, "A removed photo's object could not be deleted");
  }
  return true;
}

export async function storePhoto(storageKey: string, file: File) {
  await photoStorage().set(storageKey, file);
}

export async function readPhoto(storageKey: string) {
  return photoStorage().get(storageKey);
}
