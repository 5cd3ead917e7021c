/**
 * The web server: the React Router build behind Express, served as react-router-serve serves it
 * (compression; build/client, with a year-long immutable cache for the hashed /assets), and the
 * socket's address in the load context (app/server/load-context.server.ts), which a Request does not
 * carry. `npm run start:web` runs its bundled copy, build/web.js, beside the build it serves;
 * `npm run dev` runs this file with `--dev`: Vite's dev server in place of the build.
 */
import { env } from "./lib/checked-environment";
import { createServer } from "node:http";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import type { ServerBuild } from "react-router";
import { loadContextFor } from "~/server/load-context.server";

const development = process.argv.includes("--dev");
const app = express();
const server = createServer(app);
app.disable("x-powered-by");
app.use(compression());

let build: ServerBuild | (() => Promise<ServerBuild>);
if (development) {
  const vite = await import("vite");
  // Hot reload over this server's own port.
  const viteServer = await vite.createServer({ server: { middlewareMode: true, ws: { server } } });
  app.use(viteServer.middlewares);
  build = () => viteServer.ssrLoadModule("virtual:react-router/server-build") as Promise<ServerBuild>;
} else {
  // Bundled, this file is <build>/web.js, beside the two halves of the build it serves.
  const buildDirectory = path.dirname(fileURLToPath(import.meta.url));
  const client = path.join(buildDirectory, "client");
  app.use("/assets", express.static(path.join(client, "assets"), { immutable: true, maxAge: "1y" }));
  app.use(express.static(client));
  build = (await import(pathToFileURL(path.join(buildDirectory, "server", "index.js")).href)) as ServerBuild;
}
app.all(
  "*",
  createRequestHandler({ build, mode: development ? "development" : "production", getLoadContext: (request) => loadContextFor(request.socket.remoteAddress) }),
);

server.listen(env.PORT, env.HOST, () => console.log(`Web server listening on http://${env.HOST}:${env.PORT}`));
const stop = () => server.close(() => process.exit(0));
process.once("SIGINT", stop);
process.once("SIGTERM", stop);
