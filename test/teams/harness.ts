/**
 * A real Teams adapter (authentication off through the development flag, or on with invented
 * credentials) behind a node:http server on 127.0.0.1, a real bot over a SQLite file, and a fake
 * Bot Framework connector at the fixtures' `serviceUrl` made with nock. Sleeps of the send queue
 * advance the manual clock instead of waiting.
 */
import { readFileSync } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import type { Server } from "node:http";
import { tmpdir } from "node:os";
import { join } from "node:path";
import nock from "nock";
import type { ChartRenderer } from "../../adapters/chart-image.js";
import { type Bot, createBot } from "../../adapters/create-bot.js";
import type { PlatformAdapter } from "../../adapters/platform-adapter.js";
import { createRouteServer, listen } from "../../adapters/route-server.js";
import { createTeamsAdapter } from "../../adapters/teams/teams-adapter.js";
import type { TeamsConfig } from "../../src/config/load-config.js";
import { ManualClock } from "../../src/ports/clock.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import { openStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "../store/test-key.js";

export const SERVICE_ORIGIN = "https://smba.test.example";
export const CHANNEL_CONVERSATION = "19:general0001@thread.tacv2";
export const CHANNEL = `teams:${CHANNEL_CONVERSATION}`;
export const SENTINEL = "PLUMB-SENTINEL-q7Zx";

const FIXTURES = join(import.meta.dirname, "../fixtures/teams");

/** A fixture's raw text. */
export function fixtureText(name: string): string {
  return readFileSync(join(FIXTURES, name), "utf8");
}

/** A fixture as an object, with top-level fields replaced. */
export function fixture(
  name: string,
  overrides: Record<string, unknown> = {},
): Record<string, unknown> {
  return { ...(JSON.parse(fixtureText(name)) as Record<string, unknown>), ...overrides };
}

export interface ConnectorCall {
  readonly method: string;
  readonly path: string;
  readonly body: unknown;
}

export interface Harness {
  readonly url: string;
  readonly bot: Bot;
  readonly store: Store;
  readonly adapter: PlatformAdapter;
  readonly logger: MemoryLogger;
  readonly clock: ManualClock;
  readonly sleeps: number[];
  readonly dbPath: string;
  post(body: unknown, headers?: Record<string, string>): Promise<{ status: number; text: string }>;
  close(): Promise<void>;
}

export async function startHarness(
  options: { config?: TeamsConfig | null; devNoAuth?: boolean; renderChart?: ChartRenderer } = {},
): Promise<Harness> {
  const dir = await mkdtemp(join(tmpdir(), "plumbline-teams-"));
  const dbPath = join(dir, "plumbline.db");
  const store = await openStore(`sqlite:${dbPath}`, { idKey: TEST_KEY });
  const logger = new MemoryLogger();
  const clock = new ManualClock(Date.parse("2026-11-01T08:00:00Z"));
  const sleeps: number[] = [];
  const adapter = await createTeamsAdapter({
    config: options.config ?? null,
    devNoAuth: options.devNoAuth ?? true,
    logger,
    now: () => clock.now(),
    sendQueue: {
      now: () => clock.now(),
      sleep: async (ms) => {
        sleeps.push(ms);
        clock.advance(ms);
      },
      random: () => 0.5,
    },
    ...(options.renderChart ? { renderChart: options.renderChart } : {}),
  });
  const bot = createBot({
    store,
    platform: adapter.platform,
    clock,
    logger,
    facilitators: [],
    replicaId: "test-replica",
  });
  await adapter.start(bot);
  const route = adapter.routes[0];
  const server: Server = createRouteServer({ routes: adapter.routes });
  const port = await listen(server, 0, "127.0.0.1");
  const url = `http://127.0.0.1:${port}${route.path}`;
  return {
    url,
    bot,
    store,
    adapter,
    logger,
    clock,
    sleeps,
    dbPath,
    async post(body, headers = {}) {
      const response = await fetch(url, {
        method: "POST",
        headers: { "content-type": "application/json", ...headers },
        body: typeof body === "string" ? body : JSON.stringify(body),
      });
      return { status: response.status, text: await response.text() };
    },
    async close() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await store.close();
      await rm(dir, { recursive: true, force: true });
    },
  };
}

/** Accounts the fake roster knows, by channel account id. */
export const ROSTER: Record<
  string,
  { id: string; name: string; aadObjectId: string; userRole: string }
> = {
  "29:ana-account": { id: "29:ana-account", name: "Ana", aadObjectId: "aad-ana", userRole: "user" },
  "29:ben-account": { id: "29:ben-account", name: "Ben", aadObjectId: "aad-ben", userRole: "user" },
  "29:carla-account": {
    id: "29:carla-account",
    name: "Carla",
    aadObjectId: "aad-carla",
    userRole: "owner",
  },
  "29:dan-account": { id: "29:dan-account", name: "Dan", aadObjectId: "aad-dan", userRole: "user" },
};

/** A fake connector that answers every call with 200 and records it. */
export function fakeConnector(): ConnectorCall[] {
  const calls: ConnectorCall[] = [];
  let personal = 0;
  nock(SERVICE_ORIGIN)
    .persist()
    .post("/amer/v3/conversations")
    .reply(200, (uri, body) => {
      calls.push({ method: "POST", path: uri, body });
      personal += 1;
      return { id: `a:personal-${personal}` };
    })
    .post(/^\/amer\/v3\/conversations\/[^/]+\/activities(\/[^/]+)?$/)
    .reply(200, (uri, body) => {
      calls.push({ method: "POST", path: uri, body });
      return { id: `posted-${calls.length}` };
    })
    .get(/^\/amer\/v3\/conversations\/[^/]+\/members\/[^/]+$/)
    .reply((uri) => {
      calls.push({ method: "GET", path: uri, body: null });
      const id = decodeURIComponent(uri.split("/").pop() ?? "");
      const account = ROSTER[id] ?? Object.values(ROSTER).find((a) => a.aadObjectId === id);
      return account
        ? [200, account]
        : [404, { error: { code: "NotFound", message: "no member" } }];
    });
  return calls;
}

/** The command message of `who`, sent as a fresh activity. */
export function commandFrom(who: "ana" | "ben" | "carla" | "dan", words: string, id: string) {
  const account = ROSTER[`29:${who}-account`];
  return fixture("command-message.json", {
    id,
    conversation: {
      isGroup: true,
      conversationType: "channel",
      tenantId: "tenant-0001",
      id: `${CHANNEL_CONVERSATION};messageid=${id}`,
    },
    from: { id: account.id, name: account.name, aadObjectId: account.aadObjectId },
    text: `<at>plumbline</at> influence ${words}`,
  });
}
