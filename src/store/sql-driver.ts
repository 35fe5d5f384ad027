/**
 * @module sql-driver
 * The little a SQL store needs from a database driver: run a statement, read rows, and run an
 * async function inside one transaction. Statements use `?` placeholders; the PostgreSQL driver
 * numbers them. Implemented over better-sqlite3 (sqlite-driver.ts) and pg (postgres-driver.ts).
 */
import type { SqlDialect } from "./migrations.js";

export type SqlValue = string | number | null;
export type SqlRow = Record<string, unknown>;

export interface SqlConnection {
  /** Rows of a SELECT or of a statement with RETURNING. */
  all(sql: string, params?: readonly SqlValue[]): Promise<SqlRow[]>;
  /** Runs a statement; returns the number of rows it changed. */
  run(sql: string, params?: readonly SqlValue[]): Promise<number>;
}

export interface SqlDriver {
  readonly dialect: SqlDialect;
  /**
   * Runs `fn` in one transaction on one connection; commits when it resolves, rolls back and
   * rethrows (as a coded PlumblineError where the cause is known) when it rejects.
   */
  transaction<T>(fn: (conn: SqlConnection) => Promise<T>, mode: "read" | "write"): Promise<T>;
  /** After an erasure: make sure no file keeps the erased rows' bytes (SQLite: empty the WAL). */
  afterErase?(): Promise<void>;
  close(): Promise<void>;
}

/** Serialises async critical sections: one transaction at a time per connection. */
export class Mutex {
  private tail: Promise<void> = Promise.resolve();

  run<T>(fn: () => Promise<T>): Promise<T> {
    const result = this.tail.then(fn);
    this.tail = result.then(
      () => undefined,
      () => undefined,
    );
    return result;
  }
}
