/**
 * The catalogue of /api/v1: every route with its parameters, body and answers, and the OpenAPI 3.1
 * document generated from it and from the zod schemas (zod's own `z.toJSONSchema`), so the document
 * cannot drift from the checks the server runs. The API test walks this catalogue.
 */
import { z } from "zod";
import { dropLogInput, labReduceInput, reduceInput } from "~/lib/drop-logs/drop-log-input";
import {
  apiError,
  apiSchemas,
  classComparisonResponse,
  dropLogDetail,
  dropLogList,
  handInResponse,
  labList,
  marksResponse,
  meResponse,
  reduceResponse,
} from "./api-schemas.server";

apiSchemas.add(dropLogInput, { id: "DropLogInput", description: "A drop log as a student hands it in; bench units (mm, g, °C, s)." });
apiSchemas.add(reduceInput, { id: "ReduceInput", description: "The reduction engine's own input, in SI units." });
apiSchemas.add(labReduceInput, {
  id: "LabReduceInput",
  description: "A drop log (`input`, as `DropLogInput`) to preview against the caller's kit and the lab's settings.",
});

type Parameter = { name: string; in: "path" | "query" | "header"; required: boolean; description: string; schema: z.ZodType };
type Answer = { description: string; schema: z.ZodType };

export type ApiOperation = {
  method: "get" | "post";
  /** OpenAPI's form: `/api/v1/labs/{labId}/drop-logs`. */
  path: string;
  summary: string;
  description: string;
  parameters?: Parameter[];
  requestBody?: { description: string; schema: z.ZodType };
  responses: Record<number, Answer>;
};

const labId: Parameter = { name: "labId", in: "path", required: true, description: "The lab's id.", schema: z.uuid() };
const errors = {
  400: { description: "The request cannot be read or fails its checks; `issues` names the fields.", schema: apiError },
  401: { description: "Not signed in: send a session cookie or `Authorization: Bearer <personal token>`.", schema: apiError },
  403: { description: "Signed in, but without access to this (another cohort, another student's work, the wrong role).", schema: apiError },
  404: { description: "No such object, or one the caller may not know exists (a draft lab, for students).", schema: apiError },
  409: {
    description:
      "The request is valid but the lab's state refuses it (not open yet, past the cut-off, no kit, `mark_released`: the student's mark is released and the lab refuses hand-ins after it, or `course_archived`: the course is archived and read-only).",
    schema: apiError,
  },
} satisfies Record<number, Answer>;

export const apiOperations: ApiOperation[] = [
  {
    method: "get",
    path: "/api/v1/me",
    summary: "Who is calling",
    description: "The caller and their courses with their role in each: the quickest check that a token works.",
    responses: { 200: { description: "The caller.", schema: meResponse }, 401: errors[401] },
  },
  {
    method: "get",
    path: "/api/v1/courses/{courseId}/labs",
    summary: "Labs of a course",
    description:
      "Students get the published and closed labs of their cohort, with where their drop log stands; staff get every lab of the course.",
    parameters: [{ name: "courseId", in: "path", required: true, description: "The course's id.", schema: z.uuid() }],
    responses: { 200: { description: "The labs, by due time.", schema: labList }, 401: errors[401], 403: errors[403], 404: errors[404] },
  },
  {
    method: "get",
    path: "/api/v1/labs/{labId}/drop-logs",
    summary: "Drop logs of a lab",
    description:
      "A student gets their own drop log; instructors get every handed-in drop log, TAs those of their cohorts. Each comes with its counted version and that version's reduction.",
    parameters: [labId],
    responses: {
      200: { description: "The drop logs, by student name.", schema: dropLogList },
      401: errors[401],
      403: errors[403],
      404: errors[404],
    },
  },
  {
    method: "post",
    path: "/api/v1/labs/{labId}/drop-logs",
    summary: "Hand in a drop log",
    description:
      "Students only. The server recomputes the reduction against the student's kit and stores a new immutable version. The sphere, and the fluid lot and column when named, must be of the student's kit and allowed by the lab; when the kit holds more than one lot or column the lab allows, naming it is required. Each refusal answers 400 with the field in `issues`. Repeating a request with the same `Idempotency-Key` stores nothing new and answers 200 with the version first stored.",
    parameters: [
      labId,
      {
        name: "Idempotency-Key",
        in: "header",
        required: true,
        description: "The client's key for this hand-in (8 to 200 characters), e.g. a UUID made once per attempt.",
        schema: z.string().min(8).max(200),
      },
    ],
    requestBody: { description: "The drop log.", schema: dropLogInput },
    responses: {
      201: { description: "Handed in: a new version.", schema: handInResponse },
      200: { description: "Already handed in with this key: the stored version.", schema: handInResponse },
      ...errors,
    },
  },
  {
    method: "get",
    path: "/api/v1/labs/{labId}/drop-logs/{dropLogId}",
    summary: "One drop log with every version",
    description: "The student who owns it, the course's instructors, and the TAs of the student's cohort.",
    parameters: [labId, { name: "dropLogId", in: "path", required: true, description: "The drop log's id.", schema: z.uuid() }],
    responses: {
      200: { description: "The drop log, newest version first.", schema: dropLogDetail },
      401: errors[401],
      403: errors[403],
      404: errors[404],
    },
  },
  {
    method: "get",
    path: "/api/v1/labs/{labId}/class-comparison",
    summary: "Class comparison of a lab",
    description: "Instructors, and the TAs of a cohort the lab is set for. `?cohort=<id>&label=suspect` narrow it.",
    parameters: [
      labId,
      { name: "cohort", in: "query", required: false, description: "Only this cohort's hand-ins.", schema: z.uuid() },
      {
        name: "label",
        in: "query",
        required: false,
        description: "Only hand-ins with this label.",
        schema: z.enum(["consistent", "suspect", "outlier"]),
      },
    ],
    responses: {
      200: { description: "The comparison.", schema: classComparisonResponse },
      400: errors[400],
      401: errors[401],
      403: errors[403],
      404: errors[404],
    },
  },
  {
    method: "get",
    path: "/api/v1/labs/{labId}/marks",
    summary: "Marks of a lab",
    description:
      "For the gradebook: instructors get every student of the lab's cohorts, TAs those of their cohorts; students are refused. Each mark gives its total, each criterion's points, the late penalty and when it was released.",
    parameters: [labId],
    responses: {
      200: { description: "The marks, by student name.", schema: marksResponse },
      401: errors[401],
      403: errors[403],
      404: errors[404],
    },
  },
  {
    method: "post",
    path: "/api/v1/reduce",
    summary: "Reduce without storing",
    description:
      "Either `{ labId, input }` (a student's drop log against their own kit: the form's live preview) or the engine's own input in SI units, for anyone signed in.",
    requestBody: { description: "A lab preview or an engine input.", schema: z.union([labReduceInput, reduceInput]) },
    responses: { 200: { description: "The reduction.", schema: reduceResponse }, ...errors },
  },
  {
    method: "get",
    path: "/api/v1/openapi.json",
    summary: "This document",
    description: "The OpenAPI 3.1 description of /api/v1, generated from the server's own schemas. Public.",
    responses: { 200: { description: "The document.", schema: z.looseObject({ openapi: z.literal("3.1.0") }) } },
  },
];

