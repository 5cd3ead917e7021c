/**
 * Configuration read from the environment, in one place. Every variable is listed in the README.
 */
export const isProduction = process.env.NODE_ENV === "production";

/** The public address of the app, used in e-mailed links and to check the Origin of form posts. */
export function appUrl(): string {
  return (process.env.APP_URL ?? `http://localhost:${process.env.PORT ?? 3000}`).replace(/\/$/, "");
}

/** Open sign-up for instructor accounts: ALLOW_SIGN_UP=true|false, on by default outside production. */
export function allowSignUp(): boolean {
  const setting = process.env.ALLOW_SIGN_UP?.trim().toLowerCase();
  if (setting === undefined || setting === "") return !isProduction;
  return setting === "true" || setting === "1";
}
