import type { Config } from "@react-router/dev/config";

export default {
  ssr: true,
  // React Router's own origin check would answer a foreign Origin with a bare "Bad Request" before any
  // middleware runs. Ours (app/server/auth/request-guard.server.ts) is stricter — the Origin must be
  // APP_URL's, or Sec-Fetch-Site same-origin — and answers with Benchpost's own 403 page, so the
  // framework's check is opened up here and ours decides.
  allowedActionOrigins: ["**"],
  // The whole route manifest in one cached file: lazy discovery matched every ancestor path of the page
  // against the route table on each server render (4 % of a lab page's CPU) and asked the server again
  // on client navigations.
  routeDiscovery: { mode: "initial" },
  // scripts/lib/build.ts builds elsewhere for the test harness's check of the production build.
  buildDirectory: process.env.BENCHPOST_BUILD_DIRECTORY || "build",
  // Every v8 flag that 7.18 offers: adopting them now keeps the move to v8 small.
  future: {
    v8_middleware: true,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_passThroughRequests: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
