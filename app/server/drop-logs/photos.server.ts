/**
 * Photos of a student's set-up: checked by their content (not their name or the browser's word),
 * kept in a folder outside the web root, and listed in drop_log_photos. They hang on the drop log's
 * draft until a hand-in attaches them to the version it creates.
 */
import { randomUUID } from "node:crypto";
import path from "node:path";
import { createFsFileStorage } from "@remix-run/file-storage/fs";
import { MaxFileSizeExceededError, MaxFilesExceededError, MaxTotalSizeExceededError, parseFormData, type FileUpload } from "@remix-run/form-data-parser";
import { and, eq } from "drizzle-orm";
import { courseMemberships, dropLogPhotos, dropLogs, labs } from "~/db/schema";
import type { Executor } from "~/server/db.server";
import { environment } from "~/server/env.server";

export const MAX_PHOTO_BYTES = 10 * 1024 * 1024;
export const MAX_PHOTOS_PER_UPLOAD = 6;
export const photoTypes = ["image/jpeg", "image/png", "image/webp"] as const;
export type PhotoType = (typeof photoTypes)[number];

/** A refused upload, with the HTTP status that names why (413 too large, 415 not a photo, 400 malformed). */
export class PhotoUploadError extends Error {
  constructor(
    readonly status: 400 | 413 | 415,
    message: string,
  ) {
    super(message);
    this.name = "PhotoUploadError";
  }
}

/** `STORAGE_DIR`, or `storage/` in the checkout (git-ignored); never under `public/`. */
export function storageDirectory(): string {
  return path.resolve(environment().STORAGE_DIR ?? path.join(process.cwd(), "storage"), "photos");
}

let storage: ReturnType<typeof createFsFileStorage> | undefined;
let storageRoot: string | undefined;
function photoStorage() {
  const root = storageDirectory();
  // Re-created when the directory changes (tests point STORAGE_DIR at a folder of their own).
  if (!storage || storageRoot !== root) {
    storage = createFsFileStorage(root);
    storageRoot = root;
  }
  return storage;
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

/**
 * Reads a multipart upload as it streams in: the parser stops any part over 10 MB before it is kept,
 * and each file is checked by its bytes before it is written. Returns the files stored; the caller
 * records them in the same breath.
 */
export async function receivePhotos(request: Request, dropLogId: string): Promise<StoredPhoto[]> {
  const type = request.headers.get("content-type") ?? "";
  if (!type.startsWith("multipart/form-data")) throw new PhotoUploadError(400, "Send the photos as a multipart/form-data upload.");
  const declared = Number(request.headers.get("content-length") ?? 0);
  // Refused before a byte is read when the body says it is bigger than the most we would take.
  if (declared > MAX_PHOTO_BYTES * MAX_PHOTOS_PER_UPLOAD + 1024 * 1024) throw new PhotoUploadError(413, "That upload is too large: at most 10 MB per photo.");

  const stored: StoredPhoto[] = [];
  const refused: PhotoUploadError[] = [];
  const handle = async (file: FileUpload) => {
    if (file.fieldName !== "photo" || file.size === 0) return null;
    const head = new Uint8Array(await file.slice(0, 16).arrayBuffer());
    const sniffed = sniffPhotoType(head);
    if (!sniffed) {
      refused.push(new PhotoUploadError(415, `${file.name || "That file"} is not a JPEG, PNG or WebP photo.`));
      return null;
    }
    const storageKey = `${dropLogId}/${randomUUID()}`;
    await storePhoto(storageKey, file);
    stored.push({ storageKey, contentType: sniffed, bytes: file.size, originalName: file.name ? file.name.slice(0, 200) : null });
    return null;
  };
  try {
    await parseFormData(request, { maxFileSize: MAX_PHOTO_BYTES, maxFiles: MAX_PHOTOS_PER_UPLOAD }, handle);
  } catch (error) {
    await removeStored(stored);
    if (error instanceof MaxFileSizeExceededError || error instanceof MaxTotalSizeExceededError) {
      throw new PhotoUploadError(413, "That photo is larger than 10 MB; send a smaller one (most phones can share a reduced size).");
    }
    if (error instanceof MaxFilesExceededError) throw new PhotoUploadError(400, `Send at most ${MAX_PHOTOS_PER_UPLOAD} photos at a time.`);
    throw new PhotoUploadError(400, "The upload could not be read; try again.");
  }
  if (refused.length) {
    await removeStored(stored);
    throw refused[0];
  }
  if (stored.length === 0) throw new PhotoUploadError(400, "Choose a photo to upload.");
  return stored;
}

async function removeStored(stored: StoredPhoto[]) {
  await Promise.all(stored.map((photo) => photoStorage().remove(photo.storageKey)));
}

export async function recordPhotos(executor: Executor, dropLogId: string, photos: StoredPhoto[]) {
  return executor
    .insert(dropLogPhotos)
    .values(photos.map((photo) => ({ dropLogId, ...photo })))
    .returning({ id: dropLogPhotos.id, contentType: dropLogPhotos.contentType, bytes: dropLogPhotos.bytes, originalName: dropLogPhotos.originalName });
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

export async function storePhoto(storageKey: string, file: File) {
  await photoStorage().set(storageKey, file);
}

export async function readPhoto(storageKey: string) {
  return photoStorage().get(storageKey);
}
