/**
 * @module serve
 * `plumbline serve`: the composition root of the running bot. Reads the configuration once
 * (refusing to start, naming every missing or malformed setting), opens the store, builds the
 * Slack and/or Teams adapters that are configured, one bot over both, one HTTP server for their
 * routes plus `/healthz` (liveness) and `/readyz` (readiness: store writable, schema current, any
 * added probe such as the worker pool's), the scheduler (digests and notes) and the daily retention purge.
 */
import type { Server } from "node:http";
import pino from "pino";
import { AnalysisQueue } from "../src/analysis/analysis-queue.js";
import { poolSize, WorkerPool } from "../src/analysis/worker-pool.js";
import { type Config, loadConfig } from "../src/config/load-config.js";
import { PlumblineError } from "../src/domain/errors.js";
import { DAY_MS } from "../src/domain/settings.js";
import { purge } from "../src/ingest/purge.js";
import type { Clock } from "../src/ports/clock.js";
import { systemClock } from "../src/ports/clock.js";
import type { Logger } from "../src/ports/logger.js";
import type { Store } from "../src/ports/store.js";
import { MAX_JOBS } from "../src/schedule/scheduler.js";
import { openStore } from "../src/store/open-store.js";
import { type Bot, createBot } from "./create-bot.js";
import type { PlatformAdapter } from "./platform-adapter.js";
import { type ReadinessProbe, readiness, watchWrites } from "./readiness.js";
import { createReportRoute } from "./report-route.js";
import { createRouteServer, listen, type ServerLimits } from "./route-server.js";
import { RoutingPlatform } from "./routing-platform.js";

/** The name of the report-link secret in the store. */
export const REPORT_SECRET_NAME = "report-links";

export interface RunningServer {
  readonly server: Server;
  readonly bot: Bot;
  readonly store: Store;
  readonly adapters: readonly PlatformAdapter[];
  /** The port actually bound (useful with PORT=0 in tests). */
  readonly port: number;
  close(): Promise<void>;
}

export interface ServeOptions {
  readonly env: Readonly<Record<string, string | undefined>>;
  readonly cwd?: string;
  readonly clock?: Clock;
  readonly logger?: Logger;
  /** Start the scheduler's timer (tests drive `bot.scheduler.tick()` themselves). */
  readonly schedule?: boolean;
  /** More `/readyz` checks by name, e.g. `workers` for the analysis pool. */
  readonly readinessProbes?: Readonly<Record<string, ReadinessProbe>>;
  /** Wraps the opened store (tests inject failing stores); default as opened. */
  readonly wrapStore?: (store: Store) => Store;
  /** The HTTP server's timeouts and connection cap; default DEFAULT_SERVER_LIMITS. */
  readonly serverLimits?: Partial<ServerLimits>;
}

export function pinoLogger(config: Config): Logger {
  return pino({ level: config.logLevel, base: { replica: config.replicaId } });
}

function requirePlatform(config: Config): void {
  if (!config.slack && !config.teams && !config.teamsDevNoAuth) {
    throw new PlumblineError("CONFIG_INVALID", "no chat platform is configured", {
      hint: "set SLACK_BOT_TOKEN and SLACK_SIGNING_SECRET (Slack), or MICROSOFT_APP_ID, MICROSOFT_APP_PASSWORD and MICROSOFT_APP_TENANT_ID (Teams)",
    });
  }
}

async function buildAdapters(config: Config, logger: Logger): Promise<PlatformAdapter[]> {
  const adapters: PlatformAdapter[] = [];
  if (config.slack) {
    const { createSlackAdapter } = await import("./slack/slack-adapter.js");
    adapters.push(
      await createSlackAdapter({ config: config.slack, logger, facilitators: config.facilitators }),
    );
  }
  if (config.teams || config.teamsDevNoAuth) {
    const { createTeamsAdapter } = await import("./teams/teams-adapter.js");
    adapters.push(
      await createTeamsAdapter({ config: config.teams, devNoAuth: config.teamsDevNoAuth, logger }),
    );
  }
  return adapters;
}

