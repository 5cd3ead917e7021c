/**
 * How a refused request is answered, in one place: an `AppError` becomes the API's JSON error shape
 * under /api/, and elsewhere a Conform submission result (`lastResult`) with the message at its field
 * and what the person typed, so the form shows both again — with or without JavaScript.
 */
import type { SubmissionResult } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { type ActionFunctionArgs, data } from "react-router";
import { z } from "zod";
import { AppError } from "~/lib/app-error";
import { apiErrorResponse, isApiRequest } from "~/server/auth/api-errors.server";

/** Passwords never travel back into a page. */
const hiddenFields = (formData: FormData) => [...new Set(formData.keys())].filter((name) => /password/i.test(name));

/** A path as Conform names the field: ["drops", 3] is `drops[3]`, ["rows", 0, "label"] is `rows[0].label`. */
const fieldName = (path: (string | number)[]) =>
  path.reduce<string>((name, key) => (typeof key === "number" ? `${name}[${key}]` : name ? `${name}.${key}` : key), "");

/** The messages of a refusal by field: each issue at its own, else the message at `field`, else above the form. */
function messagesOf(error: AppError): { fieldErrors?: Record<string, string[]>; formErrors?: string[] } {
  if (error.issues?.length) {
    const fieldErrors: Record<string, string[]> = {};
    for (const issue of error.issues) (fieldErrors[fieldName(issue.path)] ??= []).push(issue.message);
    return { fieldErrors, formErrors: [error.message] };
  }
  return error.field ? { fieldErrors: { [error.field]: [error.message] } } : { formErrors: [error.message] };
}

/** What an error means for a form: its message at its field, or above the form when it has none. */
export function errorReply(error: AppError, formData?: FormData): SubmissionResult {
  const messages = messagesOf(error);
  if (!formData)
    return { status: "error", error: { ...messages.fieldErrors, ...(messages.formErrors ? { "": messages.formErrors } : {}) } };
  return parseWithZod(formData, { schema: z.looseObject({}) }).reply({ ...messages, hideFields: hiddenFields(formData) });
}

/**
 * The one answer to a refusal: the API's JSON error under /api/, and elsewhere the form's reply with
 * the refusal's status (thrown from a loader, the status picks the error page).
 */
export function toResponse(request: Request, error: AppError, formData?: FormData) {
  const headers = error.retryAfterSeconds === undefined ? undefined : { "Retry-After": String(error.retryAfterSeconds) };
  if (isApiRequest(request)) return apiErrorResponse(error.status, error.code, error.message, error.issues, headers);
  return data(errorReply(error, formData), { status: error.status, headers });
}

/** For a loader's `.catch`: a refusal becomes its response (thrown, so the error page shows it); anything else propagates. */
export const throwAsResponse =
  (request: Request) =>
  (error: unknown): never => {
    if (error instanceof AppError) throw toResponse(request, error);
    throw error;
  };

/**
 * An action (or an API loader) whose refusals are answered by `toResponse`: an `AppError` that the
 * handler or a rule it calls throws becomes the answer; anything else propagates (a 500).
 */
export function withRefusals<Args extends { request: Request }, Result>(handler: (args: Args) => Promise<Result>) {
  return async (args: Args) => {
    try {
      return await handler(args);
    } catch (error) {
      if (error instanceof AppError) return toResponse(args.request, error);
      throw error;
    }
  };
}

/**
 * An action whose body is a form: the wrapper reads the form once, hands it to the handler, and turns
 * an `AppError` the handler (or a rule it calls) throws into `toResponse`, with what was typed.
 */
export function formAction<Args extends ActionFunctionArgs, Result>(handler: (args: Args & { formData: FormData }) => Promise<Result>) {
  return async (args: Args) => {
    const formData = await args.request.formData();
    try {
      return await handler({ ...args, formData });
    } catch (error) {
      if (error instanceof AppError) return toResponse(args.request, error, formData);
      throw error;
    }
  };
}
