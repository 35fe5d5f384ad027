/**
 * Test helper: the report route on a real node:http server on 127.0.0.1, over the invented busy
 * channel of the command tests (UANA named, the others counted; UBOSS a configured facilitator).
 */
import { createServer, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { createReportRoute, type ReportRoute } from "../../adapters/report-route.js";
import { ManualClock } from "../../src/ports/clock.js";
import { busyChannel, CHANNEL, NAMES, NOW } from "../commands/channel-fixture.js";

export const ROUTE_SECRET = "invented-route-secret-0123456789";

export interface RouteServer {
  readonly base: string;
  readonly route: ReportRoute;
  readonly clock: ManualClock;
  close(): Promise<void>;
}

export async function startReportServer(): Promise<RouteServer> {
  const channel = await busyChannel();
  const clock = new ManualClock(NOW);
  const route = createReportRoute({
    store: channel.store,
    secret: ROUTE_SECRET,
    clock,
    facilitators: ["UBOSS"],
    displayName: async (id) => NAMES[id] ?? null,
  });
  const server: Server = createServer((request, response) => {
    if ((request.url ?? "").startsWith(route.path)) {
      void route.handle(request, response);
    } else {
      response.writeHead(404);
      response.end();
    }
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as AddressInfo;
  return {
    base: `http://127.0.0.1:${port}`,
    route,
    clock,
    close: async () => {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await channel.store.close();
    },
  };
}

export { CHANNEL };
