/**
 * @module burst/fake-slack
 * A loopback stand-in for the Slack Web API's `chat.postMessage` (the only call a digest makes
 * here), honouring Slack's documented per-channel pacing: about one message per second per
 * channel (docs.slack.dev/apis/web-api/rate-limits, "chat.postMessage"). A post arriving sooner
 * than `minIntervalMs` after the channel's last accepted post is refused with HTTP 429 and
 * `Retry-After` (seconds), as Slack does, and is not counted. Slack also keeps "a workspace-wide
 * limit" for the method without publishing a figure: the fake refuses a post the same way when
 * `workspacePerMinute` posts were accepted in the workspace (all channels here) in the last 60 s,
 * an assumed value. Accepted posts are counted per channel with their arrival time, and
 * `conversations.history` lists them (newest first, with their `metadata`, from `oldest`), so a
 * replica can ask whether a post whose answer it lost arrived. Other methods answer
 * `{ ok: false }`.
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

/** The WebClient sends `metadata` form-encoded as a JSON string. */
function parseMetadata(raw: unknown): unknown {
  if (typeof raw !== "string") return raw ?? null;
  try {
    return JSON.parse(raw);
  } catch {
    return null;
  }
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

export interface FakeSlackOptions {
  /** Least time between two accepted posts in one channel; default 1000 ms. */
  readonly minIntervalMs?: number;
  /** Accepted posts per rolling minute in the workspace; default unlimited. */
  readonly workspacePerMinute?: number;
}

interface StoredMessage {
  readonly ts: string;
  readonly metadata: unknown;
}

export async function startFakeSlack(options: FakeSlackOptions = {}): Promise<FakeSlack> {
  const minIntervalMs = options.minIntervalMs ?? 1000;
  const workspacePerMinute = options.workspacePerMinute ?? Number.POSITIVE_INFINITY;
  const posts = new Map<string, number[]>();
  const messages = new Map<string, StoredMessage[]>();
  /** Arrival times of the accepted posts of the last minute, oldest first. */
  const recent: number[] = [];
  let refused = 0;
  let seq = 0;
  const server: Server = createServer((req, res) => {
    body(req).then(
      (args) => {
        const send = (status: number, payload: object, headers: Record<string, string> = {}) => {
          res.writeHead(status, { "content-type": "application/json", ...headers });
          res.end(JSON.stringify(payload));
        };
        const channel = String(args.channel ?? "");
        if (req.url?.endsWith("/conversations.history")) {
          const oldest = Number(args.oldest ?? 0);
          const listed = (messages.get(channel) ?? [])
            .filter((m) => Number(m.ts) > oldest)
            .reverse();
          send(200, { ok: true, messages: listed, has_more: false });
          return;
        }
        if (!req.url?.endsWith("/chat.postMessage")) {
          send(200, { ok: false, error: "unknown_method" });
          return;
        }
        const now = Date.now();
        while (recent.length > 0 && recent[0] <= now - 60_000) recent.shift();
        const times = posts.get(channel) ?? [];
        const last = times[times.length - 1];
        const channelWait = last !== undefined ? minIntervalMs - (now - last) : 0;
        const workspaceWait = recent.length >= workspacePerMinute ? recent[0] + 60_000 - now : 0;
        if (channelWait > 0 || workspaceWait > 0) {
          refused++;
          const wait = Math.max(1, Math.ceil(Math.max(channelWait, workspaceWait) / 1000));
          send(429, { ok: false, error: "ratelimited" }, { "retry-after": String(wait) });
          return;
        }
        times.push(now);
        posts.set(channel, times);
        recent.push(now);
        seq++;
        const ts = `${Math.floor(now / 1000)}.${String(seq).padStart(6, "0")}`;
        const stored = messages.get(channel) ?? [];
        stored.push({ ts, metadata: parseMetadata(args.metadata) });
        messages.set(channel, stored);
        send(200, { ok: true, channel, ts });
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
      messages.clear();
      recent.length = 0;
      refused = 0;
    },
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
