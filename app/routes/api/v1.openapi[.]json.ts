import { openApiDocument } from "~/server/api/openapi.server";
import { methodNotAllowed, readOnly } from "~/server/auth/api-errors.server";
import { appUrl } from "~/server/config.server";

/** The OpenAPI 3.1 document of /api/v1. Public: it describes the API, it holds no data. */
export async function loader() {
  return Response.json(openApiDocument(appUrl()), { headers: { "Cache-Control": "public, max-age=300" } });
}

/** Read-only: any other method is answered 405 with Allow. */
export const action = () => methodNotAllowed(readOnly);
