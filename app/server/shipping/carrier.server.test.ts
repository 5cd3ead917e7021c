import { createServer } from "node:http";
import type { AddressInfo } from "node:net";
import { delay, http, HttpResponse, passthrough } from "msw";
import { setupServer } from "msw/node";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { EASYPOST_MOCK_URL, MOCK_LABEL_PDF, mockEasyPost } from "../../../tests/mocks/easypost";
import { type LabelRequest, createEasyPostCarrier, kitParcel } from "./carrier.server";

const easyPost = mockEasyPost();
const network = setupServer(...easyPost.handlers);
const TIMEOUT_MS = 300;
const carrier = createEasyPostCarrier({ apiKey: "EZTK_test_key", apiUrl: EASYPOST_MOCK_URL, timeoutMs: TIMEOUT_MS });

const lab: PostalAddress = { name: "Fluids Lab", line1: "1 College Road", city: "Alderbury", postcode: "AB1 2CD", country: "GB" };
const student: PostalAddress = {
  name: "Ada Brook",
  line1: "7 Mill Lane",
  line2: "Flat 2",
  city: "Alderbury",
  postcode: "AB3 4EF",
  country: "GB",
};
const label = (overrides: Partial<LabelRequest> = {}): LabelRequest => ({
  reference: "item-1",
  from: lab,
  to: student,
  parcel: kitParcel,
  carrierShipmentId: null,
  ...overrides,
});
const calls = () => easyPost.requests.map((request) => `${request.method} ${request.path}`);

beforeAll(() => network.listen({ onUnhandledRequest: "error" }));
afterEach(() => {
  network.resetHandlers();
  easyPost.reset();
});
afterAll(() => network.close());

