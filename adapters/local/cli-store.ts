/**
 * @module cli-store
 * The storage commands: `plumbline ingest <log> [--db URL]` imports a neutral log idempotently
 * (message ids, or a hash of any other event, are the delivery keys, so a second import changes
 * nothing), `plumbline migrate` brings the schema up to date, `plumbline purge` enforces
 * retention. `--db` overrides DATABASE_URL (default sqlite:./data/plumbline.db); the member id key
 * comes from PLUMBLINE_ID_KEY or PLUMBLINE_ID_KEY_FILE, and must be the key the store was created
 * with (else exit 2 naming what to restore). An event the store cannot apply is counted as
 * "n rejected: CODE" and the import goes on. PostgreSQL timeouts: PLUMBLINE_PG_CONNECT_TIMEOUT_MS
 * (default 5000) and PLUMBLINE_PG_STATEMENT_TIMEOUT_MS (default 30000). A user error prints one
 * line naming the problem and the fix and exits with code 2.
 */
import { resolve } from "node:path";
import { parseIsoTime } from "../../src/attention/parse-iso-time.js";
import { readEventLogFile } from "../../src/attention/read-event-log.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { logDeliveryKey } from "../../src/ingest/delivery-key.js";
import { ingestBatch } from "../../src/ingest/ingest.js";
import { DEFAULT_DEDUPE_DAYS, DEFAULT_RETENTION_DAYS, purge } from "../../src/ingest/purge.js";
import type { Store } from "../../src/ports/store.js";
import {
  DEFAULT_DATABASE_URL,
  type OpenStoreOptions,
  openStore,
} from "../../src/store/open-store.js";
import { parseCommandArgs } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";

const INGEST_USAGE = "plumbline ingest <log> [--db URL] [--skip-bad]";
const MIGRATE_USAGE = "plumbline migrate [--db URL]";
const PURGE_USAGE =
  "plumbline purge [--db URL] [--retention-days 91] [--dedupe-days 7] [--now TIME]";

/** `plumbline ingest <log>`: imports the log into the store; prints a one-line summary. */
export async function runIngest(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    { db: { type: "string" }, "skip-bad": { type: "boolean" } },
    INGEST_USAGE,
  );
  const [log, ...extra] = parsed.positionals;
  if (log === undefined) {
    throw new PlumblineError("ARG_MISSING", "no log given", { hint: `usage: ${INGEST_USAGE}` });
  }
  if (extra.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${extra[0]}"`, {
      hint: `usage: ${INGEST_USAGE}`,
    });
  }
  const { events, skipped } = await readEventLogFile(resolve(io.cwd, log), {
    skipBad: parsed.values["skip-bad"] === true,
  });
  const url = databaseUrl(parsed.values.db, io);
  const store = await openStore(url, storeOptions(io));
  try {
    const deliveries = events.map((event) => ({ event, deliveryKey: logDeliveryKey(event) }));
    const totals = await ingestBatch(store, deliveries, {
      batchSize: 500,
      receivedAt: (io.clock ?? Date.now)(),
    });
    const bad = skipped.length > 0 ? `, ${skipped.length} bad lines skipped` : "";
    const rejected = Object.entries(totals.rejected)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0))
      .map(([code, n]) => `, ${n} rejected: ${code}`)
      .join("");
    io.stdout(
      `ingested ${log} into ${redact(url)}: ${events.length} events, ${totals.applied} applied, ${totals.skipped} already seen${rejected}${bad}\n`,
    );
  } finally {
    await store.close();
  }
  return 0;
}

/** `plumbline migrate`: applies pending schema migrations and prints the version. */
export async function runMigrate(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(argv, { db: { type: "string" } }, MIGRATE_USAGE);
  noPositionals(parsed.positionals, MIGRATE_USAGE);
  const url = databaseUrl(parsed.values.db, io);
  let applied = 0;
  const store = await openStore(url, {
    ...storeOptions(io),
    onMigrated: (info) => {
      applied = info.applied;
    },
  });
  const version = store.schemaVersion;
  await store.close();
  io.stdout(
    store.kind === "memory"
      ? "the memory store keeps no schema; nothing to migrate\n"
      : `${redact(url)}: schema at version ${version} (${applied} migration${applied === 1 ? "" : "s"} applied)\n`,
  );
  return 0;
}

