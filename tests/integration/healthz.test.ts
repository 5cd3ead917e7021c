import { describe, expect, it } from "vitest";
import { loader } from "~/routes/api/healthz";

describe("/healthz", () => {
  it("reports the database as up with a latency", async () => {
    const result = await loader();
    expect(result.init?.status ?? 200).toBe(200);
    expect(result.data).toMatchObject({ status: "ok", database: { status: "up" } });
  });
});
