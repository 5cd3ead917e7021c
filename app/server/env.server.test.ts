import { describe, expect, it } from "vitest";
import { EnvironmentError, parseEnvironment } from "./env.server";

const production = {
  NODE_ENV: "production",
  APP_URL: "https://benchpost.example.org/",
  TRUST_PROXY: "1",
  DATABASE_URL: "postgresql://app@db.example.org:5432/benchpost",
  SMTP_URL: "smtp://mail.example.org:587",
  S3_BUCKET: "benchpost-photos",
};

function problemsOf(source: Record<string, string | undefined>): string[] {
  try {
    parseEnvironment(source);
  } catch (error) {
    if (error instanceof EnvironmentError) return error.problems;
    throw error;
  }
  return [];
}

describe("environment", () => {
  it("gives every setting a default outside production", () => {
    const env = parseEnvironment({});
    expect(env).toMatchObject({
      NODE_ENV: "development",
      PORT: 3000,
      HOST: "127.0.0.1",
      APP_URL: "http://localhost:3000",
      TRUST_PROXY: false,
      DATABASE_URL: "postgresql://benchpost@127.0.0.1:54329/benchpost",
      ALLOW_SIGN_UP: true,
      MAIL_CATCHER_PORT: 1025,
    });
    expect(env.SMTP_URL).toBeUndefined();
  });

  it("accepts a complete production environment, and closes open sign-up there unless asked", () => {
    const env = parseEnvironment(production);
    expect(env).toMatchObject({ APP_URL: "https://benchpost.example.org", TRUST_PROXY: true, ALLOW_SIGN_UP: false });
    expect(
      parseEnvironment({ ...production, RESEND_API_KEY: "re_key", SMTP_URL: undefined, TRUST_PROXY: "0", ALLOW_SIGN_UP: "true" }),
    ).toMatchObject({
      TRUST_PROXY: false,
      ALLOW_SIGN_UP: true,
    });
  });

  it.each(["APP_URL", "TRUST_PROXY", "DATABASE_URL", "S3_BUCKET"] as const)("refuses production without %s", (name) => {
    const problems = problemsOf({ ...production, [name]: undefined });
    expect(problems).toHaveLength(1);
    expect(problems[0]).toMatch(new RegExp(`^${name}: required in production`));
  });

  it("refuses production without a mail transport, and counts an empty variable as unset", () => {
    expect(problemsOf({ ...production, SMTP_URL: undefined })).toEqual([
      expect.stringMatching(/^RESEND_API_KEY or SMTP_URL: production needs a mail transport/),
    ]);
    expect(problemsOf({ ...production, SMTP_URL: "", RESEND_API_KEY: "" })).toHaveLength(1);
  });

  it("takes S3 keys in pairs: both, or neither for the SDK's own credentials", () => {
    expect(problemsOf({ ...production, S3_ACCESS_KEY_ID: "AKIA" })).toEqual([
      expect.stringMatching(/^S3_ACCESS_KEY_ID and S3_SECRET_ACCESS_KEY: give both/),
    ]);
    expect(problemsOf({ ...production, S3_ACCESS_KEY_ID: "AKIA", S3_SECRET_ACCESS_KEY: "secret" })).toEqual([]);
  });

  it("names every problem at once, invalid values included", () => {
    const problems = problemsOf({ NODE_ENV: "production", TRUST_PROXY: "yes", PORT: "eighty", SMTP_URL: "mail.example.org" });
    expect(problems.map((problem) => problem.split(":")[0]).sort()).toEqual([
      "APP_URL",
      "DATABASE_URL",
      "PORT",
      "S3_BUCKET",
      "SMTP_URL",
      "TRUST_PROXY",
    ]);
    expect(() => parseEnvironment({ NODE_ENV: "production" })).toThrow(/Run in production/);
  });
});