/** `plumbline purge`: deletes ledger rows past retention and delivery keys past 7 days. */
export async function runPurge(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    {
      db: { type: "string" },
      "retention-days": { type: "string" },
      "dedupe-days": { type: "string" },
      now: { type: "string" },
    },
    PURGE_USAGE,
  );
  noPositionals(parsed.positionals, PURGE_USAGE);
  const retentionDays = days(
    parsed.values["retention-days"],
    "--retention-days",
    DEFAULT_RETENTION_DAYS,
  );
  const dedupeDays = days(parsed.values["dedupe-days"], "--dedupe-days", DEFAULT_DEDUPE_DAYS);
  const now =
    typeof parsed.values.now === "string" ? parseNow(parsed.values.now) : (io.clock ?? Date.now)();
  const url = databaseUrl(parsed.values.db, io);
  const store: Store = await openStore(url, storeOptions(io));
  try {
    const counts = await purge(store, { now, retentionDays, dedupeDays });
    io.stdout(
      `purged ${counts.messages} ledger messages older than ${retentionDays} days and ${counts.deliveries} delivery keys older than ${dedupeDays} days\n`,
    );
  } finally {
    await store.close();
  }
  return 0;
}

export function databaseUrl(flag: unknown, io: CliIo): string {
  if (typeof flag === "string") return flag;
  const env = io.env.DATABASE_URL;
  return env !== undefined && env !== "" ? env : DEFAULT_DATABASE_URL;
}

export function storeOptions(io: CliIo): OpenStoreOptions {
  const { PLUMBLINE_ID_KEY: idKey, PLUMBLINE_ID_KEY_FILE: idKeyFile } = io.env;
  const connect = milliseconds(io.env, "PLUMBLINE_PG_CONNECT_TIMEOUT_MS");
  const statement = milliseconds(io.env, "PLUMBLINE_PG_STATEMENT_TIMEOUT_MS");
  return {
    cwd: io.cwd,
    ...(idKey ? { idKey } : {}),
    ...(idKeyFile ? { idKeyFile: resolve(io.cwd, idKeyFile) } : {}),
    ...(connect === undefined ? {} : { connectTimeoutMs: connect }),
    ...(statement === undefined ? {} : { statementTimeoutMs: statement }),
  };
}

/** A positive whole number of milliseconds from the environment, or undefined when unset. */
function milliseconds(env: CliIo["env"], name: string): number | undefined {
  const raw = env[name];
  if (raw === undefined || raw === "") return undefined;
  const value = Number(raw);
  if (!Number.isInteger(value) || value <= 0) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `${name} must be a whole number of milliseconds > 0, got "${raw}"`,
      {
        hint: `e.g. ${name}=${name.includes("CONNECT") ? 5000 : 30000}, or unset it for the default`,
      },
    );
  }
  return value;
}

function noPositionals(positionals: readonly string[], usage: string): void {
  if (positionals.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${positionals[0]}"`, {
      hint: `usage: ${usage}`,
    });
  }
}

function days(raw: unknown, flag: string, fallback: number): number {
  if (typeof raw !== "string") return fallback;
  const value = Number(raw);
  if (raw.trim() === "" || !Number.isInteger(value) || value < 0) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `${flag} must be a whole number of days ≥ 0, got "${raw}"`,
      {
        hint: `e.g. ${flag} ${fallback}`,
      },
    );
  }
  return value;
}

function parseNow(raw: string): number {
  const ms = parseIsoTime(raw);
  if (ms === null) {
    throw new PlumblineError("ARG_BAD_VALUE", `--now ${JSON.stringify(raw)} is not a time`, {
      hint: "give an ISO 8601 time with a zone, e.g. --now 2026-11-29T18:00:00Z",
    });
  }
  return ms;
}

/** The URL without its password, for output. */
export function redact(url: string): string {
  return url.replace(/^(postgres(?:ql)?:\/\/[^:/@]+):[^@]*@/, "$1:***@");
}
