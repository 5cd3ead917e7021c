import { PDFDocument } from "pdf-lib";
import { afterEach, describe, expect, it } from "vitest";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { pageTexts } from "../../../tests/support/pdf-text";
import { type LabelRequest, createEasyPostCarrier, kitParcel } from "./carrier.server";
import { FAKE_CARRIER_API_KEY, type FakeCarrier, type FakeCarrierOptions, startFakeCarrier } from "./fake-carrier.server";

const lab: PostalAddress = { name: "Fluids Lab", line1: "1 College Road", city: "Alderbury", postcode: "AB1 2CD", country: "GB" };
const student: PostalAddress = { name: "Zofia Łęcka", line1: "7 Mill Lane", city: "Alderbury", postcode: "AB3 4EF", country: "GB" };
const label = (overrides: Partial<LabelRequest> = {}): LabelRequest => ({
  reference: "item-1",
  from: lab,
  to: student,
  parcel: kitParcel,
  carrierShipmentId: null,
  ...overrides,
});

let fake: FakeCarrier | undefined;
async function carrierAgainstFake(options: Omit<FakeCarrierOptions, "port"> = {}, timeoutMs = 2_000) {
  fake = await startFakeCarrier({ port: 0, log: () => undefined, ...options });
  return { fake, carrier: createEasyPostCarrier({ apiKey: FAKE_CARRIER_API_KEY, apiUrl: fake.apiUrl, timeoutMs }) };
}
afterEach(async () => {
  await fake?.close();
  fake = undefined;
});

async function pdfWords(pdf: Buffer): Promise<string> {
  const [first] = await pageTexts(pdf);
  return first;
}

describe("the fake carrier through the EasyPost SDK", () => {
  it("sells a 4 × 6 in test label naming the tracking number and both addresses", async () => {
    const { fake, carrier } = await carrierAgainstFake();
    const outcome = await carrier.buyLabel(label());

    expect(outcome).toMatchObject({ ok: true, carrier: "TestPost", service: "Parcel" });
    if (!outcome.ok) return;
    expect(outcome.carrierShipmentId).toMatch(/^shp_[0-9a-f]{32}$/);
    expect(outcome.trackingNumber).toMatch(/^TP\d{16}$/);
    const parsed = await PDFDocument.load(outcome.labelPdf);
    expect(parsed.getPageCount()).toBe(1);
    expect(parsed.getPage(0).getSize()).toEqual({ width: 288, height: 432 });
    const words = await pdfWords(outcome.labelPdf);
    for (const expected of [
      outcome.trackingNumber,
      "TEST LABEL — not valid for postage",
      "Zofia Lecka",
      "7 Mill Lane",
      "AB3 4EF Alderbury",
      "Fluids Lab",
    ])
      expect(words).toContain(expected);
    expect(fake.counts).toEqual({ created: 1, bought: 1, rateLimited: 0 });
  });

  it("answers a retry with the label it sold, without selling another", async () => {
    const { fake, carrier } = await carrierAgainstFake();
    const first = await carrier.buyLabel(label());
    const retry = await carrier.buyLabel(label({ carrierShipmentId: first.carrierShipmentId }));

    expect(retry.ok && first.ok && retry.trackingNumber === first.trackingNumber).toBe(true);
    expect(fake.counts).toMatchObject({ created: 1, bought: 1 });
  });

  it("refuses postcode 00000 and an address line containing REFUSE, as EasyPost refuses an address", async () => {
    const { fake, carrier } = await carrierAgainstFake();

    expect(await carrier.buyLabel(label({ to: { ...student, postcode: "00000" } }))).toEqual({
      ok: false,
      carrierShipmentId: null,
      code: "refused_address",
      message: "Unable to verify address. (to_address.zip: Postcode 00000 does not exist)",
    });
    expect(await carrier.buyLabel(label({ to: { ...student, line1: "1 Refuse Road" } }))).toMatchObject({
      code: "refused_address",
      message: "Unable to verify address. (to_address.street1: Address not found)",
    });
    expect(fake.counts.created).toBe(0);
  });

  it("answers the asked share of requests with 429 and Retry-After", async () => {
    // Every second API request: each label's create passes and its buy is refused.
    const { fake, carrier } = await carrierAgainstFake({ rateLimited: { share: 0.5, retryAfterSeconds: 3 } });

    const first = await carrier.buyLabel(label());
    expect(first).toMatchObject({ ok: false, code: "rate_limited", retryAfterSeconds: 3 });
    expect(first.carrierShipmentId).toMatch(/^shp_/);
    const second = await carrier.buyLabel(label({ reference: "item-2" }));
    expect(second).toMatchObject({ ok: false, code: "rate_limited", retryAfterSeconds: 3 });
    expect(second.carrierShipmentId).not.toBe(first.carrierShipmentId);
    expect(fake.counts).toEqual({ created: 2, bought: 0, rateLimited: 2 });
  });

  it("answers a share slowly after doing the work: the retry finds the label bought", async () => {
    // Every second API request is slow: the create answers, the buy's answer comes after the timeout.
    const { fake, carrier } = await carrierAgainstFake({ slow: { share: 0.5, ms: 1_000 } }, 300);

    const lost = await carrier.buyLabel(label());
    expect(lost).toMatchObject({ ok: false, code: "timeout" });
    expect(fake.counts).toMatchObject({ created: 1, bought: 1 });

    const retry = await carrier.buyLabel(label({ carrierShipmentId: lost.carrierShipmentId }));
    expect(retry).toMatchObject({ ok: true, carrierShipmentId: lost.carrierShipmentId });
    expect(fake.counts).toMatchObject({ created: 1, bought: 1 });
  });
});
