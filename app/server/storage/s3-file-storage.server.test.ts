/**
 * The photo store's answers to S3's error replies, through the real SDK against msw. The error bodies
 * follow the S3 API reference's error response (an XML <Error> with Code and Message); the codes used
 * are S3's documented ones (SlowDown 503, NoSuchKey 404, AccessDenied 403, InternalError 500).
 */
import { http, HttpResponse } from "msw";
import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { createS3Client, createS3FileStorage } from "./s3-file-storage.server";

const ENDPOINT = "http://s3.mock.test";
const objectUrl = `${ENDPOINT}/photos/lab/student/photo-1`;
const s3Error = (status: number, code: string, message: string) =>
  new HttpResponse(`<?xml version="1.0" encoding="UTF-8"?><Error><Code>${code}</Code><Message>${message}</Message><RequestId>r1</RequestId></Error>`, {
    status,
    headers: { "Content-Type": "application/xml" },
  });

const network = setupServer();
let requests: string[] = [];
network.events.on("request:start", ({ request }) => requests.push(`${request.method} ${new URL(request.url).pathname}`));
const store = createS3FileStorage(
  createS3Client({ region: "us-east-1", endpoint: ENDPOINT, credentials: { accessKeyId: "test", secretAccessKey: "test" } }),
  "photos",
);
const photo = () => new File([new Uint8Array([0x89, 0x50, 0x4e, 0x47])], "set-up.png", { type: "image/png" });

beforeAll(() => network.listen({ onUnhandledRequest: "error" }));
afterEach(() => {
  network.resetHandlers();
  requests = [];
});
afterAll(() => network.close());

describe("the S3 photo store", () => {
  it("puts a photo with its type, and gets the same bytes back", async () => {
    let stored: { type: string | null; bytes: Uint8Array } | undefined;
    network.use(
      http.put(objectUrl, async ({ request }) => {
        stored = { type: request.headers.get("content-type"), bytes: new Uint8Array(await request.arrayBuffer()) };
        return new HttpResponse(null, { status: 200, headers: { ETag: '"e1"' } });
      }),
      http.get(objectUrl, () => new HttpResponse(stored!.bytes, { headers: { "Content-Type": stored!.type!, "Content-Length": "4" } })),
    );
    await store.set("lab/student/photo-1", photo());
    expect(stored).toEqual({ type: "image/png", bytes: new Uint8Array([0x89, 0x50, 0x4e, 0x47]) });
    const file = await store.get("lab/student/photo-1");
    expect(file?.type).toBe("image/png");
    expect(new Uint8Array(await file!.arrayBuffer())).toEqual(stored!.bytes);
  });

  it("tries a throttled put again, and gives up with S3's error after three attempts", async () => {
    let attempts = 0;
    network.use(http.put(objectUrl, () => (++attempts === 1 ? s3Error(503, "SlowDown", "Please reduce your request rate.") : new HttpResponse(null))));
    await store.set("lab/student/photo-1", photo());
    expect(attempts).toBe(2);

    network.use(http.put(objectUrl, () => s3Error(503, "SlowDown", "Please reduce your request rate.")));
    requests = [];
    await expect(store.set("lab/student/photo-1", photo())).rejects.toMatchObject({ name: "SlowDown" });
    expect(requests).toEqual(Array(3).fill("PUT /photos/lab/student/photo-1"));
  });

  it("reads a missing object as no photo, but refused access as an error, asked once", async () => {
    network.use(http.get(objectUrl, () => s3Error(404, "NoSuchKey", "The specified key does not exist.")));
    await expect(store.get("lab/student/photo-1")).resolves.toBeNull();

    network.use(http.get(objectUrl, () => s3Error(403, "AccessDenied", "Access Denied")));
    requests = [];
    await expect(store.get("lab/student/photo-1")).rejects.toMatchObject({ name: "AccessDenied" });
    expect(requests).toEqual(["GET /photos/lab/student/photo-1"]);
  });

  it("answers has() from HEAD, where S3 sends a 404 without a body", async () => {
    network.use(http.head(objectUrl, () => new HttpResponse(null, { status: 404 })));
    await expect(store.has("lab/student/photo-1")).resolves.toBe(false);
    network.use(http.head(objectUrl, () => new HttpResponse(null, { status: 200, headers: { "Content-Length": "4" } })));
    await expect(store.has("lab/student/photo-1")).resolves.toBe(true);
  });

  it("deletes an object, and reports a delete the service keeps failing", async () => {
    network.use(http.delete(objectUrl, () => new HttpResponse(null, { status: 204 })));
    await expect(store.remove("lab/student/photo-1")).resolves.toBeUndefined();

    network.use(http.delete(objectUrl, () => s3Error(500, "InternalError", "We encountered an internal error. Please try again.")));
    await expect(store.remove("lab/student/photo-1")).rejects.toMatchObject({ name: "InternalError" });
  });
});
