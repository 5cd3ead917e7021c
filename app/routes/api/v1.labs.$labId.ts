import type { Route } from "./+types/v1.labs.$labId";
import { apiErrorResponse } from "~/server/auth/api-errors.server";
import { labAddressMiddleware } from "~/server/labs/lab-access.server";

/** Every /api/v1/labs/:labId/… address: the lab, and the caller's access to its course, are resolved once for the route below. */
export const middleware: Route.MiddlewareFunction[] = [labAddressMiddleware];

/** The lab's own address has nothing to read: its comparison, marks and drop logs have their own. */
export const loader = () => apiErrorResponse(404, "not_found", "There is nothing at this address.");
