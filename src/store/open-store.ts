/**
 * @module open-store
 * Opens the store a `DATABASE_URL` names: `sqlite:./data/plumbline.db` (the default; its folder is
 * created), `sqlite::memory:`, `postgres://…` (or `postgresql://…`), or `memory:`. Applies pending
 * migrations on open. The member id key comes from the options; for a SQLite file without one it
 * is generated once into `<database file>.key` (mode 0600) beside the database.
 */
import { mkdirSync } from "node:fs";
import { dirname, resolve } from "node:path";
import { PlumblineError } from "../domain/errors.js";
import type { Store } from "../ports/store.js";
import { createMemberKeyer, type KeySource, type ResolvedKey, resolveIdKey } from "./member-key.js";
import { createMemoryStore } from "./memory-store.js";
import { PostgresDriver } from "./postgres-driver.js";
import type { SqlDriver } from "./sql-driver.js";
import { bindIdKey, migrateSchema, SqlStore } from "./sql-store.js";
import { SqliteDriver, type SynchronousLevel } from "./sqlite-driver.js";

export const DEFAULT_DATABASE_URL = "sqlite:./data/plumbline.db";

export interface OpenStoreOptions extends KeySource {
  /** Base for a relative SQLite path; default process.cwd(). */
  readonly cwd?: string;
  /** SQLite: busy timeout (ms) before STORE_LOCKED; default 5000. */
  readonly busyTimeoutMs?: number;
  /** SQLite: `synchronous` level; default NORMAL. */
  readonly synchronous?: SynchronousLevel;
  /** PostgreSQL: schema to work in; `createSchema` creates it if missing. */
  readonly schema?: string;
  readonly createSchema?: boolean;
  /** PostgreSQL: pool size; default 5. */
  readonly poolSize?: number;
  /** PostgreSQL: `synchronous_commit` for this store's sessions; default: the server's. */
  readonly synchronousCommit?: "on" | "off";
  /** PostgreSQL: connect timeout (ms); default 5000. */
  readonly connectTimeoutMs?: number;
  /** PostgreSQL: statement timeout (ms); default 30000. */
  readonly statementTimeoutMs?: number;
  /** Told which migrations ran on open. */
  readonly onMigrated?: (info: { version: number; applied: number }) => void;
}

export type ParsedStoreUrl =
  | { readonly kind: "sqlite"; readonly path: string }
  | { readonly kind: "postgres"; readonly url: string }
  | { readonly kind: "memory" };

const ACCEPTED =
  "sqlite:<path> (e.g. sqlite:./data/plumbline.db), sqlite::memory:, postgres://user@host:5432/db, or memory:";

/** Parses a DATABASE_URL; STORE_BAD_URL names the accepted forms. */
export function parseStoreUrl(url: string, cwd: string = process.cwd()): ParsedStoreUrl {
  const text = url.trim();
  if (text === "memory:") return { kind: "memory" };
  if (text === "sqlite::memory:") return { kind: "sqlite", path: ":memory:" };
  if (text.startsWith("sqlite:")) {
    const path = text.slice("sqlite:".length).replace(/^\/\/(?=\/)/, "");
    if (path !== "" && !path.startsWith("//")) return { kind: "sqlite", path: resolve(cwd, path) };
  }
  if (/^postgres(ql)?:\/\/[^/\s]/.test(text)) return { kind: "postgres", url: text };
  throw new PlumblineError(
    "STORE_BAD_URL",
    `unsupported DATABASE_URL ${JSON.stringify(url)}; use ${ACCEPTED}`,
    {
      hint: `set DATABASE_URL (or --db) to one of: ${ACCEPTED}`,
    },
  );
}

/** A SQLite-backed store that can also run PRAGMAs (integrity checks, size limits in tests). */
export class SqliteStore extends SqlStore {
  constructor(
    private readonly sqlite: SqliteDriver,
    memberKey: (id: string) => string,
    schemaVersion: number,
    key: ResolvedKey,
  ) {
    super(sqlite, memberKey, schemaVersion, key);
  }

  pragma(source: string): unknown {
    return this.sqlite.pragma(source);
  }
}

/** Opens (and migrates) the store named by `url`. */
export async function openStore(url: string, options: OpenStoreOptions = {}): Promise<Store> {
  const parsed = parseStoreUrl(url, options.cwd);
  if (parsed.kind === "memory") {
    return createMemoryStore({ idKey: resolveIdKey(options, null).key });
  }
  if (parsed.kind === "sqlite") return openSqliteStore(parsed.path, options);
  return openPostgresStore(parsed.url, options);
}

/** Opens (and migrates) a SQLite store at `path` (or ":memory:"). */
export async function openSqliteStore(
  path: string,
  options: OpenStoreOptions = {},
): Promise<SqliteStore> {
  const file = path !== ":memory:";
  if (file) {
    try {
      mkdirSync(dirname(path), { recursive: true });
    } catch (error) {
      throw new PlumblineError("STORE_UNAVAILABLE", `cannot create the folder of ${path}`, {
        hint: "make the folder writable, or set DATABASE_URL to a path you can write",
        cause: error,
      });
    }
  }
  const driver = new SqliteDriver({
    path,
    ...(options.busyTimeoutMs === undefined ? {} : { busyTimeoutMs: options.busyTimeoutMs }),
    ...(options.synchronous === undefined ? {} : { synchronous: options.synchronous }),
  });
  const version = await migrateOrClose(driver, options);
  const key = await bindOrClose(driver, (empty) =>
    resolveIdKey(options, file ? `${path}.key` : null, empty),
  );
  return new SqliteStore(driver, createMemberKeyer(key.key), version, key);
}

async function openPostgresStore(url: string, options: OpenStoreOptions): Promise<Store> {
  // Checked before connecting: a missing key is refused without a round trip.
  resolveIdKey(options, null);
  const driver = new PostgresDriver({
    url,
    ...(options.schema === undefined ? {} : { schema: options.schema }),
    ...(options.poolSize === undefined ? {} : { max: options.poolSize }),
    ...(options.synchronousCommit === undefined
      ? {}
      : { synchronousCommit: options.synchronousCommit }),
    ...(options.connectTimeoutMs === undefined
      ? {}
      : { connectTimeoutMs: options.connectTimeoutMs }),
    ...(options.statementTimeoutMs === undefined
      ? {}
      : { statementTimeoutMs: options.statementTimeoutMs }),
  });
  try {
    await driver.connect({
      ...(options.schema === undefined ? {} : { schema: options.schema }),
      createSchema: options.createSchema ?? false,
    });
  } catch (error) {
    await driver.close();
    throw error;
  }
  const version = await migrateOrClose(driver, options);
  const key = await bindOrClose(driver, () => resolveIdKey(options, null));
  return new SqlStore(driver, createMemberKeyer(key.key), version, key);
}

async function bindOrClose(
  driver: SqlDriver,
  resolve: (empty: boolean) => ResolvedKey,
): Promise<ResolvedKey> {
  try {
    return await bindIdKey(driver, resolve);
  } catch (error) {
    await driver.close();
    throw error;
  }
}

async function migrateOrClose(driver: SqlDriver, options: OpenStoreOptions): Promise<number> {
  try {
    const info = await migrateSchema(driver);
    options.onMigrated?.(info);
    return info.version;
  } catch (error) {
    await driver.close();
    throw error;
  }
}
