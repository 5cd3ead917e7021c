/**
 * The local fake carrier: an HTTP server on loopback speaking the part of EasyPost's v2 API that
 * `carrier.server.ts` calls (create a shipment with its rates, retrieve it, buy it, convert its label
 * to PDF) and serving the 4 × 6 in label PDFs it draws. Shipments live in memory; nothing is sent.
 *
 * It refuses an address the way EasyPost does (422, `ADDRESS.VERIFY.FAILURE`) when its postcode is
 * `00000` or a line of it contains `REFUSE`, so the demo and the tests can show a refused address.
 * Asked to, it answers a share of the API's requests slowly or with 429 and Retry-After. A slow
 * answer is sent after the work is done, as a real carrier's lost answer would be: a retry then finds
 * the shipment bought.
 */
import { randomBytes, randomInt } from "node:crypto";
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { PDFDocument, StandardFonts, rgb, type PDFFont, type PDFPage } from "pdf-lib";

/** Any non-empty key is accepted; this is the one `npm start` and the tests give the app. */
export const FAKE_CARRIER_API_KEY = "fake-carrier-key";

export type FakeCarrierOptions = {
  port: number;
  host?: string;
  /** Every API answer waits this long: the carrier's usual latency, for the benchmark. */
  latencyMs?: number;
  /** This share (0…1) of the API's requests waits `ms` more, e.g. beyond the client's timeout. */
  slow?: { share: number; ms: number };
  /** This share (0…1) of the API's requests is answered 429 with Retry-After. */
  rateLimited?: { share: number; retryAfterSeconds: number };
  log?: (message: string) => void;
};

export type FakeCarrier = {
  port: number;
  /** The base address to give the SDK as CARRIER_API_URL. */
  apiUrl: string;
  /** What the fake did: the tests check that a retry bought nothing twice. */
  counts: { created: number; bought: number; rateLimited: number };
  close(): Promise<void>;
};

type Address = { name?: string; street1?: string; street2?: string; city?: string; state?: string; zip?: string; country?: string };
type Rate = {
  id: string;
  object: "Rate";
  carrier: string;
  service: string;
  rate: string;
  currency: string;
  shipment_id: string;
  delivery_days: number;
};
type Shipment = {
  id: string;
  object: "Shipment";
  mode: "test";
  reference: string | null;
  created_at: string;
  to_address: Address & { id: string; object: "Address" };
  from_address: Address & { id: string; object: "Address" };
  parcel: Record<string, unknown>;
  rates: Rate[];
  selected_rate: Rate | null;
  tracking_code: string | null;
  postage_label: Record<string, unknown> | null;
  status: string;
  messages: never[];
};

const CARRIER = "TestPost";
const MAX_BODY_BYTES = 1024 * 1024;

class CarrierError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly errors: { field: string; message: string }[] = [],
  ) {
    super(message);
  }
}

