/**
 * @module route-server
 * The one HTTP server the bot's routes share: exact paths (`/slack/events`, `/api/messages`),
 * prefix routes (`/reports/…`), an optional `/healthz` (liveness: always 200 while the process
 * serves) and `/readyz` (readiness: 200 or 503 with the failing checks as JSON), 404 for anything
 * else, and a logged 500 when a route's handler fails. Slow clients are cut off: the request's
 * headers must arrive within 10 s and the whole request within 30 s (Node answers 408 and closes),
 * and at most 1,000 connections are open at once (further ones are closed on arrival); Node's
 * defaults are 60 s, 300 s and no cap. `serve` and the adapter tests run their routes through it.
 */
import { createServer, type Server, type ServerResponse } from "node:http";
import type { Logger } from "../src/ports/logger.js";
import type { HttpRoute } from "./platform-adapter.js";
import type { ReadinessReport } from "./readiness.js";

export interface ServerLimits {
  /** Time for the request's headers to arrive (Node's `headersTimeout`). */
  readonly headersTimeoutMs: number;
  /** Time for the whole request to arrive (Node's `requestTimeout`); at least the headers'. */
  readonly requestTimeoutMs: number;
  /** Most connections open at once (Node's `maxConnections`). */
  readonly maxConnections: number;
  /** How often Node checks the two timeouts (its `connectionsCheckingInterval`, default 30 s). */
  readonly checkIntervalMs: number;
}

export const DEFAULT_SERVER_LIMITS: ServerLimits = Object.freeze({
  headersTimeoutMs: 10_000,
  requestTimeoutMs: 30_000,
  maxConnections: 1_000,
  checkIntervalMs: 1_000,
});

export interface RouteServerOptions {
  readonly routes: readonly (HttpRoute & { readonly prefix?: boolean })[];
  /** The body of `/healthz`; no health route when absent. */
  readonly health?: () => unknown;
  /** The readiness checks behind `/readyz`; no readiness route when absent. */
  readonly ready?: () => Promise<ReadinessReport>;
  readonly logger?: Logger;
  readonly limits?: Partial<ServerLimits>;
}

function sendJson(response: ServerResponse, status: number, body: unknown) {
  response.writeHead(status, { "content-type": "application/json", "cache-control": "no-store" });
  response.end(JSON.stringify(body));
}

export function createRouteServer(options: RouteServerOptions): Server {
  const exact = new Map(options.routes.filter((r) => !r.prefix).map((r) => [r.path, r] as const));
  const prefixed = options.routes.filter((r) => r.prefix === true);
  const limits = { ...DEFAULT_SERVER_LIMITS, ...options.limits };
  const server = createServer(
    {
      headersTimeout: limits.headersTimeoutMs,
      requestTimeout: limits.requestTimeoutMs,
      connectionsCheckingInterval: limits.checkIntervalMs,
    },
    (request, response) => {
      const path = (request.url ?? "/").split("?")[0];
      if (path === "/healthz" && options.health) {
        sendJson(response, 200, options.health());
        return;
      }
      if (path === "/readyz" && options.ready) {
        const ready = options.ready;
        ready()
          .then((report) => sendJson(response, report.ready ? 200 : 503, report))
          .catch((error: unknown) => {
            options.logger?.error(
              { error: error instanceof Error ? error.name : "unknown" },
              "readiness check failed",
            );
            sendJson(response, 503, { ready: false, checks: {} });
          });
        return;
      }
      const route = exact.get(path) ?? prefixed.find((r) => path.startsWith(r.path));
      if (!route) {
        response.writeHead(404, { "content-type": "text/plain" });
        response.end("not found\n");
        return;
      }
      route.handle(request, response).catch((error: unknown) => {
        options.logger?.error(
          { path, error: error instanceof Error ? error.message : String(error) },
          "request failed",
        );
        if (!response.headersSent) response.writeHead(500);
        response.end();
      });
    },
  );
  server.maxConnections = limits.maxConnections;
  return server;
}

/** Listens on `port` (0 = any free port) and resolves to the port actually bound. */
export async function listen(server: Server, port: number, host: string): Promise<number> {
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, () => resolve());
  });
  const address = server.address();
  return typeof address === "object" && address !== null ? address.port : port;
}
