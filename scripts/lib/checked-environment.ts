/**
 * Imported first by every entry point, so that it runs before any other module reads a setting: a
 * process with an incomplete environment prints what is missing and exits, instead of a stack trace.
 */
import { environmentOrExit } from "~/server/env.server";

export const env = environmentOrExit();