const ref = (id: string) => `#/components/schemas/${id}`;

/** Points the `#/$defs/Id` references zod writes for registered parts of an inline schema at the components. */
function refsToComponents(node: unknown): unknown {
  if (Array.isArray(node)) return node.map(refsToComponents);
  if (node === null || typeof node !== "object") return node;
  return Object.fromEntries(
    Object.entries(node)
      .filter(([key]) => key !== "$defs" && key !== "$schema" && key !== "$id")
      .map(([key, value]) => [
        key,
        key === "$ref" && typeof value === "string" ? value.replace(/^#\/\$defs\//, "#/components/schemas/") : refsToComponents(value),
      ]),
  );
}

/**
 * JSON Schema for a schema: a `$ref` when it is registered, else inline with its registered parts by
 * `$ref`. zod writes draft 2020-12, which is OpenAPI 3.1's dialect.
 */
function jsonSchema(schema: z.ZodType): Record<string, unknown> {
  const registered = apiSchemas.get(schema);
  if (registered) return { $ref: ref(registered.id) };
  return refsToComponents(z.toJSONSchema(schema, { metadata: apiSchemas, unrepresentable: "any", io: "output" })) as Record<
    string,
    unknown
  >;
}

export function openApiDocument(serverUrl: string) {
  const generated = z.toJSONSchema(apiSchemas, { uri: ref, unrepresentable: "any", io: "output" }) as { schemas: Record<string, unknown> };
  const schemas = refsToComponents(generated.schemas) as Record<string, Record<string, unknown>>;
  const paths: Record<string, Record<string, unknown>> = {};
  for (const operation of apiOperations) {
    paths[operation.path] ??= {};
    paths[operation.path][operation.method] = {
      summary: operation.summary,
      description: operation.description,
      operationId: `${operation.method}${operation.path
        .replace(/^\/api\/v1/, "")
        .replace(/[{}]/g, "")
        .replace(/[/.-](\w)/g, (_, letter: string) => letter.toUpperCase())}`,
      ...(operation.parameters?.length
        ? { parameters: operation.parameters.map(({ schema, ...parameter }) => ({ ...parameter, schema: jsonSchema(schema) })) }
        : {}),
      ...(operation.requestBody
        ? {
            requestBody: {
              required: true,
              description: operation.requestBody.description,
              content: { "application/json": { schema: jsonSchema(operation.requestBody.schema) } },
            },
          }
        : {}),
      responses: Object.fromEntries(
        Object.entries(operation.responses).map(([status, answer]) => [
          status,
          { description: answer.description, content: { "application/json": { schema: jsonSchema(answer.schema) } } },
        ]),
      ),
      security: operation.path === "/api/v1/openapi.json" ? [] : [{ session: [] }, { personalToken: [] }],
    };
  }
  return {
    openapi: "3.1.0",
    info: {
      title: "Benchpost API",
      version: "1",
      description:
        "Labs, drop logs and reductions of Benchpost. Every error has one shape: `{ error: { code, message, issues? } }`. Any call may answer 503 `database_unavailable`, with `Retry-After`, while the database cannot be reached: nothing was stored, and the same request may be sent again. An address not listed here answers 404 `not_found`; a method an address does not take, 405 `method_not_allowed` with `Allow`.",
    },
    servers: [{ url: serverUrl }],
    jsonSchemaDialect: "https://json-schema.org/draft/2020-12/schema",
    components: {
      schemas,
      securitySchemes: {
        session: { type: "apiKey", in: "cookie", name: "benchpost_session", description: "The session cookie of a signed-in browser." },
        personalToken: { type: "http", scheme: "bearer", description: "A personal API token from the account page." },
      },
    },
    paths,
  };
}
