/**
 * Reading a form against its zod schema, the same on the server and in the browser: Conform's
 * `parseWithZod` turns the field names (`drops[3]`, `rows[0].label`) into the object the schema checks,
 * and its `reply()` gives the page back each error at its field with what was typed.
 *
 * Conform's own coercion is off: our schemas already read raw text (blank as "not given", the decimal
 * comma through `typedNumber`), and a second reading before them would disagree with it.
 */
import { parseWithZod } from "@conform-to/zod/v4";
import type { SubmissionResult } from "@conform-to/react";
import { z } from "zod";

export function parseSubmission<Schema extends z.ZodType>(formData: FormData, schema: Schema) {
  return parseWithZod(formData, { schema, disableAutoCoercion: true });
}

/**
 * On a page with several forms told apart by an `intent` field, the server's reply that belongs to
 * one of them (the reply carries what was typed, intent included), for that form's `lastResult`.
 */
export function replyFor(actionData: unknown, intent: string): SubmissionResult | undefined {
  if (!actionData || typeof actionData !== "object" || !("initialValue" in actionData)) return undefined;
  const reply = actionData as SubmissionResult;
  return reply.initialValue?.intent === intent ? reply : undefined;
}

/** Checkboxes sharing a name: none ticked sends nothing and one sends a single value, but the schema wants a list. */
export const formList = <Item extends z.ZodType>(item: Item) =>
  z.preprocess((value) => (value === undefined || value === "" ? [] : Array.isArray(value) ? value : [value]), z.array(item));
