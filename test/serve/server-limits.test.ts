/**
 * The shared HTTP server cuts slow clients off and caps open connections, on loopback with a real
 * socket. The timeouts are small here (injected) so the test waits only as long as the socket
 * needs; `plumbline serve` uses 10 s for headers, 30 s for the whole request and 1,000
 * connections. A timed-out request is answered 408 Request Timeout (RFC 9110 §15.5.9) by Node's
 * own `headersTimeout`/`requestTimeout` handling (Node.js 20 docs, http.Server).
 */
import { connect, type Socket } from "node:net";
import { afterEach, describe, expect, it } from "vitest";
import { createRouteServer, DEFAULT_SERVER_LIMITS, listen } from "../../adapters/route-server.js";

const LIMITS = {
  headersTimeoutMs: 200,
  requestTimeoutMs: 400,
  maxConnections: 2,
  checkIntervalMs: 20,
};

let closeServer: (() => Promise<void>) | null = null;
afterEach(async () => {
  await closeServer?.();
  closeServer = null;
});

async function startServer() {
  const server = createRouteServer({
    routes: [
      {
        path: "/echo",
        handle: async (request, response) => {
          for await (const _ of request) {
            // drain
          }
          response.end("ok");
        },
      },
    ],
    health: () => ({ ok: true }),
    limits: LIMITS,
  });
  const port = await listen(server, 0, "127.0.0.1");
  closeServer = () =>
    new Promise<void>((resolve) => {
      server.closeAllConnections();
      server.close(() => resolve());
    });
  return { server, port };
}

/** Opens a socket, writes `text`, and resolves with what the server sent once it closes. */
function untilClosed(
  port: number,
  text: string,
): { socket: Socket; done: Promise<{ data: string; ms: number }> } {
  const socket = connect(port, "127.0.0.1");
  const started = performance.now();
  const done = new Promise<{ data: string; ms: number }>((resolve, reject) => {
    let data = "";
    socket.on("data", (chunk) => {
      data += chunk.toString("latin1");
    });
    socket.on("close", () => resolve({ data, ms: performance.now() - started }));
    socket.on("error", reject);
  });
  socket.write(text);
  return { socket, done };
}

describe("route server limits", () => {
  it("uses 10 s / 30 s and 1,000 connections unless told otherwise", () => {
    const server = createRouteServer({ routes: [] });
    expect(server.headersTimeout).toBe(10_000);
    expect(server.requestTimeout).toBe(30_000);
    expect(server.maxConnections).toBe(1_000);
    expect(DEFAULT_SERVER_LIMITS.headersTimeoutMs).toBeLessThanOrEqual(
      DEFAULT_SERVER_LIMITS.requestTimeoutMs,
    );
  });

  it("answers 408 and closes when the headers do not arrive in time", async () => {
    const { port } = await startServer();
    const { done } = untilClosed(port, "POST /echo HTTP/1.1\r\nHost: x\r\n");
    const { data, ms } = await done;
    expect(data).toMatch(/^HTTP\/1\.1 408 /);
    expect(ms).toBeGreaterThanOrEqual(LIMITS.headersTimeoutMs - 20);
    expect(ms).toBeLessThan(5_000);
  });

  it("answers 408 and closes when the body trickles past the request timeout", async () => {
    const { port } = await startServer();
    const { socket, done } = untilClosed(
      port,
      "POST /echo HTTP/1.1\r\nHost: x\r\nContent-Length: 100\r\n\r\n0123456789",
    );
    socket.write("0123456789");
    const { data, ms } = await done;
    expect(data).toMatch(/^HTTP\/1\.1 408 /);
    expect(ms).toBeGreaterThanOrEqual(LIMITS.requestTimeoutMs - 20);
    expect(ms).toBeLessThan(5_000);
  });

  it("closes connections beyond the cap at once and keeps serving the others", async () => {
    const { server, port } = await startServer();
    const held = [
      untilClosed(port, "GET /healthz HTTP/1.1\r\nHost: x\r\n"),
      untilClosed(port, "GET /healthz HTTP/1.1\r\nHost: x\r\n"),
    ];
    await new Promise<void>((resolve) => {
      const wait = () =>
        server.getConnections((_, count) => (count >= 2 ? resolve() : setImmediate(wait)));
      wait();
    });
    const extra = untilClosed(port, "GET /healthz HTTP/1.1\r\nHost: x\r\n\r\n");
    const { data, ms } = await extra.done;
    expect(data).toBe("");
    expect(ms).toBeLessThan(LIMITS.headersTimeoutMs);
    // A held connection finishing its request is still served.
    held[0].socket.write("\r\n");
    held[0].socket.end();
    expect((await held[0].done).data).toMatch(/^HTTP\/1\.1 200 /);
    held[1].socket.destroy();
  });
});