export async function startFakeCarrier(options: FakeCarrierOptions): Promise<FakeCarrier> {
  const log = options.log ?? ((message: string) => console.log(message));
  const shipments = new Map<string, Shipment>();
  const counts = { created: 0, bought: 0, rateLimited: 0 };
  let apiRequests = 0;
  const host = options.host ?? "127.0.0.1";

  async function answerApi(request: IncomingMessage, response: ServerResponse, path: string): Promise<void> {
    const sequence = apiRequests++;
    if (!request.headers.authorization) throw new CarrierError(401, "UNAUTHORIZED", "No API key was given.");
    if (options.rateLimited && inShare(options.rateLimited.share, sequence)) {
      counts.rateLimited++;
      response.setHeader("Retry-After", String(options.rateLimited.retryAfterSeconds));
      throw new CarrierError(429, "RATE_LIMITED", "Too many requests: slow down and try again later.");
    }
    const body = request.method === "POST" ? await readJson(request) : {};
    const answer = act(request.method ?? "GET", path, body, new URL(request.url ?? "/", "http://fake").searchParams, labelBase(request));
    const delay = (options.latencyMs ?? 0) + (options.slow && inShare(options.slow.share, sequence) ? options.slow.ms : 0);
    if (delay) await new Promise((resolve) => setTimeout(resolve, delay));
    sendJson(response, answer.status, answer.body);
  }

  function act(
    method: string,
    path: string,
    body: Record<string, unknown>,
    query: URLSearchParams,
    labelUrl: string,
  ): { status: number; body: unknown } {
    if (method === "POST" && path === "/v2/shipments")
      return { status: 201, body: createShipment(body.shipment as Record<string, unknown>) };
    const match = /^\/v2\/shipments\/([\w]+)(\/buy|\/label)?$/.exec(path);
    const shipment = match && shipments.get(match[1]);
    if (!match || !shipment) throw new CarrierError(404, "NOT_FOUND", "The requested resource could not be found.");
    if (method === "GET" && !match[2]) return { status: 200, body: shipment };
    if (method === "POST" && match[2] === "/buy") return { status: 200, body: buy(shipment, body, labelUrl) };
    if (method === "GET" && match[2] === "/label" && query.get("file_format")?.toUpperCase() === "PDF") {
      if (!shipment.postage_label) throw new CarrierError(422, "SHIPMENT.POSTAGE.REQUIRED", "The shipment has not been bought.");
      return { status: 200, body: shipment };
    }
    throw new CarrierError(404, "NOT_FOUND", "The requested resource could not be found.");
  }

  function createShipment(params: Record<string, unknown> | undefined): Shipment {
    if (!params?.to_address || !params.from_address || !params.parcel)
      throw new CarrierError(422, "SHIPMENT.INVALID_PARAMS", "A shipment needs to_address, from_address and parcel.");
    const to = params.to_address as Address;
    const from = params.from_address as Address;
    refuseAddress(to, "to_address");
    refuseAddress(from, "from_address");
    const id = `shp_${randomBytes(16).toString("hex")}`;
    const weightOz = Number((params.parcel as { weight?: unknown }).weight) || 16;
    const rate = (service: string, price: number, days: number): Rate => ({
      id: `rate_${randomBytes(16).toString("hex")}`,
      object: "Rate",
      carrier: CARRIER,
      service,
      rate: price.toFixed(2),
      currency: "EUR",
      shipment_id: id,
      delivery_days: days,
    });
    const shipment: Shipment = {
      id,
      object: "Shipment",
      mode: "test",
      reference: typeof params.reference === "string" ? params.reference : null,
      created_at: new Date().toISOString(),
      to_address: { ...to, id: `adr_${randomBytes(16).toString("hex")}`, object: "Address" },
      from_address: { ...from, id: `adr_${randomBytes(16).toString("hex")}`, object: "Address" },
      parcel: { ...(params.parcel as object), id: `prcl_${randomBytes(16).toString("hex")}`, object: "Parcel" },
      // Express listed first, so that a client which takes the first rate instead of the cheapest shows.
      rates: [rate("Express", 12 + weightOz * 0.05, 1), rate("Parcel", 4.5 + weightOz * 0.02, 3)],
      selected_rate: null,
      tracking_code: null,
      postage_label: null,
      status: "unknown",
      messages: [],
    };
    shipments.set(id, shipment);
    counts.created++;
    return shipment;
  }

  function buy(shipment: Shipment, body: Record<string, unknown>, labelBaseUrl: string): Shipment {
    if (shipment.tracking_code) throw new CarrierError(422, "SHIPMENT.POSTAGE.EXISTS", "This shipment already has postage.");
    const rateId = (body.rate as { id?: unknown } | undefined)?.id;
    const rate = shipment.rates.find((candidate) => candidate.id === rateId);
    if (!rate) throw new CarrierError(422, "SHIPMENT.MISSING_RATE", "The rate is not one of this shipment's.");
    const labelUrl = `${labelBaseUrl}/labels/${shipment.id}.pdf`;
    Object.assign(shipment, {
      selected_rate: rate,
      tracking_code: `TP${Array.from({ length: 16 }, () => randomInt(10)).join("")}`,
      status: "pre_transit",
      postage_label: {
        id: `pl_${randomBytes(16).toString("hex")}`,
        object: "PostageLabel",
        label_file_type: "application/pdf",
        label_size: "4x6",
        label_url: labelUrl,
        label_pdf_url: labelUrl,
      },
    });
    counts.bought++;
    return shipment;
  }

  const server = createServer((request, response) => {
    const path = new URL(request.url ?? "/", "http://fake").pathname;
    const label = /^\/labels\/(shp_\w+)\.pdf$/.exec(path);
    const answer =
      request.method === "GET" && label
        ? sendLabel(response, shipments.get(label[1]))
        : path.startsWith("/v2/")
          ? answerApi(request, response, path)
          : Promise.reject(new CarrierError(404, "NOT_FOUND", "The requested resource could not be found."));
    answer.catch((error: unknown) => {
      if (error instanceof CarrierError) {
        sendJson(response, error.status, { error: { code: error.code, message: error.message, errors: error.errors } });
      } else {
        log(`fake carrier: ${String(error)}`);
        sendJson(response, 500, { error: { code: "INTERNAL_SERVER_ERROR", message: "The fake carrier failed.", errors: [] } });
      }
    });
  });

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(options.port, host, () => {
      server.off("error", reject);
      resolve();
    });
  });
  const port = (server.address() as AddressInfo).port;
  return {
    port,
    apiUrl: `http://${host}:${port}/v2/`,
    counts,
    async close() {
      // Slow answers still pending and keep-alive sockets would hold close() open.
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

/** Request `sequence` falls in the share when it carries the running total over a whole number: exact and repeatable. */
function inShare(share: number, sequence: number): boolean {
  return Math.floor((sequence + 1) * share) > Math.floor(sequence * share);
}

/** The documented refusal: postcode 00000, or a line containing REFUSE. */
function refuseAddress(address: Address, field: "to_address" | "from_address"): void {
  if (address.zip?.trim() === "00000")
    throw new CarrierError(422, "ADDRESS.VERIFY.FAILURE", "Unable to verify address.", [
      { field: `${field}.zip`, message: "Postcode 00000 does not exist" },
    ]);
  for (const line of ["name", "street1", "street2", "city"] as const) {
    if (address[line]?.toUpperCase().includes("REFUSE"))
      throw new CarrierError(422, "ADDRESS.VERIFY.FAILURE", "Unable to verify address.", [
        { field: `${field}.${line}`, message: "Address not found" },
      ]);
  }
}

function labelBase(request: IncomingMessage): string {
  return `http://${request.headers.host ?? "127.0.0.1"}`;
}

async function readJson(request: IncomingMessage): Promise<Record<string, unknown>> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const chunk of request as AsyncIterable<Buffer>) {
    size += chunk.length;
    if (size > MAX_BODY_BYTES) throw new CarrierError(413, "BAD_REQUEST", "The request body is too large.");
    chunks.push(chunk);
  }
  try {
    const parsed: unknown = JSON.parse(Buffer.concat(chunks).toString("utf8") || "{}");
    return typeof parsed === "object" && parsed !== null ? (parsed as Record<string, unknown>) : {};
  } catch {
    throw new CarrierError(400, "BAD_REQUEST", "The request body is not JSON.");
  }
}

