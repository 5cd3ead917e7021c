/**
 * Every id in a URL or a form is a UUID. One schema reads them, so that a malformed id is "not found"
 * on every page rather than a database error on some.
 */
import { z } from "zod";

export const entityId = z.uuid();

/** Whether an id from an address or a form is well formed; when it is not, the caller answers 404. */
export const isEntityId = (value: unknown): value is string => entityId.safeParse(value).success;
