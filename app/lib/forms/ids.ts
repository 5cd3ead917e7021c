/**
 * Every id in a URL or a form is a UUID. One schema reads them, so that a malformed id is "not found"
 * on every page rather than a database error on some.
 */
import { z } from "zod";

export const entityId = z.uuid();

/** The id when it is well formed, else null (the caller answers 404). */
export function readId(value: string | undefined | null): string | null {
  return entityId.safeParse(value).success ? value! : null;
}
