/**
 * Size limits on what a request may carry: sign-in passwords (PASSWORD_MAX_LENGTH characters), JSON
 * bodies (MAX_JSON_BYTES) and forms (MAX_FORM_BYTES) answered 413, with or without a declared length;
 * set-up photos keep their own, larger cap.
 */
import { mkdtemp } from "node:fs/promises";
import { tmpdir } from "node:os";
import path from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { PASSWORD_MAX_LENGTH } from "~/lib/auth/password-policy";
import { MAX_FORM_BYTES, MAX_JSON_BYTES } from "~/server/body-limits.server";
import { appOrigin, appRequest, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, createAccessFixture } from "../support/access-fixture";

let fixture: AccessFixture;
let handle: AppHandler;
const cookies: Record<string, string> = {};

beforeAll(async () => {
  process.env.STORAGE_DIR = await mkdtemp(path.join(tmpdir(), "benchpost-size-limits-"));
  handle = await createAppHandler();
  fixture = await createAccessFixture("size-limits");
  for (const actor of ["ownStudent", "instructor"] as const) cookies[actor] = await sessionCookieFor(fixture.userIds[actor]);
});

describe("sign-in passwords", () => {
  const signIn = (password: string) =>
    handle(appRequest("/sign-in", { form: { intent: "password", email: "instructor@size-limits.example", password } }));

  it(`refuses one longer than ${PASSWORD_MAX_LENGTH} characters with 400 at the field, before it is checked`, async () => {
    const response = await signIn("x".repeat(PASSWORD_MAX_LENGTH + 1));
    expect(response.status).toBe(400);
    expect(await response.text()).toContain(`at most ${PASSWORD_MAX_LENGTH} characters`);
  });

  it(`checks one of ${PASSWORD_MAX_LENGTH} characters as usual (a wrong one is 401)`, async () => {
    expect((await signIn("x".repeat(PASSWORD_MAX_LENGTH))).status).toBe(401);
  });
});

/** `bytes` of JSON, e.g. a reduce call padded with a long unknown field. */
const jsonOf = (bytes: number) => {
  const start = '{"pad":"';
  return `${start}${"x".repeat(bytes - start.length - 2)}"}`;
};

describe("JSON bodies", () => {
  const reduce = (body: string, declareLength: boolean) =>
    handle(
      new Request(new URL("/api/v1/reduce", appOrigin()), {
        method: "POST",
        body,
        headers: {
          "Content-Type": "application/json",
          Origin: appOrigin(),
          Cookie: cookies.instructor,
          ...(declareLength ? { "Content-Length": String(Buffer.byteLength(body)) } : {}),
        },
      }),
    );

  it.each([
    ["with its length declared", true],
    ["sent without a length", false],
  ])(`answers one byte over ${MAX_JSON_BYTES} bytes with 413 in the API's error shape, %s`, async (_, declareLength) => {
    const response = await reduce(jsonOf(MAX_JSON_BYTES + 1), declareLength);
    expect(response.status).toBe(413);
    expect((await response.json()).error).toMatchObject({ code: "payload_too_large" });
  });

  it("reads one at the limit (and refuses its content as usual)", async () => {
    const response = await reduce(jsonOf(MAX_JSON_BYTES), false);
    expect(response.status).toBe(400);
    expect((await response.json()).error.code).toBe("invalid_input");
  });
});

describe("forms", () => {
  const settingsPath = () => `/courses/${fixture.courseId}/settings`;

  it(`answers a URL-encoded form over ${MAX_FORM_BYTES} bytes with the 413 page`, async () => {
    const response = await handle(
      appRequest(settingsPath(), { cookie: cookies.instructor, form: { intent: "details", title: "x".repeat(MAX_FORM_BYTES) } }),
    );
    expect(response.status).toBe(413);
    expect(await response.text()).toContain("That was too much to send at once");
  });

  it("answers a large multipart form to a page other than the photo upload with 413", async () => {
    const form = new FormData();
    form.append("title", new File([new Uint8Array(MAX_FORM_BYTES + 1)], "big.bin"));
    const response = await handle(
      new Request(new URL(settingsPath(), appOrigin()), {
        method: "POST",
        body: form,
        headers: { Cookie: cookies.instructor, Origin: appOrigin() },
      }),
    );
    expect(response.status).toBe(413);
  });

  it("still takes a photo larger than a form's limit on the photo upload", async () => {
    const photo = new Uint8Array(MAX_FORM_BYTES + 1024);
    photo.set([0xff, 0xd8, 0xff, 0xe0]);
    const form = new FormData();
    form.append("photo", new File([photo], "column.jpg", { type: "image/jpeg" }));
    const response = await handle(
      new Request(new URL(`/courses/${fixture.courseId}/labs/${fixture.labId}/photos`, appOrigin()), {
        method: "POST",
        body: form,
        headers: { Cookie: cookies.ownStudent, Origin: appOrigin() },
      }),
    );
    expect(response.status).toBe(200);
  });
});
