/**
 * /api/v1 against its own OpenAPI document: every documented route and every answer it documents is
 * requested through the built app, and the body is checked against the document's JSON Schema
 * (draft 2020-12, with Ajv). A documented answer without a case here fails the test.
 */
import { randomUUID } from "node:crypto";
import { Ajv2020 } from "ajv/dist/2020.js";
import { beforeAll, describe, expect, it } from "vitest";
import { apiOperations } from "~/server/api/openapi.server";
import type { CourseAccess } from "~/server/auth/access.server";
import { db } from "~/server/db.server";
import { loadMarkingLab } from "~/server/marking/marking-lab.server";
import { saveMarkCell } from "~/server/marking/marks.server";
import { saveRubric } from "~/server/marking/rubrics.server";
import { appOrigin, createAppHandler, sessionCookieFor, type AppHandler } from "../support/app-requests";
import { type AccessFixture, type Actor, createAccessFixture } from "../support/access-fixture";

let handle: AppHandler;
let fixture: AccessFixture;
let document: { paths: Record<string, Record<string, { responses: Record<string, { content: Record<string, { schema: unknown }> }> }>> };
let ajv: Ajv2020;

type Case = { actor: Actor; path: (fixture: AccessFixture) => string; body?: unknown; headers?: Record<string, string> };

const lab = (f: AccessFixture) => `/api/v1/labs/${f.labId}`;
const missing = randomUUID();
const engineInput = {
  mode: "viscometry",
  sphere: { diameter: 0.003, mass: 1.1e-4 },
  fluid: { density: 1260 },
  column: { timedDistance: 0.2, innerDiameter: 0.04 },
  drops: [7.41, 7.52, 7.47],
};
const handInKey = `api-test-${randomUUID()}`;
const dropLog = { sphereId: "", temperatureC: 22, drops: [7.4, 7.5, 7.45, 7.52, 7.39] };

