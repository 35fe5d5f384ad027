/**
 * @module readiness
 * What `/readyz` answers (DESIGN.md §8: it fails when the store cannot take writes). Each check
 * is a named probe; the replica is ready when every probe passes within its time limit:
 * - `store`: a write transaction (a delivery-key insert) that is always rolled back, so a
 *   read-only, locked, unreachable or failing store shows at once and nothing is kept; and a
 *   store-level failure (`STORE_FULL`, `STORE_UNAVAILABLE`, `STORE_LOCKED`) of real traffic in the
 *   last minute, which catches a full disk that only a commit would meet;
 * - `migrations`: the schema this process opened is the latest the code knows;
 * - any probe the composition root adds (e.g. the worker pool's).
 * `/healthz` stays a liveness check: it answers while the process serves at all.
 */
import { isPlumblineError } from "../src/domain/errors.js";
import type { Clock } from "../src/ports/clock.js";
import type { Store, StoreTx } from "../src/ports/store.js";
import { LATEST_SCHEMA_VERSION } from "../src/store/migrations.js";

/** One probe: resolves when healthy, throws (ideally a PlumblineError) saying why not. */
export type ReadinessProbe = () => Promise<void> | void;

export interface CheckResult {
  readonly ok: boolean;
  /** A stable code when the probe failed with one (e.g. STORE_FULL). */
  readonly code?: string;
  readonly reason?: string;
}

export interface ReadinessReport {
  readonly ready: boolean;
  readonly checks: Readonly<Record<string, CheckResult>>;
}

/** How long a store-level failure of real traffic keeps the replica unready. */
export const WRITE_FAILURE_MEMORY_MS = 60_000;
/** Default limit for one probe. */
export const PROBE_TIMEOUT_MS = 2_000;
const STORE_LEVEL = new Set(["STORE_FULL", "STORE_UNAVAILABLE", "STORE_LOCKED"]);
const PROBE_KEY = "readyz:probe";

class ProbeRollback extends Error {}

/** A failed probe with its code and reason, for probes that are not about a PlumblineError. */
export class ProbeFailure extends Error {
  constructor(
    readonly code: string,
    readonly reason: string,
  ) {
    super(reason);
    this.name = "ProbeFailure";
  }
}

function failure(error: unknown): CheckResult {
  if (error instanceof ProbeFailure) return { ok: false, code: error.code, reason: error.reason };
  if (isPlumblineError(error)) {
    return {
      ok: false,
      code: error.code,
      reason: error.hint ? `${error.message}; ${error.hint}` : error.message,
    };
  }
  const code = (error as { code?: unknown } | null)?.code;
  return {
    ok: false,
    ...(typeof code === "string" ? { code } : {}),
    reason: error instanceof Error ? error.name : "probe failed",
  };
}

async function withinLimit(probe: ReadinessProbe, timeoutMs: number): Promise<CheckResult> {
  let timer: NodeJS.Timeout | undefined;
  const late = new Promise<CheckResult>((resolve) => {
    timer = setTimeout(
      () =>
        resolve({ ok: false, code: "PROBE_TIMEOUT", reason: `no answer within ${timeoutMs} ms` }),
      timeoutMs,
    );
  });
  try {
    return await Promise.race([
      Promise.resolve()
        .then(probe)
        .then((): CheckResult => ({ ok: true }), failure),
      late,
    ]);
  } finally {
    clearTimeout(timer);
  }
}

export interface WatchedStore {
  /** The store to hand to the bot: its transactions' store-level failures are remembered. */
  readonly store: Store;
  /** The latest store-level failure of a transaction, if one happened in the last minute. */
  recentFailure(): { code: string; reason: string } | null;
}

/** Wraps `store` so `transaction` failures with a store-level code are remembered. */
export function watchWrites(store: Store, clock: Clock): WatchedStore {
  let last: { code: string; reason: string; at: number } | null = null;
  const transaction = async <T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> => {
    try {
      const result = await store.transaction(fn);
      last = null;
      return result;
    } catch (error) {
      if (isPlumblineError(error) && STORE_LEVEL.has(error.code)) {
        last = { code: error.code, reason: error.message, at: clock.now() };
      }
      throw error;
    }
  };
  const watched = new Proxy(store, {
    get(target, property, receiver) {
      if (property === "transaction") return transaction;
      const value: unknown = Reflect.get(target, property, receiver);
      return typeof value === "function" ? value.bind(target) : value;
    },
  });
  return {
    store: watched,
    recentFailure() {
      if (last === null || clock.now() - last.at > WRITE_FAILURE_MEMORY_MS) return null;
      return { code: last.code, reason: last.reason };
    },
  };
}

/** Probes that the store takes a write now; the write is always rolled back. */
export function storeWritable(store: Store, clock: Clock): ReadinessProbe {
  return async () => {
    try {
      await store.transaction(async (tx) => {
        await tx.addDelivery(PROBE_KEY, clock.now());
        throw new ProbeRollback();
      });
    } catch (error) {
      if (error instanceof ProbeRollback) return;
      throw error;
    }
  };
}

export interface ReadinessOptions {
  /** The store as opened; pass a `watchWrites` result to include real traffic's failures. */
  readonly store: Store;
  readonly watched?: WatchedStore;
  readonly clock: Clock;
  /** More named probes (e.g. `workers` from the analysis pool). */
  readonly probes?: Readonly<Record<string, ReadinessProbe>>;
  readonly timeoutMs?: number;
}

/** The function behind `/readyz`. */
export function readiness(options: ReadinessOptions): () => Promise<ReadinessReport> {
  const timeoutMs = options.timeoutMs ?? PROBE_TIMEOUT_MS;
  const writable = storeWritable(options.store, options.clock);
  const probes: Record<string, ReadinessProbe> = {
    store: async () => {
      const recent = options.watched?.recentFailure() ?? null;
      if (recent !== null) {
        throw new ProbeFailure(
          recent.code,
          `a write failed within the last minute: ${recent.reason}`,
        );
      }
      await writable();
    },
    migrations: () => {
      const { kind, schemaVersion } = options.store;
      if (kind !== "memory" && schemaVersion !== LATEST_SCHEMA_VERSION) {
        throw new ProbeFailure(
          "STORE_SCHEMA_OLD",
          `schema version ${schemaVersion}, the code expects ${LATEST_SCHEMA_VERSION}: run plumbline migrate`,
        );
      }
    },
    ...options.probes,
  };
  return async () => {
    const names = Object.keys(probes);
    const results = await Promise.all(names.map((name) => withinLimit(probes[name], timeoutMs)));
    const checks = Object.fromEntries(names.map((name, i) => [name, results[i]]));
    return { ready: results.every((r) => r.ok), checks };
  };
}
