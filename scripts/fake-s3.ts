/**
 * `npx tsx scripts/fake-s3.ts`: the local S3-compatible fake (s3rver) on 127.0.0.1:1027 (FAKE_S3_PORT
 * overrides), keeping its objects under STORAGE_DIR/s3 (default storage/s3, git-ignored) so that the
 * demo's photos outlive a restart. Started by `npm start` when no S3_BUCKET of the user's is set.
 */
import { mkdir } from "node:fs/promises";
import path from "node:path";
import { env } from "./lib/checked-environment";
import { FAKE_S3_BUCKET, startFakeS3 } from "~/server/storage/fake-s3.server";

const directory = path.resolve(env.STORAGE_DIR ?? "storage", "s3");
await mkdir(directory, { recursive: true });
const s3 = await startFakeS3({ port: env.FAKE_S3_PORT, directory, bucket: FAKE_S3_BUCKET });
console.log(`Fake S3 listening on ${s3.endpoint} (bucket ${FAKE_S3_BUCKET}, objects in ${directory})`);

const stop = async () => {
  await s3.close();
  process.exit(0);
};
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