/** One request per documented answer, keyed `METHOD path status`. Order matters where a case builds on one before (201 then 200). */
const cases: Record<string, Case> = {
  "get /api/v1/me 200": { actor: "instructor", path: () => "/api/v1/me" },
  "get /api/v1/me 401": { actor: "anonymous", path: () => "/api/v1/me" },
  "get /api/v1/courses/{courseId}/labs 200": { actor: "ownStudent", path: (f) => `/api/v1/courses/${f.courseId}/labs` },
  "get /api/v1/courses/{courseId}/labs 401": { actor: "anonymous", path: (f) => `/api/v1/courses/${f.courseId}/labs` },
  "get /api/v1/courses/{courseId}/labs 403": { actor: "otherInstructor", path: (f) => `/api/v1/courses/${f.courseId}/labs` },
  "get /api/v1/courses/{courseId}/labs 404": { actor: "instructor", path: () => `/api/v1/courses/${missing}/labs` },
  "get /api/v1/labs/{labId}/drop-logs 200": { actor: "instructor", path: (f) => `${lab(f)}/drop-logs` },
  "get /api/v1/labs/{labId}/drop-logs 401": { actor: "anonymous", path: (f) => `${lab(f)}/drop-logs` },
  "get /api/v1/labs/{labId}/drop-logs 403": { actor: "otherCohortStudent", path: (f) => `${lab(f)}/drop-logs` },
  "get /api/v1/labs/{labId}/drop-logs 404": { actor: "instructor", path: () => `/api/v1/labs/${missing}/drop-logs` },
  "post /api/v1/labs/{labId}/drop-logs 201": {
    actor: "ownStudent",
    path: (f) => `${lab(f)}/drop-logs`,
    body: dropLog,
    headers: { "Idempotency-Key": handInKey },
  },
  "post /api/v1/labs/{labId}/drop-logs 200": {
    actor: "ownStudent",
    path: (f) => `${lab(f)}/drop-logs`,
    body: dropLog,
    headers: { "Idempotency-Key": handInKey },
  },
  "post /api/v1/labs/{labId}/drop-logs 400": {
    actor: "ownStudent",
    path: (f) => `${lab(f)}/drop-logs`,
    body: { ...dropLog, drops: [-1] },
    headers: { "Idempotency-Key": randomUUID() },
  },
  "post /api/v1/labs/{labId}/drop-logs 401": { actor: "anonymous", path: (f) => `${lab(f)}/drop-logs`, body: dropLog },
  "post /api/v1/labs/{labId}/drop-logs 403": {
    actor: "instructor",
    path: (f) => `${lab(f)}/drop-logs`,
    body: dropLog,
    headers: { "Idempotency-Key": randomUUID() },
  },
  "post /api/v1/labs/{labId}/drop-logs 404": {
    actor: "ownStudent",
    path: () => `/api/v1/labs/${missing}/drop-logs`,
    body: dropLog,
    headers: { "Idempotency-Key": randomUUID() },
  },
  // sameCohortStudent holds no kit, so there is nothing to reduce against.
  "post /api/v1/labs/{labId}/drop-logs 409": {
    actor: "sameCohortStudent",
    path: (f) => `${lab(f)}/drop-logs`,
    body: dropLog,
    headers: { "Idempotency-Key": randomUUID() },
  },
  "get /api/v1/labs/{labId}/drop-logs/{dropLogId} 200": { actor: "assignedTa", path: (f) => `${lab(f)}/drop-logs/${f.dropLogId}` },
  "get /api/v1/labs/{labId}/drop-logs/{dropLogId} 401": { actor: "anonymous", path: (f) => `${lab(f)}/drop-logs/${f.dropLogId}` },
  "get /api/v1/labs/{labId}/drop-logs/{dropLogId} 403": { actor: "sameCohortStudent", path: (f) => `${lab(f)}/drop-logs/${f.dropLogId}` },
  "get /api/v1/labs/{labId}/drop-logs/{dropLogId} 404": { actor: "ownStudent", path: (f) => `${lab(f)}/drop-logs/${missing}` },
  "get /api/v1/labs/{labId}/class-comparison 200": { actor: "instructor", path: (f) => `${lab(f)}/class-comparison` },
  "get /api/v1/labs/{labId}/class-comparison 400": { actor: "instructor", path: (f) => `${lab(f)}/class-comparison?label=purple` },
  "get /api/v1/labs/{labId}/class-comparison 401": { actor: "anonymous", path: (f) => `${lab(f)}/class-comparison` },
  "get /api/v1/labs/{labId}/class-comparison 403": { actor: "ownStudent", path: (f) => `${lab(f)}/class-comparison` },
  "get /api/v1/labs/{labId}/class-comparison 404": { actor: "instructor", path: () => `/api/v1/labs/${missing}/class-comparison` },
  // The TA of cohort one: the fixture's rubric and ownStudent's mark (below), the cohort's other student unmarked.
  "get /api/v1/labs/{labId}/marks 200": { actor: "assignedTa", path: (f) => `${lab(f)}/marks` },
  "get /api/v1/labs/{labId}/marks 401": { actor: "anonymous", path: (f) => `${lab(f)}/marks` },
  "get /api/v1/labs/{labId}/marks 403": { actor: "ownStudent", path: (f) => `${lab(f)}/marks` },
  "get /api/v1/labs/{labId}/marks 404": { actor: "instructor", path: () => `/api/v1/labs/${missing}/marks` },
  "post /api/v1/reduce 200": { actor: "otherInstructor", path: () => "/api/v1/reduce", body: engineInput },
  "post /api/v1/reduce 400": { actor: "ownStudent", path: () => "/api/v1/reduce", body: { ...engineInput, drops: "7.4" } },
  "post /api/v1/reduce 401": { actor: "anonymous", path: () => "/api/v1/reduce", body: engineInput },
  // The lab preview is a student's own; staff are refused.
  "post /api/v1/reduce 403": { actor: "instructor", path: () => "/api/v1/reduce", body: { labId: "", input: dropLog } },
  "post /api/v1/reduce 404": { actor: "ownStudent", path: () => "/api/v1/reduce", body: { labId: missing, input: dropLog } },
  "post /api/v1/reduce 409": { actor: "sameCohortStudent", path: () => "/api/v1/reduce", body: { labId: "", input: dropLog } },
  "get /api/v1/openapi.json 200": { actor: "anonymous", path: () => "/api/v1/openapi.json" },
};

