/** Turning a form submission into what zod checks, and zod's verdict into errors shown next to fields. */
import { data } from "react-router";
import { z } from "zod";



/** The submission's text values, as the person typed them, for re-filling the form after an error. */
export function formValues(form: FormData): Record<string, string> {
  return Object.fromEntries([...form.entries()].filter((entry): entry is [string, string] => typeof entry[1] === "string"));
}

/** Field errors keyed by the dotted path of the field, e.g. `calibration.0.temperatureC`. */
export function fieldErrors(error: z.ZodError): Record<string, string[]> {
  const errors: Record<string, string[]> = {};
  for (const issue of error.issues) {
    const key = issue.path.join(".") || "form";
    (errors[key] ??= []).push(issue.message);
  }
  return errors;
}

export type FieldErrorMap = Record<string, string[] | undefined>;

/** A failed submission: status 400 with the errors by field and what the person typed, to show it again. */
export function formFailure<Extra extends Record<string, unknown>>(values: Record<string, string>, errors: FieldErrorMap, extra?: Extra) {
  return data({ ...(extra as Extra), errors, values }, { status: 400 });
}
