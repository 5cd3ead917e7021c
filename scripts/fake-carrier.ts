/**
 * `npx tsx scripts/fake-carrier.ts`: the local fake carrier on 127.0.0.1:1026 (FAKE_CARRIER_PORT
 * overrides), speaking EasyPost's API for CARRIER_API_URL=http://127.0.0.1:1026/v2/. Started by
 * `npm start` when no CARRIER_API_KEY is set. Postcode 00000 or a line containing REFUSE is refused.
 *
 * For trying failures by hand: `--latency-ms 300` delays every answer, `--slow-share 0.1 --slow-ms 40000`
 * delays a share of them further, `--rate-limited-share 0.2 --retry-after 2` answers a share with 429.
 */
import { parseArgs } from "node:util";
import { env } from "./lib/checked-environment";
import { startFakeCarrier } from "~/server/shipping/fake-carrier.server";

const { values } = parseArgs({
  options: {
    "latency-ms": { type: "string", default: "0" },
    "slow-share": { type: "string", default: "0" },
    "slow-ms": { type: "string", default: "40000" },
    "rate-limited-share": { type: "string", default: "0" },
    "retry-after": { type: "string", default: "2" },
  },
});

const carrier = await startFakeCarrier({
  port: env.FAKE_CARRIER_PORT,
  latencyMs: Number(values["latency-ms"]),
  slow: { share: Number(values["slow-share"]), ms: Number(values["slow-ms"]) },
  rateLimited: { share: Number(values["rate-limited-share"]), retryAfterSeconds: Number(values["retry-after"]) },
});
console.log(`Fake carrier listening on ${carrier.apiUrl}`);

const stop = async () => {
  await carrier.close();
  process.exit(0);
};
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
