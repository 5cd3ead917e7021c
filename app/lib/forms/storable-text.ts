import { z } from "zod";

/**
 * NUL, which PostgreSQL's text refuses, and a UTF-16 surrogate without its partner, which is no
 * character at all: jsonb refuses the escape JSON writes for it. A browser sends neither; a script may.
 * With the `u` flag the class matches only unpaired surrogates, so emoji pass.
 */
// eslint-disable-next-line no-control-regex -- NUL is exactly what this refuses
const unstorable = /\u0000|[\uD800-\uDFFF]/u;

/** A string PostgreSQL can keep, in a text column or inside jsonb; chain `.trim().max(…)` as on any string. */
export const storableText = z
  .string()
  .refine((value) => !unstorable.test(value), "Remove the control character or broken symbol from this text.");
