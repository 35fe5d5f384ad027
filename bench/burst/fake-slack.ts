/**
 * @module burst/fake-slack
 * A loopback stand-in for the Slack Web API's `chat.postMessage` (the only call a digest makes
 * here), honouring Slack's documented per-channel pacing: about one message per second per
 * channel (docs.slack.dev/apis/web-api/rate-limits, "chat.postMessage"). A post arriving sooner
 * than `minIntervalMs` after the channel's last accepted post is refused with HTTP 429 and
 * `Retry-After` (seconds), as Slack does, and is not counted. Accepted posts are counted per
 * channel with their arrival time. Other methods answer `{ ok: false }`.
 */
import { createServer, type IncomingMessage, type Server } from "node:http";
import type { AddressInfo } from "node:net";

export interface FakeSlack {
  readonly url: string;
  /** Accepted posts per Slack channel id, with their arrival times (epoch ms). */
  readonly posts: Map<string, number[]>;
  /** Posts refused with 429. */
  readonly refused: () => number;
  reset(): void;
  close(): Promise<void>;
}

async function body(req: IncomingMessage): Promise<Record<string, string>> {
  const chunks: Buffer[] = [];
  for await (const chunk of req) chunks.push(chunk as Buffer);
  const text = Buffer.concat(chunks).toString("utf8");
  if ((req.headers["content-type"] ?? "").includes("json")) {
    return JSON.parse(text) as Record<string, string>;
  }
  return Object.fromEntries(new URLSearchParams(text));
}

export async function startFakeSlack(minIntervalMs = 1000): Promise<FakeSlack> {
  const posts = new Map<string, number[]>();
  let refused = 0;
  let seq = 0;
  const server: Server = createServer((req, res) => {
    body(req).then(
      (args) => {
        const send = (status: number, payload: object, headers: Record<string, string> = {}) => {
          res.writeHead(status, { "content-type": "application/json", ...headers });
          res.end(JSON.stringify(payload));
        };
        if (!req.url?.endsWith("/chat.postMessage")) {
          send(200, { ok: false, error: "unknown_method" });
          return;
        }
        const channel = String(args.channel ?? "");
        const now = Date.now();
        const times = posts.get(channel) ?? [];
        const last = times[times.length - 1];
        if (last !== undefined && now - last < minIntervalMs) {
          refused++;
          const wait = Math.max(1, Math.ceil((minIntervalMs - (now - last)) / 1000));
          send(429, { ok: false, error: "ratelimited" }, { "retry-after": String(wait) });
          return;
        }
        times.push(now);
        posts.set(channel, times);
        seq++;
        send(200, {
          ok: true,
          channel,
          ts: `${Math.floor(now / 1000)}.${String(seq).padStart(6, "0")}`,
        });
      },
      () => {
        res.writeHead(400);
        res.end();
      },
    );
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}/api/`,
    posts,
    refused: () => refused,
    reset() {
      posts.clear();
      refused = 0;
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