function sendJson(response: ServerResponse, status: number, body: unknown): void {
  if (response.destroyed) return;
  response.writeHead(status, { "Content-Type": "application/json; charset=utf-8" }).end(JSON.stringify(body));
}

async function sendLabel(response: ServerResponse, shipment: Shipment | undefined): Promise<void> {
  if (!shipment?.tracking_code) throw new CarrierError(404, "NOT_FOUND", "No such label.");
  const pdf = await drawLabel(shipment);
  if (!response.destroyed) response.writeHead(200, { "Content-Type": "application/pdf", "Content-Length": pdf.length }).end(pdf);
}

const POINTS_PER_INCH = 72;

/** A 4 × 6 in label, as thermal label printers take them. */
export async function drawLabel(
  shipment: Pick<Shipment, "tracking_code" | "to_address" | "from_address" | "selected_rate">,
): Promise<Buffer> {
  const document = await PDFDocument.create();
  document.setTitle(`Test label ${shipment.tracking_code}`);
  const page = document.addPage([4 * POINTS_PER_INCH, 6 * POINTS_PER_INCH]);
  const regular = await document.embedFont(StandardFonts.Helvetica);
  const bold = await document.embedFont(StandardFonts.HelveticaBold);
  const margin = 14;
  const width = page.getWidth() - 2 * margin;
  let y = page.getHeight() - margin;

  // A long line shrinks to the label's width rather than wrapping over the line below.
  const write = (text: string, font: PDFFont, size: number) => {
    const line = printable(text, font);
    y -= size * 1.25;
    page.drawText(line, { x: margin, y, size: Math.min(size, (size * width) / Math.max(1, font.widthOfTextAtSize(line, size))), font });
  };
  write("FROM", bold, 7);
  for (const line of addressLines(shipment.from_address)) write(line, regular, 8);
  y -= 10;
  page.drawLine({ start: { x: margin, y }, end: { x: margin + width, y }, thickness: 1 });
  y -= 6;
  write("TO", bold, 9);
  for (const line of addressLines(shipment.to_address)) write(line, bold, 13);
  y -= 12;
  write(`${shipment.selected_rate?.carrier ?? CARRIER} ${shipment.selected_rate?.service ?? ""}`.trim(), regular, 10);
  y -= 8;
  drawBars(page, shipment.tracking_code ?? "", margin, y - 60, width, 60);
  y -= 60;
  write(shipment.tracking_code ?? "", bold, 14);

  page.drawRectangle({ x: margin, y: margin, width, height: 40, borderWidth: 2, borderColor: rgb(0, 0, 0) });
  page.drawText(printable("TEST LABEL — not valid for postage", bold), { x: margin + 8, y: margin + 15, size: 12, font: bold });
  return Buffer.from(await document.save());
}

