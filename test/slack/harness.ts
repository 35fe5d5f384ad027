/**
 * Test helpers for the Slack adapter: a real node:http server on 127.0.0.1 around the adapter's
 * routes, a real bot over a SQLite file, a manual clock, signed requests and fixture loading.
 * The Web API is a nock'd stand-in host (SLACK_API_URL), so nothing leaves the machine.
 */
import { mkdtempSync, readFileSync } from "node:fs";
import { request as httpRequest, type Server } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import nock from "nock";
import type { ChartRenderer } from "../../adapters/chart-image.js";
import { type Bot, createBot } from "../../adapters/create-bot.js";
import type { PlatformAdapter } from "../../adapters/platform-adapter.js";
import { createRouteServer, listen } from "../../adapters/route-server.js";
import { slackSignature } from "../../adapters/slack/request-guard.js";
import { createSlackAdapter } from "../../adapters/slack/slack-adapter.js";
import type { ConsentLevel } from "../../src/domain/events.js";
import type { AnalysisRunner } from "../../src/ports/analysis-runner.js";
import { ManualClock } from "../../src/ports/clock.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import { openStore } from "../../src/store/open-store.js";

export const SECRET = "test-signing-secret-0123456789abcdef";
export const API_HOST = "http://slack-api.test";
export const TEAM = "T0PLUMB";
export const CHANNEL = "slack:T0PLUMB:C0GENERAL";
export const SENTINEL = "SENTINEL-7f3a-never-stored";
/** 2026-11-02T08:00:00Z, a Monday (the default digest runs Mondays 09:00 UTC). */
export const T0 = Date.UTC(2026, 10, 2, 8, 0, 0);

const FIXTURES = join(import.meta.dirname, "..", "fixtures", "slack");

export function fixtureText(name: string): string {
  return readFileSync(join(FIXTURES, name), "utf8");
}

export function fixture(name: string): Record<string, unknown> {
  return JSON.parse(fixtureText(name)) as Record<string, unknown>;
}

export interface Harness {
  readonly server: Server;
  readonly port: number;
  readonly bot: Bot;
  readonly store: Store;
  readonly adapter: PlatformAdapter;
  readonly clock: ManualClock;
  readonly logger: MemoryLogger;
  readonly dbPath: string;
  /** Every wait the send queue asked for, in ms. */
  readonly sleeps: number[];
  close(): Promise<void>;
}

/** Starts the adapter behind a loopback server; `auth.test` is answered by nock. */
export async function startHarness(
  options: { renderChart?: ChartRenderer; analysis?: AnalysisRunner } = {},
): Promise<Harness> {
  nock.disableNetConnect();
  nock.enableNetConnect("127.0.0.1");
  nock(API_HOST)
    .post("/api/auth.test")
    .reply(200, { ok: true, user_id: "U0BOT", bot_id: "B0BOT", team_id: TEAM });
  const dir = mkdtempSync(join(tmpdir(), "plumbline-slack-"));
  const dbPath = join(dir, "plumbline.db");
  const store = await openStore(`sqlite:${dbPath}`);
  const clock = new ManualClock(T0 + 10 * 60_000);
  const logger = new MemoryLogger();
  const sleeps: number[] = [];
  const adapter = await createSlackAdapter({
    config: {
      botToken: "xoxb-test",
      signingSecret: SECRET,
      appToken: null,
      apiUrl: `${API_HOST}/api`,
    },
    logger,
    facilitators: [],
    clock,
    sleep: async (ms) => {
      sleeps.push(ms);
      clock.advance(ms);
    },
    ...(options.renderChart ? { renderChart: options.renderChart } : {}),
  });
  const bot = createBot({
    store,
    platform: adapter.platform,
    clock,
    logger,
    facilitators: [],
    replicaId: "test",
    ...(options.analysis ? { analysis: options.analysis } : {}),
  });
  await adapter.start(bot);
  const server = createRouteServer({ routes: adapter.routes, health: () => ({ ok: true }) });
  const port = await listen(server, 0, "127.0.0.1");
  return {
    server,
    port,
    bot,
    store,
    adapter,
    clock,
    logger,
    dbPath,
    sleeps,
    async close() {
      await adapter.stop();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await store.close();
      nock.cleanAll();
      nock.enableNetConnect();
    },
  };
}

export interface Reply {
  readonly status: number;
  readonly body: string;
}

/** A raw POST to the server; headers exactly as given. */
export function post(
  port: number,
  body: string | Buffer,
  headers: Record<string, string>,
  path = "/slack/events",
): Promise<Reply> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(
      {
        host: "127.0.0.1",
        port,
        path,
        method: "POST",
        headers: { ...headers, "content-length": String(Buffer.byteLength(body)) },
      },
      (res) => {
        const chunks: Buffer[] = [];
        res.on("data", (c: Buffer) => chunks.push(c));
        res.on("end", () =>
          resolve({ status: res.statusCode ?? 0, body: Buffer.concat(chunks).toString("utf8") }),
        );
      },
    );
    req.on("error", reject);
    req.end(body);
  });
}

/** Headers Slack would send for this body at `atMs`. */
export function signedHeaders(
  body: string | Buffer,
  atMs: number,
  contentType = "application/json",
): Record<string, string> {
  const timestamp = String(Math.floor(atMs / 1000));
  return {
    "content-type": contentType,
    "x-slack-request-timestamp": timestamp,
    "x-slack-signature": slackSignature(SECRET, timestamp, body),
  };
}

/** Signs and sends a JSON envelope at the harness clock's time. */
export function sendSigned(h: Harness, envelope: unknown): Promise<Reply> {
  const body = JSON.stringify(envelope);
  return post(h.port, body, signedHeaders(body, h.clock.now()));
}

/** Records consent directly through the bot (the command path has its own test). */
export async function consent(
  h: Harness,
  members: readonly string[],
  level: ConsentLevel = "named",
) {
  for (const member of members) {
    await h.bot.onEvent(
      { type: "consent", at: T0, channel: CHANNEL, member, level },
      `test-consent-${member}-${level}`,
    );
  }
  await h.store.registerChannel(CHANNEL, TEAM);
}

/** A copy of an envelope fixture with some fields replaced. */
export function withEnvelope(
  base: Record<string, unknown>,
  envelope: Record<string, unknown>,
  event: Record<string, unknown> = {},
): Record<string, unknown> {
  return { ...base, ...envelope, event: { ...(base.event as Record<string, unknown>), ...event } };
}
