/**
 * @module route-server
 * The one HTTP server the bot's routes share: exact paths (`/slack/events`, `/api/messages`),
 * prefix routes (`/reports/…`), an optional `/healthz`, 404 for anything else, and a logged 500
 * when a route's handler fails. `serve` and the adapter tests both run their routes through it.
 */
import { createServer, type Server } from "node:http";
import type { Logger } from "../src/ports/logger.js";
import type { HttpRoute } from "./platform-adapter.js";

export interface RouteServerOptions {
  readonly routes: readonly (HttpRoute & { readonly prefix?: boolean })[];
  /** The body of `/healthz`; no health route when absent. */
  readonly health?: () => unknown;
  readonly logger?: Logger;
}

export function createRouteServer(options: RouteServerOptions): Server {
  const exact = new Map(options.routes.filter((r) => !r.prefix).map((r) => [r.path, r] as const));
  const prefixed = options.routes.filter((r) => r.prefix === true);
  return createServer((request, response) => {
    const path = (request.url ?? "/").split("?")[0];
    if (path === "/healthz" && options.health) {
      response.writeHead(200, { "content-type": "application/json" });
      response.end(JSON.stringify(options.health()));
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
  });
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
