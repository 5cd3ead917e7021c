/**
 * EasyPost's shipment API as msw handlers, on a loopback address nothing listens on: create (with
 * two rates), retrieve, buy, and the label PDF. Like the real service, a bought shipment keeps its
 * tracking code and label, and buying it again is refused. Every request is logged, so a test can
 * show that a retry bought nothing twice. Error cases override one handler with `network.use`;
 * `resolvers` lets such an override do the real work first (a buy whose answer is then lost).
 */
import { http, HttpResponse, type HttpResponseResolver } from "msw";

export const EASYPOST_MOCK_URL = "http://127.0.0.1:9/v2/";
const LABEL_ORIGIN = "http://127.0.0.1:9";

/** The smallest file that starts like a PDF: the SDK's tests only need its first bytes and its length. */
export const MOCK_LABEL_PDF = Buffer.from("%PDF-1.4\n% mock label\n%%EOF\n", "latin1");

type MockShipment = {
  id: string;
  object: "Shipment";
  reference: string | null;
  rates: { id: string; object: "Rate"; carrier: string; service: string; rate: string; currency: string }[];
  selected_rate: MockShipment["rates"][number] | null;
  tracking_code: string | null;
  postage_label: { label_pdf_url: string } | null;
  messages: { message: string }[];
};

export function mockEasyPost() {
  const requests: { method: string; path: string; body: unknown }[] = [];
  const shipments = new Map<string, MockShipment>();

  const log = async (request: Request) => {
    const body = request.method === "POST" ? await request.clone().json() : null;
    requests.push({ method: request.method, path: new URL(request.url).pathname, body });
  };
  const notFound = () =>
    HttpResponse.json({ error: { code: "NOT_FOUND", message: "The requested resource could not be found.", errors: [] } }, { status: 404 });

  const resolvers = {
    create: (async ({ request }) => {
      await log(request);
      const { shipment: params } = (await request.clone().json()) as { shipment: { reference?: string } };
      const id = `shp_mock${shipments.size + 1}`;
      const shipment: MockShipment = {
        id,
        object: "Shipment",
        reference: params.reference ?? null,
        rates: [
          { id: `rate_${id}_express`, object: "Rate", carrier: "MockPost", service: "Express", rate: "14.20", currency: "EUR" },
          { id: `rate_${id}_ground`, object: "Rate", carrier: "MockPost", service: "Ground", rate: "5.10", currency: "EUR" },
        ],
        selected_rate: null,
        tracking_code: null,
        postage_label: null,
        messages: [],
      };
      shipments.set(id, shipment);
      return HttpResponse.json(shipment, { status: 201 });
    }) satisfies HttpResponseResolver,
    retrieve: (async ({ request, params }) => {
      await log(request);
      const shipment = shipments.get(String(params.id));
      return shipment ? HttpResponse.json(shipment) : notFound();
    }) satisfies HttpResponseResolver,
    buy: (async ({ request, params }) => {
      await log(request);
      const shipment = shipments.get(String(params.id));
      if (!shipment) return notFound();
      if (shipment.tracking_code)
        return HttpResponse.json(
          { error: { code: "SHIPMENT.POSTAGE.EXISTS", message: "This shipment already has postage.", errors: [] } },
          { status: 422 },
        );
      const { rate } = (await request.clone().json()) as { rate: { id: string } };
      shipment.selected_rate = shipment.rates.find((candidate) => candidate.id === rate.id) ?? null;
      shipment.tracking_code = `MOCK${shipment.id.slice(-1).padStart(12, "0")}`;
      shipment.postage_label = { label_pdf_url: `${LABEL_ORIGIN}/labels/${shipment.id}.pdf` };
      return HttpResponse.json(shipment);
    }) satisfies HttpResponseResolver,
    label: (async ({ request }) => {
      await log(request);
      return new HttpResponse(MOCK_LABEL_PDF, { headers: { "Content-Type": "application/pdf" } });
    }) satisfies HttpResponseResolver,
  };

  return {
    requests,
    shipments,
    resolvers,
    handlers: [
      http.post(`${EASYPOST_MOCK_URL}shipments`, resolvers.create),
      http.get(`${EASYPOST_MOCK_URL}shipments/:id`, resolvers.retrieve),
      http.post(`${EASYPOST_MOCK_URL}shipments/:id/buy`, resolvers.buy),
      http.get(`${LABEL_ORIGIN}/labels/:file`, resolvers.label),
    ],
    reset() {
      requests.length = 0;
      shipments.clear();
    },
  };
}
