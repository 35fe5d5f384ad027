/**
 * @module postgres-env
 * Where the PostgreSQL tests run: `DATABASE_URL` when it is a postgres URL, else the local
 * default. Each fixture gets its own schema, created on open and dropped afterwards. With
 * PLUMBLINE_REQUIRE_POSTGRES=1 (CI) a missing server fails the suite instead of skipping it.
 */
import { randomBytes } from "node:crypto";
import pg from "pg";

export const PG_URL = process.env.DATABASE_URL?.startsWith("postgres")
  ? process.env.DATABASE_URL
  : "postgres://postgres@127.0.0.1:5432/test";

export const PG_REQUIRED = process.env.PLUMBLINE_REQUIRE_POSTGRES === "1";

/** True when a server answers at PG_URL. */
export async function postgresAvailable(): Promise<boolean> {
  const client = new pg.Client({ connectionString: PG_URL, connectionTimeoutMillis: 3000 });
  try {
    await client.connect();
    await client.query("SELECT 1");
    return true;
  } catch {
    return false;
  } finally {
    await client.end().catch(() => undefined);
  }
}

/** A fresh schema name for one test run. */
export function freshSchema(): string {
  return `plumbline_test_${process.pid}_${randomBytes(4).toString("hex")}`;
}

export async function dropSchema(schema: string): Promise<void> {
  const client = new pg.Client({ connectionString: PG_URL });
  await client.connect();
  try {
    await client.query(`DROP SCHEMA IF EXISTS ${schema} CASCADE`);
  } finally {
    await client.end();
  }
}

/** Whether to run the PostgreSQL tests; throws in CI when the server is missing. */
export async function shouldRunPostgres(): Promise<boolean> {
  const available = await postgresAvailable();
  if (!available && PG_REQUIRED) {
    throw new Error(
      `PostgreSQL is required (PLUMBLINE_REQUIRE_POSTGRES=1) but no server answers at ${PG_URL}; start it or set DATABASE_URL`,
    );
  }
  return available;
}
