/**
 * @module sqlite-driver
 * better-sqlite3 behind the async `SqlDriver`. Every open sets `journal_mode = WAL`,
 * `synchronous` (NORMAL by default: in WAL mode a commit survives any application crash and the
 * file never corrupts; only the last commits may roll back after power loss — sqlite.org/wal.html,
 * sqlite.org/pragma.html#pragma_synchronous) and the busy timeout. Writes start with
 * `BEGIN IMMEDIATE` so a busy database fails at the start of a transaction, never half way; a mutex
 * keeps one transaction at a time on the connection, since the callback is async.
 * `secure_delete = ON` overwrites deleted content with zeros (sqlite.org/pragma.html#pragma_secure_delete)
 * and after an erasure a TRUNCATE checkpoint copies the WAL into the database and empties it
 * (sqlite.org/pragma.html#pragma_wal_checkpoint), so neither file keeps an erased row's bytes.
 */
import Database from "better-sqlite3";
import { PlumblineError } from "../domain/errors.js";
import { mapDriverError } from "./driver-errors.js";
import {
  Mutex,
  type SqlConnection,
  type SqlDriver,
  type SqlRow,
  type SqlValue,
} from "./sql-driver.js";

export type SynchronousLevel = "NORMAL" | "FULL";

export interface SqliteDriverOptions {
  /** File path, or ":memory:". */
  readonly path: string;
  /** How long a writer waits for another's lock before STORE_LOCKED; default 5000 ms. */
  readonly busyTimeoutMs?: number;
  readonly synchronous?: SynchronousLevel;
}

export class SqliteDriver implements SqlDriver {
  readonly dialect = "sqlite" as const;
  private readonly db: Database.Database;
  private readonly statements = new Map<string, Database.Statement>();
  private readonly mutex = new Mutex();
  private readonly conn: SqlConnection;

  constructor(options: SqliteDriverOptions) {
    const busy = options.busyTimeoutMs ?? 5000;
    try {
      this.db = new Database(options.path, { timeout: busy });
      this.db.pragma("journal_mode = WAL");
      this.db.pragma(`synchronous = ${options.synchronous ?? "NORMAL"}`);
      this.db.pragma(`busy_timeout = ${Math.max(0, Math.trunc(busy))}`);
      this.db.pragma("secure_delete = ON");
    } catch (error) {
      throw mapOpenError(error, options.path);
    }
    this.conn = {
      all: async (sql, params = []) => this.prepare(sql).all(...params) as SqlRow[],
      run: async (sql, params = []) => this.prepare(sql).run(...params).changes,
    };
  }

  transaction<T>(fn: (conn: SqlConnection) => Promise<T>, mode: "read" | "write"): Promise<T> {
    return this.mutex.run(async () => {
      try {
        this.db.exec(mode === "write" ? "BEGIN IMMEDIATE" : "BEGIN");
        const result = await fn(this.conn);
        this.db.exec("COMMIT");
        return result;
      } catch (error) {
        if (this.db.inTransaction) this.db.exec("ROLLBACK");
        throw mapDriverError(error);
      }
    });
  }

  afterErase(): Promise<void> {
    return this.mutex.run(async () => {
      try {
        this.db.pragma("wal_checkpoint(TRUNCATE)");
      } catch (error) {
        throw mapDriverError(error);
      }
    });
  }

  /** Runs a PRAGMA on this connection (diagnostics and tests: integrity_check, max_page_count). */
  pragma(source: string): unknown {
    return this.db.pragma(source);
  }

  async close(): Promise<void> {
    await this.mutex.run(async () => {
      if (this.db.open) this.db.close();
    });
  }

  private prepare(sql: string): Database.Statement<SqlValue[]> {
    let statement = this.statements.get(sql);
    if (statement === undefined) {
      statement = this.db.prepare(sql);
      this.statements.set(sql, statement);
    }
    return statement as Database.Statement<SqlValue[]>;
  }
}

function mapOpenError(error: unknown, path: string): unknown {
  const mapped = mapDriverError(error);
  if (mapped instanceof PlumblineError && mapped.code === "STORE_READ_ONLY") {
    return new PlumblineError(
      "STORE_READ_ONLY",
      `the SQLite database ${path} is read-only for this process`,
      {
        hint: `make ${path} and its folder writable by this user (SQLite writes ${path}-wal and ${path}-shm beside it), or copy it somewhere writable and point --db / DATABASE_URL there`,
        cause: error,
      },
    );
  }
  if (mapped !== error) return mapped;
  return new PlumblineError("STORE_UNAVAILABLE", `cannot open the SQLite database ${path}`, {
    hint: "check that the folder exists and is writable, or set DATABASE_URL to another path",
    cause: error,
  });
}