/** Fills the fixture's ids into bodies that need them (the sphere of ownStudent's kit, the lab). */
function bodyFor(body: unknown): unknown {
  if (body === dropLog) return { ...dropLog, sphereId: fixture.sphereId };
  const preview = body as { labId?: string; input?: unknown } | undefined;
  if (preview?.labId === "") return { labId: fixture.labId, input: bodyFor(preview.input) };
  return body;
}

async function send(method: string, entry: Case): Promise<Response> {
  const headers = new Headers(entry.headers);
  if (entry.actor !== "anonymous") headers.set("Cookie", await sessionCookieFor(fixture.userIds[entry.actor]));
  const init: RequestInit = { method: method.toUpperCase(), headers };
  if (method === "post") {
    headers.set("Origin", appOrigin());
    headers.set("Content-Type", "application/json");
    init.body = JSON.stringify(bodyFor(entry.body));
  }
  return handle(new Request(new URL(entry.path(fixture), appOrigin()), init));
}

/** A rubric on the fixture's lab and a mark for ownStudent, so that the marks answer has something in it. */
async function markOwnStudent(): Promise<void> {
  const instructor = {
    user: { id: fixture.userIds.instructor, email: "instructor@api.example", name: "Test instructor", sessionId: null, via: "session" },
    course: { id: fixture.courseId, title: "Settling Spheres", code: "api-A", term: "Test term", timeZone: "UTC" },
    membership: { id: fixture.membershipIds.instructor, role: "instructor", cohortId: null },
    cohortIds: [fixture.cohortId, fixture.otherCohortId],
  } as unknown as CourseAccess;
  const [discussion] = await saveRubric(db, {
    access: instructor,
    lab: (await loadMarkingLab(db, fixture.courseId, fixture.labId))!,
    input: {
      criteria: [
        { kind: "range", title: "Discussion", minPoints: 0, maxPoints: 4 },
        { kind: "auto", title: "On time", rule: "on_time", maxPoints: 1 },
      ],
    },
  });
  await saveMarkCell(db, {
    access: instructor,
    labId: fixture.labId,
    membershipId: fixture.membershipIds.ownStudent,
    criterionId: discussion.id,
    points: 3,
    expectedVersion: 0,
  });
}

const pointer = (...parts: string[]) => parts.map((part) => part.replaceAll("~", "~0").replaceAll("/", "~1")).join("/");

beforeAll(async () => {
  handle = await createAppHandler();
  fixture = await createAccessFixture("api");
  await markOwnStudent();
  const response = await handle(new Request(new URL("/api/v1/openapi.json", appOrigin())));
  document = await response.json();
  // Formats are left to the patterns zod writes beside them (uuid) or are descriptive (email).
  ajv = new Ajv2020({ strict: false, validateFormats: false, allErrors: true });
  ajv.addSchema(document as object, "openapi.json");
});

describe("the OpenAPI document", () => {
  it("describes every route of the catalogue, and is valid JSON Schema throughout", () => {
    for (const operation of apiOperations) {
      const described = document.paths[operation.path]?.[operation.method];
      expect(described, `${operation.method} ${operation.path}`).toBeDefined();
      for (const status of Object.keys(operation.responses)) {
        expect(() =>
          ajv.getSchema(
            `openapi.json#/${pointer("paths", operation.path, operation.method, "responses", status, "content", "application/json", "schema")}`,
          ),
        ).not.toThrow();
      }
    }
  });

  it("has a case here for every answer it documents", () => {
    const documented = apiOperations.flatMap((operation) =>
      Object.keys(operation.responses).map((status) => `${operation.method} ${operation.path} ${status}`),
    );
    expect(documented.filter((key) => !(key in cases))).toEqual([]);
    expect(Object.keys(cases).filter((key) => !documented.includes(key))).toEqual([]);
  });
});

