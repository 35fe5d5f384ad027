/**
 * @module postgres-driver
 * pg's connection pool behind the async `SqlDriver`. Each transaction takes one pooled client;
 * `?` placeholders become `$1…$n` in named (prepared) statements. An optional schema is set as
 * each connection's `search_path` before its first use, so test runs (and tenants) can live side
 * by side in one database.
 * Writes run at READ COMMITTED: the delivery-key insert with ON CONFLICT DO NOTHING waits for a
 * concurrent insert of the same key to commit or roll back, which makes two replicas apply each
 * delivery once (PostgreSQL manual, "INSERT", ON CONFLICT clause).
 */
import pg from "pg";
import { mapDriverError } from "./driver-errors.js";
import type { SqlConnection, SqlDriver, SqlValue } from "./sql-driver.js";

/** Arbitrary fixed id of the advisory lock taken while creating a schema. */
const SCHEMA_LOCK = 7_305_113;

export interface PostgresDriverOptions {
  readonly url: string;
  /** Schema to work in (must exist unless `createSchema`); default: the server's search_path. */
  readonly schema?: string;
  /** Create the schema if missing. */
  readonly createSchema?: boolean;
  /** Pool size; default 5. */
  readonly max?: number;
  /**
   * `synchronous_commit` for this store's sessions; default: the server's (normally on). "off"
   * trades the last few commits after a server crash for speed, never consistency.
   */
  readonly synchronousCommit?: "on" | "off";
  /** How long to wait for a connection (TCP, TLS and startup) before STORE_UNAVAILABLE. */
  readonly connectTimeoutMs?: number;
  /**
   * The server's `statement_timeout` for this store's sessions; the client also gives up on an
   * answer this long plus 5 s after a query was sent (a server that stopped answering).
   */
  readonly statementTimeoutMs?: number;
}

/** Defaults: 5 s to connect, 30 s per statement. */
export const DEFAULT_CONNECT_TIMEOUT_MS = 5000;
export const DEFAULT_STATEMENT_TIMEOUT_MS = 30_000;

/** A safe identifier for a schema name (letters, digits, underscore). */
export function assertSchemaName(schema: string): string {
  if (!/^[A-Za-z_][A-Za-z0-9_]{0,62}$/.test(schema)) {
    throw new Error(`invalid schema name ${JSON.stringify(schema)}`);
  }
  return schema;
}

export class PostgresDriver implements SqlDriver {
  readonly dialect = "postgres" as const;
  private readonly pool: pg.Pool;
  private readonly numbered = new Map<string, { name: string; text: string }>();
  private closed = false;
  /** Statements run once on each new pooled connection before its first use. */
  private readonly setup: string[] = [];
  private readonly ready = new WeakSet<pg.PoolClient>();

  constructor(options: PostgresDriverOptions) {
    const schema = options.schema === undefined ? undefined : assertSchemaName(options.schema);
    const statementTimeout = Math.max(
      1,
      Math.trunc(options.statementTimeoutMs ?? DEFAULT_STATEMENT_TIMEOUT_MS),
    );
    this.pool = new pg.Pool({
      connectionString: options.url,
      max: options.max ?? 5,
      connectionTimeoutMillis: Math.max(
        1,
        Math.trunc(options.connectTimeoutMs ?? DEFAULT_CONNECT_TIMEOUT_MS),
      ),
      statement_timeout: statementTimeout,
      query_timeout: statementTimeout + 5000,
    });
    // Set per session, not through the startup `options` (a URL's own options would replace it).
    if (schema !== undefined) this.setup.push(`SET search_path TO ${schema}`);
    if (options.synchronousCommit !== undefined) {
      this.setup.push(
        `SET synchronous_commit TO ${options.synchronousCommit === "off" ? "off" : "on"}`,
      );
    }
    // An idle client losing its connection must not crash the process; the next query reports it.
    this.pool.on("error", () => undefined);
  }

  /** Checks the connection (and creates the schema when asked). */
  async connect(options: { schema?: string; createSchema?: boolean }): Promise<void> {
    try {
      const client = await this.pool.connect();
      let failure: Error | undefined;
      try {
        if (options.createSchema && options.schema !== undefined) {
          // Concurrent CREATE SCHEMA IF NOT EXISTS can still collide: serialise on a lock.
          await client.query("BEGIN");
          await client.query("SELECT pg_advisory_xact_lock($1)", [SCHEMA_LOCK]);
          await client.query(`CREATE SCHEMA IF NOT EXISTS ${assertSchemaName(options.schema)}`);
          await client.query("COMMIT");
        }
      } catch (error) {
        failure = error instanceof Error ? error : new Error(String(error));
        throw error;
      } finally {
        // A client that failed mid-transaction is discarded, not returned to the pool.
        client.release(failure);
      }
    } catch (error) {
      throw mapDriverError(error);
    }
  }

  async transaction<T>(
    fn: (conn: SqlConnection) => Promise<T>,
    mode: "read" | "write",
  ): Promise<T> {
    let client: pg.PoolClient;
    try {
      client = await this.pool.connect();
      if (!this.ready.has(client)) {
        for (const statement of this.setup) await client.query(statement);
        this.ready.add(client);
      }
    } catch (error) {
      throw mapDriverError(error);
    }
    const conn: SqlConnection = {
      all: async (sql, params = []) => (await client.query(this.statement(sql, params))).rows,
      run: async (sql, params = []) =>
        (await client.query(this.statement(sql, params))).rowCount ?? 0,
    };
    let broken: Error | undefined;
    try {
      await client.query(
        mode === "write" ? "BEGIN" : "BEGIN ISOLATION LEVEL REPEATABLE READ READ ONLY",
      );
      const result = await fn(conn);
      await client.query("COMMIT");
      return result;
    } catch (error) {
      try {
        await client.query("ROLLBACK");
      } catch (rollbackError) {
        broken = rollbackError instanceof Error ? rollbackError : new Error(String(rollbackError));
      }
      throw mapDriverError(error);
    } finally {
      client.release(broken);
    }
  }

  async close(): Promise<void> {
    if (this.closed) return;
    this.closed = true;
    await this.pool.end();
  }

  /** A named (server-side prepared, cached per connection by pg) statement for `sql`. */
  private statement(sql: string, params: readonly SqlValue[]): pg.QueryConfig<SqlValue[]> {
    let prepared = this.numbered.get(sql);
    if (prepared === undefined) {
      let i = 0;
      prepared = {
        name: `plumbline_${this.numbered.size}`,
        text: sql.replace(/\?/g, () => `$${++i}`),
      };
      this.numbered.set(sql, prepared);
    }
    return { ...prepared, values: params as SqlValue[] };
  }
}
