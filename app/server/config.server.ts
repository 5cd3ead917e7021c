/**
 * The settings the app's modules ask for, read from the checked environment (env.server.ts).
 */
import { environment } from "./env.server";

export function isProduction(): boolean {
  return environment().NODE_ENV === "production";
}

/** The public address of the app, used in e-mailed links and to check the Origin of form posts. */
export function appUrl(): string {
  return environment().APP_URL;
}

/** Open sign-up for instructor accounts: ALLOW_SIGN_UP=true|false, on by default outside production. */
export function allowSignUp(): boolean {
  return environment().ALLOW_SIGN_UP;
}
