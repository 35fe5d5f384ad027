/**
 * `/readyz` and `/healthz` as a load balancer meets them. Liveness (`/healthz`) answers 200 while
 * the process serves; readiness (`/readyz`) answers 503 with the failing check as JSON when the
 * store cannot take writes, so the balancer stops sending events that would all fail (the
 * liveness/readiness split is common practice, e.g. Kubernetes' "Configure Liveness, Readiness
 * and Startup Probes" task page). Stores are real: a SQLite file, and a PostgreSQL session made
 * read-only by the server (`default_transaction_read_only`, PostgreSQL manual §20.11); a store
 * failing with STORE_FULL is a wrapper around the real SQLite store.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { afterEach, describe, expect, it } from "vitest";
import { readiness, watchWrites } from "../../adapters/readiness.js";
import { type RunningServer, serve } from "../../adapters/serve.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { ManualClock } from "../../src/ports/clock.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import { openStore } from "../../src/store/open-store.js";
import { dropSchema, freshSchema, PG_URL, shouldRunPostgres } from "../store/postgres-env.js";
import { TEST_KEY } from "../store/test-key.js";

let running: RunningServer | null = null;
let dir: string | null = null;

afterEach(async () => {
  await running?.close();
  running = null;
  if (dir) rmSync(dir, { recursive: true, force: true });
  dir = null;
});

const full = () =>
  new PlumblineError("STORE_FULL", "the database is full", { hint: "free disk space" });

/** The real store, except that every write transaction fails as a full disk would. */
function failingWrites(store: Store): Store {
  return new Proxy(store, {
    get(target, property, receiver) {
      if (property === "transaction") return async () => Promise.reject(full());
      const value: unknown = Reflect.get(target, property, receiver);
      return typeof value === "function" ? value.bind(target) : value;
    },
  });
}

async function start(options: {
  wrapStore?: (s: Store) => Store;
  probes?: Record<string, () => void>;
}) {
  dir = mkdtempSync(join(tmpdir(), "plumbline-ready-"));
  running = await serve({
    env: {
      DATABASE_URL: `sqlite:${join(dir, "bot.db")}`,
      HOST: "127.0.0.1",
      PORT: "0",
      PLUMBLINE_TEAMS_DEV_NO_AUTH: "1",
    },
    logger: new MemoryLogger(),
    schedule: false,
    ...(options.wrapStore ? { wrapStore: options.wrapStore } : {}),
    ...(options.probes ? { readinessProbes: options.probes } : {}),
  });
  return `http://127.0.0.1:${running.port}`;
}

describe("/readyz and /healthz", () => {
  it("is ready with a writable, current SQLite store; the probe keeps nothing", async () => {
    const base = await start({});
    const ready = await fetch(`${base}/readyz`);
    expect(ready.status).toBe(200);
    expect(await ready.json()).toEqual({
      ready: true,
      checks: { store: { ok: true }, migrations: { ok: true }, workers: { ok: true } },
    });
    // The probe's delivery key was rolled back: a later insert of the same key is new.
    const key = await running?.store.transaction((tx) => tx.addDelivery("readyz:probe", 0));
    expect(key).toBe(true);
  });

  it("answers 503 with the reason when writes fail with STORE_FULL, while /healthz stays 200", async () => {
    const base = await start({ wrapStore: failingWrites });
    const ready = await fetch(`${base}/readyz`);
    expect(ready.status).toBe(503);
    const body = (await ready.json()) as { ready: boolean; checks: Record<string, unknown> };
    expect(body.ready).toBe(false);
    expect(body.checks.store).toEqual({
      ok: false,
      code: "STORE_FULL",
      reason: "the database is full; free disk space",
    });
    expect(body.checks.migrations).toEqual({ ok: true });
    const health = await fetch(`${base}/healthz`);
    expect(health.status).toBe(200);
    expect(await health.json()).toMatchObject({ ok: true });
  });

  it("takes added probes, such as the worker pool's, and names the one that fails", async () => {
    const base = await start({
      probes: {
        workers: () => {
          throw new Error("pool down");
        },
      },
    });
    const ready = await fetch(`${base}/readyz`);
    expect(ready.status).toBe(503);
    expect(((await ready.json()) as { checks: unknown }).checks).toEqual({
      store: { ok: true },
      migrations: { ok: true },
      workers: { ok: false, reason: "Error" },
    });
  });

  it("stays unready for a minute after real traffic met a full store", async () => {
    dir = mkdtempSync(join(tmpdir(), "plumbline-ready-"));
    const store = await openStore(`sqlite:${join(dir, "bot.db")}`, { idKey: TEST_KEY });
    const clock = new ManualClock(Date.UTC(2026, 10, 2));
    let failNext = true;
    const flaky = new Proxy(store, {
      get(target, property, receiver) {
        if (property === "transaction") {
          return (fn: Parameters<Store["transaction"]>[0]) => {
            if (failNext) {
              failNext = false;
              return Promise.reject(full());
            }
            return target.transaction(fn);
          };
        }
        const value: unknown = Reflect.get(target, property, receiver);
        return typeof value === "function" ? value.bind(target) : value;
      },
    });
    const watched = watchWrites(flaky, clock);
    const check = readiness({ store: watched.store, watched, clock });
    await expect(watched.store.transaction((tx) => tx.addDelivery("k1", 0))).rejects.toThrow();
    const during = await check();
    expect(during.ready).toBe(false);
    expect(during.checks.store).toMatchObject({ ok: false, code: "STORE_FULL" });
    clock.advance(61_000);
    expect((await check()).ready).toBe(true);
    await store.close();
  });
});

describe("/readyz on PostgreSQL", async () => {
  const run = await shouldRunPostgres();
  it.runIf(run)("is unready when the server answers every insert with disk_full", async () => {
    const schema = freshSchema();
    const store = await openStore(PG_URL, { idKey: TEST_KEY, schema, createSchema: true });
    const admin = new pg.Client({ connectionString: PG_URL });
    await admin.connect();
    try {
      const clock = new ManualClock(Date.UTC(2026, 10, 2));
      expect((await readiness({ store, clock })()).ready).toBe(true);
      // SQLSTATE 53100 disk_full (PostgreSQL manual, appendix A), raised by the server itself.
      await admin.query(`CREATE FUNCTION ${schema}.disk_is_full() RETURNS trigger LANGUAGE plpgsql AS
        $$ BEGIN RAISE EXCEPTION 'could not extend file' USING ERRCODE = 'disk_full'; END $$`);
      await admin.query(`CREATE TRIGGER disk_is_full BEFORE INSERT ON ${schema}.delivery
        FOR EACH ROW EXECUTE FUNCTION ${schema}.disk_is_full()`);
      const report = await readiness({ store, clock })();
      expect(report.ready).toBe(false);
      expect(report.checks.store).toMatchObject({ ok: false, code: "STORE_FULL" });
      expect(report.checks.migrations).toEqual({ ok: true });
    } finally {
      await admin.end();
      await store.close();
      await dropSchema(schema);
    }
  });
});
