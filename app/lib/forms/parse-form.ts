/**
 * Turning a form submission into what zod checks, and zod's verdict into errors shown next to the
 * fields, with the values as typed so that the form can show them again (passwords never come back).
 */
import { data } from "react-router";
import { z } from "zod";

export type FieldErrors = Record<string, string | undefined>;
export type FieldErrorMap = Record<string, string[] | undefined>;
export type FormResult<T> = { ok: true; data: T } | { ok: false; errors: FieldErrors; values: Record<string, string> };

/** The submission's text values as typed, minus anything that looks like a password. */
export function formValues(form: FormData): Record<string, string> {
  return Object.fromEntries(
    [...form.entries()].filter((entry): entry is [string, string] => typeof entry[1] === "string" && !/password/i.test(entry[0])),
  );
}

/** Checks a simple form against its schema; on failure, the first message per top-level field. */
export function parseForm<Schema extends z.ZodType>(schema: Schema, formData: FormData): FormResult<z.output<Schema>> {
  const raw = Object.fromEntries([...formData.entries()].filter((entry): entry is [string, string] => typeof entry[1] === "string"));
  const parsed = schema.safeParse(raw);
  if (parsed.success) return { ok: true, data: parsed.data };
  const errors: FieldErrors = {};
  for (const issue of parsed.error.issues) {
    const field = String(issue.path[0] ?? "form");
    errors[field] ??= issue.message;
  }
  return { ok: false, errors, values: formValues(formData) };
}

/** Every message, keyed by the dotted path of its field (e.g. `calibration.0.temperatureC`), for nested forms. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const errors: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "form";
    (errors[key] ??= []).push(issue.message);
  }
  return errors;
}

/** A failed submission: status 400 with the errors by field and what the person typed, to show it again. */
export function formFailure<Extra extends Record<string, unknown>>(values: Record<string, string>, errors: FieldErrorMap, extra?: Extra) {
  return data({ ...(extra as Extra), errors, values }, { status: 400 });
}