describe("every documented answer", () => {
  it.each(Object.entries(cases))("%s", async (key, entry) => {
    const [method, path, status] = key.split(" ");
    const response = await send(method, entry);
    const body = await response.json();
    expect(response.status, JSON.stringify(body).slice(0, 300)).toBe(Number(status));
    expect(response.headers.get("content-type")).toMatch(/^application\/json/);
    const validate = ajv.getSchema(
      `openapi.json#/${pointer("paths", path, method, "responses", status, "content", "application/json", "schema")}`,
    )!;
    expect(validate(body), JSON.stringify(validate.errors)).toBe(true);
  });

  it("gives a TA the marks of their own cohort only, with the totals", async () => {
    const response = await send("get", { actor: "assignedTa", path: (f) => `${lab(f)}/marks` });
    const body = (await response.json()) as {
      criteria: { id: string; title: string }[];
      marks: { membershipId: string; total: number | null; points: Record<string, number | null> }[];
    };
    expect(body.marks.map((mark) => mark.membershipId).sort()).toEqual(
      [fixture.membershipIds.ownStudent, fixture.membershipIds.sameCohortStudent].sort(),
    );
    const own = body.marks.find((mark) => mark.membershipId === fixture.membershipIds.ownStudent)!;
    // 3 for the discussion, 1 for a hand-in on time.
    expect(own.total).toBe(4);
    expect(own.points[body.criteria.find((criterion) => criterion.title === "Discussion")!.id]).toBe(3);
    expect(body.marks.find((mark) => mark.membershipId === fixture.membershipIds.sameCohortStudent)!.total).toBeNull();
  });

  it("stored the repeated hand-in once", async () => {
    const response = await send("get", { actor: "ownStudent", path: (f) => `${lab(f)}/drop-logs/${f.dropLogId}` });
    const detail = (await response.json()) as { versions: { version: number }[] };
    // The fixture's own hand-in, then the 201 case; the 200 case added nothing.
    expect(detail.versions.map((version) => version.version)).toEqual([2, 1]);
  });
});

describe("addresses and methods outside the catalogue", () => {
  const errorShape = () => ajv.getSchema("openapi.json#/components/schemas/Error")!;
  const request = (method: string, path: string) =>
    handle(
      new Request(new URL(path, appOrigin()), {
        method,
        headers: { Origin: appOrigin(), "Content-Type": "application/json" },
        body: method === "GET" ? undefined : "{}",
      }),
    );

  it.each(["GET", "POST", "DELETE"])("answers an unknown address (%s) with 404 in the error shape", async (method) => {
    for (const path of ["/api/v1/no-such-thing", `/api/v1/labs/${missing}/drop-logs/${missing}/extra`, "/api/v2/me"]) {
      const response = await request(method, path);
      expect(response.status, `${method} ${path}`).toBe(404);
      expect(response.headers.get("content-type")).toMatch(/^application\/json/);
      const body = await response.json();
      expect(errorShape()(body), JSON.stringify(body)).toBe(true);
      expect(body.error.code).toBe("not_found");
    }
  });

  it("answers every method a catalogued address does not take with 405, Allow and the error shape", async () => {
    const byPath = new Map<string, Set<string>>();
    for (const operation of apiOperations) {
      const methods = byPath.get(operation.path) ?? new Set<string>();
      methods.add(operation.method.toUpperCase());
      if (operation.method === "get") methods.add("HEAD");
      byPath.set(operation.path, methods);
    }
    for (const [path, allowed] of byPath) {
      const concrete = path
        .replace("{labId}", fixture.labId)
        .replace("{courseId}", fixture.courseId)
        .replace("{dropLogId}", fixture.dropLogId);
      for (const method of ["GET", "POST", "PUT", "PATCH", "DELETE"].filter((candidate) => !allowed.has(candidate))) {
        const response = await request(method, concrete);
        expect(response.status, `${method} ${path}`).toBe(405);
        expect(new Set(response.headers.get("allow")?.split(/,\s*/)), `Allow of ${method} ${path}`).toEqual(allowed);
        const body = await response.json();
        expect(errorShape()(body), JSON.stringify(body)).toBe(true);
        expect(body.error.code).toBe("method_not_allowed");
      }
    }
  });
});
