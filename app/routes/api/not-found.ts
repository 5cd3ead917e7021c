import { apiErrorResponse } from "~/server/auth/api-errors.server";

/**
 * Any /api/ address no route claims, whatever the method: 404 in the API's error shape (the site's
 * own 404 is a page). It names nothing that exists, so it checks no access.
 */
const noSuchAddress = () => apiErrorResponse(404, "not_found", "There is no such API address; /api/v1/openapi.json lists them.");

export const loader = noSuchAddress;
export const action = noSuchAddress;
