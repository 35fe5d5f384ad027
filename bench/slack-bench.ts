/**
 * @module slack-bench
 * Slack ingestion over loopback HTTP: signed Events API deliveries from 20 concurrent senders, 10%
 * of them redeliveries of an earlier `event_id`, through the request guard, Bolt and the bot into
 * a SQLite file (WAL, synchronous NORMAL), one transaction per delivery, each answered only after
 * it was stored. Reports deliveries per second with the count of non-2xx answers and whether the
 * messages counted equal the distinct events (the target is 1,000/s with none failed).
 */
import { mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Worker } from "node:worker_threads";
import { createBot } from "../adapters/create-bot.js";
import { createSlackAdapter } from "../adapters/slack/slack-adapter.js";
import { silentLogger } from "../src/ports/logger.js";
import { openStore } from "../src/store/open-store.js";

export interface Row {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const SECRET = "bench-signing-secret";
const KEY = "bench-key-0123456789abcdef0123456789abcdef";
const TEAM = "T0BENCH";
const CHANNEL_ID = "C0BENCH";
const MEMBERS = Array.from({ length: 30 }, (_, k) => `U0M${String(k).padStart(3, "0")}`);

function envelope(k: number, at: number): string {
  const author = MEMBERS[k % MEMBERS.length];
  const target = MEMBERS[(k * 7 + 3) % MEMBERS.length];
  const ts = `${Math.floor(at / 1000) - 3600 + Math.floor(k / 1000)}.${String(k % 1000).padStart(6, "0")}`;
  return JSON.stringify({
    team_id: TEAM,
    api_app_id: "A0BENCH",
    type: "event_callback",
    event_id: `Ev0BENCH${k}`,
    event_time: Math.floor(at / 1000),
    event: {
      type: "message",
      channel: CHANNEL_ID,
      channel_type: "channel",
      user: author,
      text: `bench text <@${target}>`,
      ts,
      ...(k % 3 === 0 && k > 0 ? { thread_ts: ts, parent_user_id: target } : {}),
    },
  });
}

// The senders run in a worker thread (plain JavaScript, evaluated), as Slack's would run
// elsewhere: the server's thread then does only the server's work.
const SENDERS = `
const { workerData, parentPort } = require("node:worker_threads");
const { request, Agent } = require("node:http");
const { createHmac } = require("node:crypto");
const { port, secret, bodies, order, senders } = workerData;
const agent = new Agent({ keepAlive: true, maxSockets: senders });
function send(body) {
  const timestamp = String(Math.floor(Date.now() / 1000));
  const signature = "v0=" + createHmac("sha256", secret).update("v0:" + timestamp + ":" + body).digest("hex");
  return new Promise((resolve, reject) => {
    const req = request({ host: "127.0.0.1", port, path: "/slack/events", method: "POST", agent,
      headers: { "content-type": "application/json", "content-length": String(Buffer.byteLength(body)),
        "x-slack-request-timestamp": timestamp, "x-slack-signature": signature } },
      (res) => { res.resume(); res.on("end", () => resolve(res.statusCode)); });
    req.on("error", reject);
    req.end(body);
  });
}
let next = 0;
let failed = 0;
const began = process.hrtime.bigint();
Promise.all(Array.from({ length: senders }, async () => {
  while (next < order.length) {
    const status = await send(bodies[order[next++]]);
    if (status < 200 || status >= 300) failed++;
  }
})).then(() => {
  parentPort.postMessage({ failed, seconds: Number(process.hrtime.bigint() - began) / 1e9 });
});
`;

function runSenders(data: {
  port: number;
  bodies: string[];
  order: number[];
  senders: number;
}): Promise<{ failed: number; seconds: number }> {
  return new Promise((resolve, reject) => {
    const worker = new Worker(SENDERS, { eval: true, workerData: { ...data, secret: SECRET } });
    worker.once("message", (result: { failed: number; seconds: number }) => {
      resolve(result);
      void worker.terminate();
    });
    worker.once("error", reject);
  });
}

/** Loopback Slack ingestion rows for bench/run.ts. */
export async function benchSlack(options: { events?: number } = {}): Promise<Row[]> {
  const distinct = options.events ?? 10_000;
  const dir = mkdtempSync(join(tmpdir(), "plumbline-slack-bench-"));
  const store = await openStore(`sqlite:${join(dir, "bench.db")}`, { idKey: KEY });
  const adapter = await createSlackAdapter({
    config: { botToken: "xoxb-bench", signingSecret: SECRET, appToken: null, apiUrl: null },
    logger: silentLogger,
    facilitators: [],
    identity: { botUserId: "U0BOT", botId: "B0BOT" },
  });
  const bot = createBot({
    store,
    platform: adapter.platform,
    clock: { now: () => Date.now() },
    logger: silentLogger,
    facilitators: [],
    replicaId: "bench",
  });
  await adapter.start(bot);
  const channel = `slack:${TEAM}:${CHANNEL_ID}`;
  const start = Date.now() - 2 * 3600_000;
  for (const member of MEMBERS) {
    await bot.onEvent(
      { type: "consent", at: start, channel, member, level: "named" },
      `c-${member}`,
    );
  }
  const route = adapter.routes[0];
  const server = createServer((req, res) => {
    route.handle(req, res).catch(() => {
      if (!res.headersSent) res.writeHead(500);
      res.end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  const address = server.address();
  const port = typeof address === "object" && address !== null ? address.port : 0;
  const now = Date.now();
  const bodies = Array.from({ length: distinct }, (_, k) => envelope(k, now));
  // 10% redeliveries, each sent some while after its first delivery.
  const order: number[] = [];
  for (let k = 0; k < distinct; k++) {
    order.push(k);
    if (k % 10 === 9) order.push(k - 5);
  }
  const { failed, seconds } = await runSenders({ port, bodies, order, senders: 20 });
  const counted = (await store.loadSnapshot(channel)).messages.length;
  await adapter.stop();
  await new Promise<void>((resolve) => server.close(() => resolve()));
  await store.close();
  rmSync(dir, { recursive: true, force: true });
  const note = `${order.length} deliveries (${order.length - distinct} redeliveries), 20 senders; counted ${counted} of ${distinct} distinct; ${failed} non-2xx`;
  return [
    { name: "slack http ingest (sqlite)", value: order.length / seconds, unit: "events/s", note },
    { name: "slack http non-2xx", value: failed, unit: "responses" },
    { name: "slack counted - distinct", value: counted - distinct, unit: "events" },
  ];
}

const isMain =
  process.argv[1] !== undefined && import.meta.url.endsWith(process.argv[1].replace(/\\/g, "/"));
if (isMain) {
  for (const row of await benchSlack()) console.log(row);
}
