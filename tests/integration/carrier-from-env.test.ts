import { describe, expect, it } from "vitest";
import { carrierFromEnv, kitParcel } from "~/server/shipping/carrier.server";

// The harness wiring that the label purchase relies on: the global setup's fake carrier, reached through the environment.
describe("the carrier in the integration suite", () => {
  it("is the fake carrier that the global setup started, and it sells labels", async () => {
    const carrier = carrierFromEnv();
    expect(process.env.CARRIER_API_URL).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/v2\/$/);

    const outcome = await carrier!.buyLabel({
      reference: "harness",
      from: { name: "Fluids Lab", line1: "1 College Road", city: "Alderbury", country: "GB" },
      to: { name: "Ada Brook", line1: "7 Mill Lane", city: "Alderbury", country: "GB" },
      parcel: kitParcel,
      carrierShipmentId: null,
    });
    expect(outcome).toMatchObject({ ok: true, carrier: "TestPost" });
  });

  it("is none without a key, as in production without a carrier account", () => {
    const key = process.env.CARRIER_API_KEY;
    delete process.env.CARRIER_API_KEY;
    try {
      expect(carrierFromEnv()).toBeNull();
    } finally {
      process.env.CARRIER_API_KEY = key;
    }
  });
});
