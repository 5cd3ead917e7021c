import { z } from "zod";

export type FieldErrors = Record<string, string | undefined>;
export type FormResult<T> = { ok: true; data: T } | { ok: false; errors: FieldErrors; values: Record<string, string> };

/**
 * Checks submitted form data against the form's schema. On failure it gives the first message per
 * field, and the values as typed (passwords left out) so that the form can show them again.
 */
export function parseForm<Schema extends z.ZodType>(schema: Schema, formData: FormData): FormResult<z.output<Schema>> {
  const raw = Object.fromEntries([...formData.entries()].filter((entry): entry is [string, string] => typeof entry[1] === "string"));
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, data: parsed.data };
  const errors: FieldErrors = {};
  for (const issue of parsed.error.issues) {
    const field = String(issue.path[0] ?? "form");
    errors[field] ??= issue.message;
  }
  return { ok: false, errors, values: typedValues(raw) };
}

/** What the user typed, minus anything that looks like a password: those are never sent back. */
export function typedValues(raw: Record<string, string>): Record<string, string> {
  return Object.fromEntries(Object.entries(raw).filter(([name]) => !/password/i.test(name)));
}
