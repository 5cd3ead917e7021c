import { afterEach, describe, expect, it, vi } from "vitest";
import { seedDemo } from "./seed-demo";

afterEach(() => {
  vi.unstubAllEnvs();
});

describe("seedDemo", () => {
  it("refuses a production process before it touches the database", async () => {
    const production = {
      NODE_ENV: "production",
      APP_URL: "https://benchpost.example.org",
      TRUST_PROXY: "0",
      DATABASE_URL: "postgresql://app@db.example.org/benchpost",
      SMTP_URL: "smtp://mail.example.org",
      S3_BUCKET: "benchpost-photos",
    };
    for (const [name, value] of Object.entries(production)) vi.stubEnv(name, value);
    const untouchable = new Proxy(
      {},
      {
        get: () => {
          throw new Error("the database was used");
        },
      },
    );
    await expect(seedDemo(untouchable as never)).rejects.toThrow("never seeded in production");
  });
});
