import type { Config } from "@react-router/dev/config";

/**
 * The load benchmark's framework floor (bench/load.ts builds it with `react-router build bench/floor`).
 * The app's future flags, so the floor pays for the same request handling (middleware, pass-through
 * requests) and the difference to the app is the app's own work. It builds into build/floor, beside
 * the app's build and ignored with it, inside the checkout so that the server bundle finds react and
 * react-router in node_modules.
 */
export default {
  ssr: true,
  appDirectory: ".",
  buildDirectory: "../../build/floor",
  future: {
    v8_middleware: true,
    v8_splitRouteModules: true,
    v8_viteEnvironmentApi: true,
    v8_passThroughRequests: true,
    v8_trailingSlashAwareDataRequests: true,
  },
} satisfies Config;