describe("buying a label through the EasyPost SDK", () => {
  it("creates the shipment, buys its cheapest rate and downloads the label PDF", async () => {
    const outcome = await carrier.buyLabel(label());

    expect(outcome).toMatchObject({
      ok: true,
      carrierShipmentId: "shp_mock1",
      carrier: "MockPost",
      service: "Ground",
      trackingNumber: "MOCK000000000001",
    });
    expect(outcome.ok && outcome.labelPdf.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(outcome.ok && outcome.labelPdf.equals(MOCK_LABEL_PDF)).toBe(true);
    expect(calls()).toEqual(["POST /v2/shipments", "POST /v2/shipments/shp_mock1/buy", "GET /labels/shp_mock1.pdf"]);
    // EasyPost's names and units: inches and ounces, our reference, a PDF label.
    expect(easyPost.requests[0].body).toEqual({
      shipment: {
        reference: "item-1",
        to_address: { name: "Ada Brook", street1: "7 Mill Lane", street2: "Flat 2", city: "Alderbury", zip: "AB3 4EF", country: "GB" },
        from_address: { name: "Fluids Lab", street1: "1 College Road", city: "Alderbury", zip: "AB1 2CD", country: "GB" },
        parcel: { length: 13.8, width: 9.8, height: 4.7, weight: 52.9 },
        options: { label_format: "PDF", label_size: "4x6" },
      },
    });
    expect(easyPost.requests[1].body).toEqual({ rate: { id: "rate_shp_mock1_ground" } });
  });

  it("answers a refused address with the carrier's own words", async () => {
    network.use(
      http.post(`${EASYPOST_MOCK_URL}shipments`, () =>
        HttpResponse.json(
          {
            error: {
              code: "ADDRESS.VERIFY.FAILURE",
              message: "Unable to verify address.",
              errors: [{ field: "street1", message: "House number is missing" }],
            },
          },
          { status: 422 },
        ),
      ),
    );

    expect(await carrier.buyLabel(label())).toEqual({
      ok: false,
      carrierShipmentId: null,
      code: "refused_address",
      message: "Unable to verify address. (street1: House number is missing)",
    });
  });

  it("keeps a 422 that is not about the address apart, as the carrier's error", async () => {
    network.use(
      http.post(`${EASYPOST_MOCK_URL}shipments/:id/buy`, () =>
        HttpResponse.json(
          { error: { code: "SHIPMENT.POSTAGE.FAILURE", message: "The carrier is closed today.", errors: [] } },
          { status: 422 },
        ),
      ),
    );

    expect(await carrier.buyLabel(label())).toEqual({
      ok: false,
      carrierShipmentId: "shp_mock1",
      code: "carrier_error",
      message: "The carrier is closed today.",
    });
  });

  it("answers 429 as rate limited, with Retry-After in seconds and the shipment id kept", async () => {
    network.use(
      http.post(`${EASYPOST_MOCK_URL}shipments/:id/buy`, () =>
        HttpResponse.json(
          { error: { code: "RATE_LIMITED", message: "Too many requests.", errors: [] } },
          { status: 429, headers: { "Retry-After": "12" } },
        ),
      ),
    );

    expect(await carrier.buyLabel(label())).toEqual({
      ok: false,
      carrierShipmentId: "shp_mock1",
      code: "rate_limited",
      message: "Too many requests.",
      retryAfterSeconds: 12,
    });
  });

  it("reads a 429 whose body is not EasyPost's (a proxy's page) from its status", async () => {
    network.use(
      http.post(
        `${EASYPOST_MOCK_URL}shipments`,
        () => new HttpResponse("<h1>Slow down</h1>", { status: 429, headers: { "Content-Type": "text/html" } }),
      ),
    );

    expect(await carrier.buyLabel(label())).toMatchObject({ ok: false, code: "rate_limited", carrierShipmentId: null });
  });

  it("gives up on an answer that takes longer than the timeout", async () => {
    network.use(
      http.post(`${EASYPOST_MOCK_URL}shipments`, async () => {
        await delay(TIMEOUT_MS * 5);
        return HttpResponse.json({});
      }),
    );

    const started = Date.now();
    expect(await carrier.buyLabel(label())).toEqual({
      ok: false,
      carrierShipmentId: null,
      code: "timeout",
      message: "The carrier did not answer within 0.3 s.",
    });
    expect(Date.now() - started).toBeLessThan(TIMEOUT_MS * 4);
  });

  it("answers a connection the carrier reset as a timeout: it may have acted", async () => {
    // msw cannot reset a socket: a real server on loopback does, and msw lets its requests through.
    const resetting = createServer((request) => request.socket.destroy());
    await new Promise<void>((resolve) => resetting.listen(0, "127.0.0.1", resolve));
    const apiUrl = `http://127.0.0.1:${(resetting.address() as AddressInfo).port}/v2/`;
    network.use(http.all(`${apiUrl}*`, () => passthrough()));
    try {
      const outcome = await createEasyPostCarrier({ apiKey: "EZTK_test_key", apiUrl, timeoutMs: TIMEOUT_MS }).buyLabel(label());
      expect(outcome).toMatchObject({ ok: false, carrierShipmentId: null, code: "timeout" });
    } finally {
      await new Promise((resolve) => resetting.close(resolve));
    }
  });
});

describe("a retry after a lost answer", () => {
  it("finds the shipment bought and downloads its label without buying again", async () => {
    const first = await carrier.buyLabel(label());
    easyPost.requests.length = 0;

    const retry = await carrier.buyLabel(label({ carrierShipmentId: first.carrierShipmentId }));

    expect(retry).toMatchObject({ ok: true, carrierShipmentId: "shp_mock1", trackingNumber: "MOCK000000000001", service: "Ground" });
    expect(calls()).toEqual(["GET /v2/shipments/shp_mock1", "GET /labels/shp_mock1.pdf"]);
  });

  it("recovers a buy whose answer never came: one purchase in all", async () => {
    network.use(
      http.post(`${EASYPOST_MOCK_URL}shipments/:id/buy`, async (info) => {
        const bought = await easyPost.resolvers.buy(info);
        await delay(TIMEOUT_MS * 5);
        return bought;
      }),
    );

    const lost = await carrier.buyLabel(label());
    expect(lost).toMatchObject({ ok: false, code: "timeout", carrierShipmentId: "shp_mock1" });

    const retry = await carrier.buyLabel(label({ carrierShipmentId: lost.carrierShipmentId }));
    expect(retry).toMatchObject({ ok: true, carrierShipmentId: "shp_mock1", trackingNumber: "MOCK000000000001" });
    expect(calls().filter((call) => call.endsWith("/buy"))).toEqual(["POST /v2/shipments/shp_mock1/buy"]);
  });

  it("creates and buys a new shipment when the kept one was never bought", async () => {
    network.use(
      http.post(
        `${EASYPOST_MOCK_URL}shipments/:id/buy`,
        () => HttpResponse.json({ error: { code: "RATE_LIMITED", message: "Too many requests.", errors: [] } }, { status: 429 }),
        { once: true },
      ),
    );
    const limited = await carrier.buyLabel(label());
    expect(limited).toMatchObject({ ok: false, code: "rate_limited", carrierShipmentId: "shp_mock1" });
    expect(limited.ok === false && limited.retryAfterSeconds).toBeUndefined();

    const retry = await carrier.buyLabel(label({ carrierShipmentId: "shp_mock1" }));
    expect(retry).toMatchObject({ ok: true, carrierShipmentId: "shp_mock2" });
    // The refused buy is the override's, unlogged.
    expect(calls()).toEqual([
      "POST /v2/shipments",
      "GET /v2/shipments/shp_mock1",
      "POST /v2/shipments",
      "POST /v2/shipments/shp_mock2/buy",
      "GET /labels/shp_mock2.pdf",
    ]);
  });

  it("buys afresh when the carrier no longer knows the kept shipment", async () => {
    expect(await carrier.buyLabel(label({ carrierShipmentId: "shp_forgotten" }))).toMatchObject({
      ok: true,
      carrierShipmentId: "shp_mock1",
    });
    expect(calls()[0]).toBe("GET /v2/shipments/shp_forgotten");
  });
});
