/**
 * The one reading of a number typed into any form of Benchpost. Blank means "not given"; a decimal
 * comma (as spreadsheets in much of Europe copy it) counts as a point; anything else that is not a
 * number stays NaN, so that zod names the field instead of silently reading 0.
 */
import { z } from "zod";

export function parseTypedNumber(value: unknown): unknown {
  if (typeof value !== "string") return value;
  const trimmed = value.trim();
  if (trimmed === "") return undefined;
  const normalised = /^[-+]?\d+,\d+$/.test(trimmed) ? trimmed.replace(",", ".") : trimmed;
  return /^[-+]?(\d+\.?\d*|\.\d+)(e[-+]?\d+)?$/i.test(normalised) ? Number(normalised) : Number.NaN;
}

/** A zod number schema that reads what people type, as above. */
export const typedNumber = <T extends z.ZodType>(schema: T) => z.preprocess(parseTypedNumber, schema);
