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

/** What an error means for a form: its message at its field, or above the form when it has none. */
export function errorReply(error: AppError, formData?: FormData): SubmissionResult {
  const messages = { ...(error.field ? { fieldErrors: { [error.field]: [error.message] } } : { formErrors: [error.message] }) };
  if (!formData) return { status: "error", error: error.field ? { [error.field]: [error.message] } : { "": [error.message] } };
  return parseWithZod(formData, { schema: z.looseObject({}) }).reply({ ...messages, hideFields: hiddenFields(formData) });
}

export function toResponse(request: Request, error: AppError, formData?: FormData) {
  if (isApiRequest(request)) return apiErrorResponse(error.status, error.code, error.message, error.issues);
  return data(errorReply(error, formData), { status: error.status });
}

/**
 * An action whose body is a form: the wrapper reads the form once, hands it to the handler, and turns
 * an `AppError` the handler (or a rule it calls) throws into `toResponse`. Anything else propagates.
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