export async function serve(options: ServeOptions): Promise<RunningServer> {
  const config = loadConfig(options.env);
  requirePlatform(config);
  const logger = options.logger ?? pinoLogger(config);
  const clock = options.clock ?? systemClock;
  const opened = await openStore(config.databaseUrl, {
    ...(options.cwd ? { cwd: options.cwd } : {}),
    ...(config.idKey ? { idKey: config.idKey } : {}),
    ...(config.idKeyFile ? { idKeyFile: config.idKeyFile } : {}),
    connectTimeoutMs: config.pgConnectTimeoutMs,
    statementTimeoutMs: config.pgStatementTimeoutMs,
  });
  const watched = watchWrites(options.wrapStore ? options.wrapStore(opened) : opened, clock);
  const store = watched.store;
  const adapters = await buildAdapters(config, logger);
  const platform = new RoutingPlatform(
    adapters.map((a) => ({ prefix: a.channelPrefix, platform: a.platform })),
  );
  // Without PLUMBLINE_REPORT_SECRET the secret is kept in the store, so every replica of one
  // database (and a restarted one) accepts the links any of them made.
  if (config.reportSecret === null) {
    logger.info(
      {},
      "PLUMBLINE_REPORT_SECRET is not set: report links are signed with a secret kept in the store",
    );
  }
  const reports = createReportRoute({
    store,
    secret: config.reportSecret ?? (await store.sharedSecret(REPORT_SECRET_NAME)),
    clock,
    facilitators: config.facilitators,
    displayName: (id) => platform.displayName(id),
    logger,
    ...(config.publicUrl ? { publicUrl: config.publicUrl } : {}),
  });
  // Analyses never run on this event loop (DESIGN.md §8): a warm pool of at least one worker
  // thread behind the bounded queue.
  const pool = new WorkerPool({ size: poolSize(options.env), threads: "always" });
  pool.warm();
  const analysis = new AnalysisQueue({
    runner: pool,
    capacity: 4 * pool.size,
    now: () => clock.now(),
  });
  const bot = createBot({
    analysis,
    store,
    platform,
    clock,
    logger,
    facilitators: config.facilitators,
    replicaId: config.replicaId,
    reportLink: (channel, reader) => reports.linkFor(channel, reader),
    // One scheduled job per worker at a time: a lone replica's burst keeps every worker busy
    // while other jobs wait on the store or the platform (docs/burst.md).
    scheduling: { jobs: Math.min(pool.size, MAX_JOBS) },
  });
  const server = createRouteServer({
    routes: [...adapters.flatMap((a) => a.routes), reports],
    health: () => ({ ok: true, store: store.kind, platforms: adapters.map((a) => a.name) }),
    ready: readiness({
      store,
      watched,
      clock,
      probes: { workers: () => pool.assertUp(), ...(options.readinessProbes ?? {}) },
    }),
    logger,
    ...(options.serverLimits ? { limits: options.serverLimits } : {}),
  });
  for (const adapter of adapters) await adapter.start(bot);
  const port = await listen(server, config.port, config.host);
  if (options.schedule !== false) bot.scheduler.start(60_000);
  const runPurge = () =>
    purge(store, { now: clock.now(), retentionDays: config.retentionDays })
      .then((counts) => logger.info({ ...counts }, "retention purge"))
      .catch((error: unknown) => logger.error({ error: String(error) }, "retention purge failed"));
  const purgeTimer = options.schedule === false ? null : setInterval(runPurge, DAY_MS);
  if (options.schedule !== false) void runPurge();
  logger.info(
    { port, platforms: adapters.map((a) => a.name), store: store.kind },
    "plumbline serving",
  );
  return {
    server,
    bot,
    store,
    adapters,
    port,
    async close() {
      if (purgeTimer) clearInterval(purgeTimer);
      await bot.scheduler.stop();
      for (const adapter of adapters) await adapter.stop();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await pool.close();
      await store.close();
    },
  };
}
