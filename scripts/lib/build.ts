import { build } from "esbuild";
import { bin, runStep } from "./processes";

/** Where `npm test` puts the production build it checks last (tests/production/), apart from the demo build. */
export const PRODUCTION_CHECK_DIRECTORY = "build/production-check";

/** Bundled beside the app's build (their node_modules imports stay imports), so production runs them with plain node. */
const entryPoints = ["scripts/web.ts", "scripts/worker.ts", "scripts/migrate.ts", "scripts/create-instructor.ts"];

/**
 * The app's build in `directory`: React Router's client and server halves, and web.js, worker.js,
 * migrate.js and create-instructor.js beside them. A demo build (`npm start`, `npm test`) has the development inbox; the
 * production build (`npm run build`) does not (app/routes.ts reads BENCHPOST_DEMO_BUILD).
 */
export async function buildApp({
  demo,
  directory = "build",
  quiet = false,
}: {
  demo: boolean;
  directory?: string;
  quiet?: boolean;
}): Promise<void> {
  const env = { ...process.env, BENCHPOST_DEMO_BUILD: demo ? "1" : "0", BENCHPOST_BUILD_DIRECTORY: directory };
  runStep(`Building the ${demo ? "demo" : "production"} app in ${directory}/`, bin.reactRouter, ["build"], env, { quiet });
  await build({
    entryPoints,
    outdir: directory,
    bundle: true,
    platform: "node",
    format: "esm",
    target: "node20",
    packages: "external",
    logLevel: "warning",
  });
}
