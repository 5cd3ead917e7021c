/**
 * Photos in S3-compatible object storage through the official SDK, behind the same `FileStorage`
 * interface as the local-disk store (`@remix-run/file-storage`), so the photo code does not know which
 * one it writes to. Any service that speaks S3 works: set S3_ENDPOINT for one that is not AWS.
 */
import {
  DeleteObjectCommand,
  GetObjectCommand,
  HeadObjectCommand,
  ListObjectsV2Command,
  NoSuchKey,
  NotFound,
  PutObjectCommand,
  S3Client,
  S3ServiceException,
} from "@aws-sdk/client-s3";
import type { FileStorage, ListOptions, ListResult } from "@remix-run/file-storage";

export type S3Settings = {
  region: string;
  /** An S3-compatible service's address; unset, AWS's own. */
  endpoint?: string;
  /** Unset, the SDK's own chain (environment, instance role). */
  credentials?: { accessKeyId: string; secretAccessKey: string };
};

export function createS3Client(settings: S3Settings): S3Client {
  return new S3Client({
    region: settings.region,
    endpoint: settings.endpoint,
    // Services other than AWS (and the local fake) address buckets by path, not by host name.
    forcePathStyle: Boolean(settings.endpoint),
    credentials: settings.credentials,
    // Checksums only where S3 requires them: several S3-compatible services refuse the newer headers.
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
    maxAttempts: 3,
  });
}

const missing = (error: unknown) => error instanceof NoSuchKey || error instanceof NotFound;

export function createS3FileStorage(client: S3Client, bucket: string): FileStorage {
  const storage: FileStorage = {
    async get(key) {
      try {
        const object = await client.send(new GetObjectCommand({ Bucket: bucket, Key: key }));
        // Photos are at most 10 MB: held whole, so that a File's size and slices are exact.
        const bytes = Buffer.from(await object.Body!.transformToByteArray());
        return new File([bytes], key.split("/").pop()!, {
          type: object.ContentType ?? "application/octet-stream",
          lastModified: object.LastModified?.getTime(),
        });
      } catch (error) {
        if (missing(error)) return null;
        throw error;
      }
    },
    async has(key) {
      try {
        await client.send(new HeadObjectCommand({ Bucket: bucket, Key: key }));
        return true;
      } catch (error) {
        if (missing(error) || (error instanceof S3ServiceException && error.$metadata.httpStatusCode === 404)) return false;
        throw error;
      }
    },
    async set(key, file) {
      await client.send(
        new PutObjectCommand({
          Bucket: bucket,
          Key: key,
          Body: new Uint8Array(await file.arrayBuffer()),
          ContentType: file.type || "application/octet-stream",
        }),
      );
    },
    async put(key, file) {
      await storage.set(key, file);
      return (await storage.get(key))!;
    },
    async remove(key) {
      // S3 answers a delete of a missing key with success, as the disk store does.
      await client.send(new DeleteObjectCommand({ Bucket: bucket, Key: key }));
    },
    async list<T extends ListOptions>(options?: T): Promise<ListResult<T>> {
      const page = await client.send(
        new ListObjectsV2Command({ Bucket: bucket, Prefix: options?.prefix, MaxKeys: options?.limit, ContinuationToken: options?.cursor }),
      );
      const files = (page.Contents ?? []).map((object) =>
        options?.includeMetadata
          ? { key: object.Key!, lastModified: object.LastModified?.getTime() ?? 0, name: object.Key!.split("/").pop()!, size: object.Size ?? 0, type: "" }
          : { key: object.Key! },
      );
      return { cursor: page.NextContinuationToken, files } as ListResult<T>;
    },
  };
  return storage;
}
