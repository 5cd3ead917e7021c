/**
 * The local S3-compatible fake (s3rver, from the registry), which `npm start`, the browser tests, the
 * photo storage test and the production test start as they start the mail catcher: photos take the
 * same path through the S3 SDK in development as in production. It keeps objects in `directory`.
 */
import S3rver from "s3rver";

/** The bucket `npm start` and the tests keep photos in. */
export const FAKE_S3_BUCKET = "benchpost-photos";

/** s3rver checks signatures against this pair; any S3 client configured with it is let in. */
export const FAKE_S3_CREDENTIALS = { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" };

export async function startFakeS3(options: { port: number; directory: string; bucket: string; host?: string }) {
  const host = options.host ?? "127.0.0.1";
  const server = new S3rver({
    address: host,
    port: options.port,
    directory: options.directory,
    silent: true,
    configureBuckets: [{ name: options.bucket }],
  });
  const { port } = await server.run();
  return {
    endpoint: `http://${host}:${port}`,
    /** The environment that points the app's photo storage here. */
    environment: {
      S3_ENDPOINT: `http://${host}:${port}`,
      S3_BUCKET: options.bucket,
      S3_ACCESS_KEY_ID: FAKE_S3_CREDENTIALS.accessKeyId,
      S3_SECRET_ACCESS_KEY: FAKE_S3_CREDENTIALS.secretAccessKey,
    },
    close: () => server.close(),
  };
}
