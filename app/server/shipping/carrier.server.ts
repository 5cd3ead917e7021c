/**
 * Buying one kit's label through EasyPost's official Node SDK (`@easypost/api`).
 *
 * Why EasyPost: a general multi-carrier API (one account reaches the national posts and the couriers),
 * whose shipment is created first and bought second. We keep the shipment's id before buying, so a
 * retry after a lost answer retrieves that shipment and sees whether it was already bought: the retry
 * is idempotent and never pays twice. A create whose answer is lost leaves at most an unbought
 * shipment at the carrier, which costs nothing.
 *
 * In development and tests the SDK talks to the local fake (`fake-carrier.server.ts`) through
 * `CARRIER_API_URL`. `buyLabel` never throws for a carrier's answer: every failure comes back as a
 * `LabelOutcome` that the shipment keeps per kit.
 */
import EasyPostClient from "@easypost/api";
import type { IShipment } from "@easypost/api";
import type { PostalAddress } from "~/lib/shipping/postal-address";
import { environment } from "~/server/env.server";

export type Parcel = { lengthCm: number; widthCm: number; heightCm: number; weightG: number };

/**
 * One kit's box: 35 × 25 × 12 cm and 1.5 kg, inside the small-parcel limits most posts share
 * (Royal Mail and Deutsche Post: 45 × 35 × 16 cm, 2 kg), so the cheapest parcel services apply.
 */
export const kitParcel: Parcel = { lengthCm: 35, widthCm: 25, heightCm: 12, weightG: 1500 };

export type LabelRequest = {
  /** Our shipment_items.id, kept on the carrier's shipment as its reference. */
  reference: string;
  from: PostalAddress;
  to: PostalAddress;
  parcel: Parcel;
  /** Kept from an earlier attempt: then the carrier is asked first whether it was bought. */
  carrierShipmentId: string | null;
};

export type LabelFailure = "refused_address" | "rate_limited" | "timeout" | "carrier_error";

export type LabelOutcome =
  | { ok: true; carrierShipmentId: string; carrier: string; service: string; trackingNumber: string; labelPdf: Buffer }
  | { ok: false; carrierShipmentId: string | null; code: LabelFailure; message: string; retryAfterSeconds?: number };

export type Carrier = { buyLabel(request: LabelRequest): Promise<LabelOutcome> };

/** Long enough for a carrier's slow afternoon, short enough that a stuck request does not hold a job. */
const DEFAULT_TIMEOUT_MS = 30_000;

const CENTIMETRES_PER_INCH = 2.54;
const GRAMS_PER_OUNCE = 28.349523125;

export function createEasyPostCarrier(options: { apiKey: string; apiUrl?: string; timeoutMs?: number }): Carrier {
  const timeoutMs = options.timeoutMs ?? DEFAULT_TIMEOUT_MS;
  return {
    async buyLabel(request) {
      // A client per label: its hooks see this label's answers only, which is where Retry-After is read.
      let lastResponse: CarrierResponse | undefined;
      const client = new EasyPostClient(options.apiKey, {
        baseUrl: options.apiUrl,
        // SDK 8.9.0 keeps its `timeout` option but never hands it to superagent: we set it on each request.
        requestMiddleware: (agentRequest: { timeout(ms: number): unknown }) => agentRequest.timeout(timeoutMs),
      });
      client.addRequestHook(() => (lastResponse = undefined));
      client.addResponseHook((response) => (lastResponse = response as unknown as CarrierResponse));

      let carrierShipmentId = request.carrierShipmentId;
      try {
        if (carrierShipmentId) {
          const earlier = await retrieveUnlessGone(client, carrierShipmentId);
          if (earlier?.tracking_code) return await boughtLabel(client, earlier, timeoutMs);
        }
        const shipment = await client.Shipment.create({
          reference: request.reference,
          to_address: easyPostAddress(request.to),
          from_address: easyPostAddress(request.from),
          parcel: easyPostParcel(request.parcel),
          options: { label_format: "PDF", label_size: "4x6" },
        });
        carrierShipmentId = shipment.id;
        const rate = cheapestRate(shipment);
        if (!rate) return failure(carrierShipmentId, "carrier_error", noRateMessage(shipment));
        // The cheapest rate: a kit is not urgent, the course pays per parcel, and a fixed service would
        // not exist for every carrier and country the fake or a real account offers.
        const bought = await client.Shipment.buy(shipment.id, rate.id);
        return await boughtLabel(client, bought, timeoutMs);
      } catch (error) {
        return classify(error, lastResponse, carrierShipmentId, timeoutMs);
      }
    },
  };
}

/** The carrier configured for this process, or null when there is none (production without a key). */
export function carrierFromEnv(): Carrier | null {
  const env = environment();
  if (!env.CARRIER_API_KEY) return null;
  return createEasyPostCarrier({ apiKey: env.CARRIER_API_KEY, apiUrl: env.CARRIER_API_URL });
}

type Client = InstanceType<typeof EasyPostClient>;
/** What the SDK's response hook sees; at run time `headers` are the response's own. */
type CarrierResponse = { httpStatus: number; headers: Record<string, string | undefined> };

async function retrieveUnlessGone(client: Client, id: string): Promise<IShipment | null> {
  try {
    return await client.Shipment.retrieve(id);
  } catch (error) {
    // A shipment the carrier no longer knows was never bought: buy afresh.
    if (apiError(error)?.statusCode === 404) return null;
    throw error;
  }
}

