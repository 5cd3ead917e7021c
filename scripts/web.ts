/**
 * The web server: the React Router build behind Express, served as react-router-serve serves it
 * (compression; build/client, with a year-long immutable cache for the hashed /assets), and the
 * socket's address in the load context (app/server/load-context.server.ts), which a Request does not
 * carry. `npm run start:web` runs its bundled copy, build/web.js, beside the build it serves;
 * `npm run dev` runs this file with `--dev`: Vite's dev server in place of the build.
 */
import { env } from "./lib/checked-environment";
import cluster from "node:cluster";
import { createServer } from "node:http";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { createRequestHandler } from "@react-router/express";
import compression from "compression";
import express from "express";
import type { ServerBuild } from "react-router";
import { loadContextFor } from "~/server/load-context.server";
import { logger, requestIdFrom } from "~/server/log.server";

const development = process.argv.includes("--dev");

if (cluster.isPrimary && !development && env.WEB_CONCURRENCY > 1) superviseWorkers(env.WEB_CONCURRENCY);
else await serve();

/**
 * WEB_CONCURRENCY processes of this file behind one port (node's cluster shares the listening socket).
 * Nothing a request needs lives in a process: sessions, rate limits and jobs are in PostgreSQL, so
 * any process may answer any request. A process that dies after it was serving is replaced; one that
 * dies before it could listen (a bad setting, the port taken) stops the lot, as a single process would.
 */
function superviseWorkers(count: number) {
  let stopping = false;
  const serving = new WeakSet<object>();
  cluster.on("listening", (worker) => serving.add(worker));
  cluster.on("exit", (worker, code, signal) => {
    if (stopping) {
      if (Object.keys(cluster.workers ?? {}).length === 0) process.exit(0);
      return;
    }
    logger.error({ pid: worker.process.pid, code, signal }, "A web process stopped");
    if (serving.has(worker)) cluster.fork();
    else process.exit(1);
  });
  for (let index = 0; index < count; index++) cluster.fork();
  const stop = () => {
    stopping = true;
    for (const worker of Object.values(cluster.workers ?? {})) worker?.process.kill("SIGTERM");
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
  logger.info({ processes: count }, `Starting ${count} web processes`);
}

async function serve() {
  const app = express();
  const server = createServer(app);
  app.disable("x-powered-by");

  /** Tokens travel in these paths; the log keeps the route, never the token. */
  const loggedPath = (url: string | undefined) =>
    (url ?? "").split("?")[0].replace(/^\/(sign-in\/link|reset-password|invitations)\/[^/]+/, "/$1/:token");
  const requestIds = new WeakMap<object, string>();
  // One log line per request, with its id, which is also sent back as X-Request-Id.
  app.use((request, response, next) => {
    const header = request.headers["x-request-id"];
    const requestId = requestIdFrom(Array.isArray(header) ? header[0] : header);
    requestIds.set(request, requestId);
    response.setHeader("X-Request-Id", requestId);
    const started = performance.now();
    response.on("finish", () => {
      logger.info(
        {
          requestId,
          method: request.method,
          path: loggedPath(request.url),
          status: response.statusCode,
          ms: Math.round(performance.now() - started),
        },
        "request",
      );
    });
    next();
  });
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
    createRequestHandler({
      build,
      mode: development ? "development" : "production",
      getLoadContext: (request) => loadContextFor(request.socket.remoteAddress, requestIds.get(request)),
    }),
  );

  server.listen(env.PORT, env.HOST, () =>
    logger.info({ host: env.HOST, port: env.PORT }, `Web server listening on http://${env.HOST}:${env.PORT}`),
  );
  // Browsers keep idle connections open: close them, or Ctrl-C would wait for them to time out.
  const stop = () => {
    server.close(() => process.exit(0));
    server.closeIdleConnections();
  };
  process.once("SIGINT", stop);
  process.once("SIGTERM", stop);
}