function addressLines(address: Address): string[] {
  const cityLine = [address.zip, address.city, address.state].filter(Boolean).join(" ");
  return [address.name, address.street1, address.street2, cityLine, address.country].filter((line): line is string => Boolean(line));
}

/** Bars that look like a barcode, drawn from the tracking number's characters: not a real symbology. */
function drawBars(page: PDFPage, text: string, x: number, y: number, width: number, height: number): void {
  const pattern = [...text].flatMap((character) => {
    const code = character.charCodeAt(0);
    return [1 + (code % 3), 1 + ((code >> 2) % 2)];
  });
  const unit = width / pattern.reduce((sum, bar) => sum + bar, 0);
  let left = x;
  pattern.forEach((bar, index) => {
    if (index % 2 === 0) page.drawRectangle({ x: left, y, width: bar * unit, height, color: rgb(0, 0, 0) });
    left += bar * unit;
  });
}

/** Letters with no decomposition to a base letter that WinAnsi has. */
const BASE_LETTERS: Record<string, string> = { Ł: "L", ł: "l", Đ: "D", đ: "d", Ħ: "H", ħ: "h", ı: "i" };

/** The standard fonts only know WinAnsi: accents fall back to their base letter, anything else to "?". */
function printable(text: string, font: PDFFont): string {
  const known = new Set(font.getCharacterSet());
  return [...text.normalize("NFC")]
    .map((character) => {
      if (known.has(character.codePointAt(0)!)) return character;
      const base = BASE_LETTERS[character] ?? character.normalize("NFD").replace(/\p{M}/gu, "");
      return base && [...base].every((part) => known.has(part.codePointAt(0)!)) ? base : "?";
    })
    .join("");
}