async function boughtLabel(client: Client, shipment: IShipment, timeoutMs: number): Promise<LabelOutcome> {
  // A shipment bought without a PDF label (through the carrier's dashboard, say) can still give one.
  const pdfUrl =
    shipment.postage_label?.label_pdf_url || (await client.Shipment.convertLabelFormat(shipment.id, "PDF")).postage_label.label_pdf_url;
  const response = await fetch(pdfUrl, { signal: AbortSignal.timeout(timeoutMs) });
  if (!response.ok) return failure(shipment.id, "carrier_error", `The carrier's label could not be downloaded (HTTP ${response.status}).`);
  const labelPdf = Buffer.from(await response.arrayBuffer());
  if (labelPdf.subarray(0, 5).toString("latin1") !== "%PDF-")
    return failure(shipment.id, "carrier_error", "The carrier's label is not a PDF.");
  return {
    ok: true,
    carrierShipmentId: shipment.id,
    carrier: shipment.selected_rate.carrier,
    service: shipment.selected_rate.service,
    trackingNumber: shipment.tracking_code,
    labelPdf,
  };
}

function cheapestRate(shipment: IShipment) {
  return [...(shipment.rates ?? [])].sort((a, b) => Number(a.rate) - Number(b.rate))[0];
}

function noRateMessage(shipment: IShipment): string {
  const reasons = (shipment.messages ?? []).map((message) => message.message).filter(Boolean);
  return reasons.length ? `The carrier offered no rate: ${reasons.join("; ")}` : "The carrier offered no rate for this parcel.";
}

function easyPostAddress(address: PostalAddress) {
  return {
    name: address.name,
    street1: address.line1,
    street2: address.line2 ?? undefined,
    city: address.city,
    state: address.region ?? undefined,
    zip: address.postcode ?? undefined,
    country: address.country,
    phone: address.phone ?? undefined,
  };
}

/** EasyPost measures parcels in inches and ounces. */
function easyPostParcel(parcel: Parcel) {
  const inches = (cm: number) => Math.round((cm / CENTIMETRES_PER_INCH) * 10) / 10;
  return {
    length: inches(parcel.lengthCm),
    width: inches(parcel.widthCm),
    height: inches(parcel.heightCm),
    weight: Math.round((parcel.weightG / GRAMS_PER_OUNCE) * 10) / 10,
  };
}

type ApiError = { statusCode: number; code?: string; message: string; errors?: { field?: string; message?: string }[] };

/** The SDK's ApiError (its classes are not exported): the HTTP status, EasyPost's code and its words. */
function apiError(error: unknown): ApiError | null {
  return error instanceof Error && typeof (error as Partial<ApiError>).statusCode === "number" ? (error as Error & ApiError) : null;
}

/** Connection-level failures after which the carrier may or may not have acted: retrying is the answer. */
const LOST_ANSWER_CODES = new Set([
  "ECONNABORTED",
  "ETIMEDOUT",
  "ETIME",
  "ECONNRESET",
  "EPIPE",
  "UND_ERR_SOCKET",
  "UND_ERR_CONNECT_TIMEOUT",
]);

function classify(
  error: unknown,
  lastResponse: CarrierResponse | undefined,
  carrierShipmentId: string | null,
  timeoutMs: number,
): LabelOutcome {
  const api = apiError(error);
  // The SDK loses the status when an error body is not EasyPost's JSON (a proxy's page): the hook kept it.
  const status = api?.statusCode ?? (lastResponse && lastResponse.httpStatus >= 400 ? lastResponse.httpStatus : undefined);
  if (api?.code?.startsWith("ADDRESS.")) return failure(carrierShipmentId, "refused_address", carrierMessage(api));
  if (status === 429) {
    const retryAfterSeconds = parseRetryAfter(lastResponse?.headers?.["retry-after"]);
    const message = api?.message || "The carrier asked us to slow down.";
    return { ...failure(carrierShipmentId, "rate_limited", message), ...(retryAfterSeconds === undefined ? {} : { retryAfterSeconds }) };
  }
  if (status === 408 || status === 504 || lostAnswer(error))
    return failure(carrierShipmentId, "timeout", `The carrier did not answer within ${timeoutMs / 1000} s.`);
  if (api) return failure(carrierShipmentId, "carrier_error", carrierMessage(api) || `The carrier answered HTTP ${api.statusCode}.`);
  if (status) return failure(carrierShipmentId, "carrier_error", `The carrier answered HTTP ${status}.`);
  return failure(
    carrierShipmentId,
    "carrier_error",
    `The carrier could not be reached: ${error instanceof Error ? error.message : String(error)}`,
  );
}

function lostAnswer(error: unknown): boolean {
  if (!(error instanceof Error)) return false;
  if (error.name === "TimeoutError") return true; // fetch's AbortSignal.timeout
  const code = (error as { code?: unknown }).code ?? (error.cause as { code?: unknown } | undefined)?.code;
  return typeof code === "string" && LOST_ANSWER_CODES.has(code);
}

/** EasyPost's message with its per-field reasons, e.g. "Unable to verify address. (zip: not found)". */
function carrierMessage(api: ApiError): string {
  const reasons = (api.errors ?? []).map((fieldError) =>
    fieldError.field ? `${fieldError.field}: ${fieldError.message}` : fieldError.message,
  );
  return reasons.length ? `${api.message} (${reasons.join("; ")})` : api.message;
}

/** Retry-After in seconds, given as seconds or as an HTTP date (RFC 9110, 10.2.3). */
function parseRetryAfter(value: unknown): number | undefined {
  if (typeof value !== "string" || !value.trim()) return undefined;
  if (/^\d+$/.test(value.trim())) return Number(value.trim());
  const at = Date.parse(value);
  return Number.isNaN(at) ? undefined : Math.max(0, Math.ceil((at - Date.now()) / 1000));
}

function failure(carrierShipmentId: string | null, code: LabelFailure, message: string): LabelOutcome {
  return { ok: false, carrierShipmentId, code, message };
}
