/**
 * @module ingest-bench
 * Ingestion throughput: events per second through `ingest` (one event per transaction, as the bot
 * does before acknowledging the platform) and `ingestBatch` (imports), into SQLite (WAL,
 * synchronous NORMAL and FULL) and PostgreSQL. The stream is the seeded one of the tests. The
 * PostgreSQL rows are left out, with a note, when no server answers.
 */
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { type Delivery, ingest, ingestBatch } from "../src/ingest/ingest.js";
import type { Store } from "../src/ports/store.js";
import { openSqliteStore, openStore } from "../src/store/open-store.js";
import { randomDeliveries } from "../test/ingest/random-events.js";

export interface Row {
  name: string;
  value: number;
  unit: string;
  note?: string;
}

const KEY = "bench-key-0123456789abcdef0123456789abcdef";

async function timeSingle(store: Store, deliveries: readonly Delivery[]): Promise<number> {
  const start = process.hrtime.bigint();
  for (const d of deliveries) await ingest(store, d.event, d.deliveryKey);
  return Number(process.hrtime.bigint() - start) / 1e9;
}

async function timeBatch(store: Store, deliveries: readonly Delivery[]): Promise<number> {
  const start = process.hrtime.bigint();
  await ingestBatch(store, deliveries, { batchSize: 500 });
  return Number(process.hrtime.bigint() - start) / 1e9;
}

const rate = (n: number, seconds: number): number => Math.round(n / seconds);

export async function benchIngest(
  options: { events?: number; postgresUrl?: string } = {},
): Promise<Row[]> {
  const n = options.events ?? 20_000;
  const deliveries = randomDeliveries({ seed: 42, count: n, channels: ["c1", "c2", "c3"] });
  const rows: Row[] = [];
  const dir = mkdtempSync(join(tmpdir(), "plumbline-bench-"));
  try {
    for (const synchronous of ["NORMAL", "FULL"] as const) {
      const single = await openSqliteStore(join(dir, `single-${synchronous}.db`), {
        idKey: KEY,
        synchronous,
      });
      rows.push({
        name: `ingest sqlite single (synchronous ${synchronous})`,
        value: rate(n, await timeSingle(single, deliveries)),
        unit: "events/s",
        note: `${n} events, one transaction each, WAL`,
      });
      await single.close();
      const batch = await openSqliteStore(join(dir, `batch-${synchronous}.db`), {
        idKey: KEY,
        synchronous,
      });
      rows.push({
        name: `ingest sqlite batched (synchronous ${synchronous})`,
        value: rate(n, await timeBatch(batch, deliveries)),
        unit: "events/s",
        note: `${n} events, 500 per transaction, WAL`,
      });
      await batch.close();
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  rows.push(...(await benchPostgres(deliveries, options.postgresUrl)));
  return rows;
}

async function benchPostgres(deliveries: readonly Delivery[], url?: string): Promise<Row[]> {
  const pgUrl =
    url ??
    (process.env.DATABASE_URL?.startsWith("postgres")
      ? process.env.DATABASE_URL
      : "postgres://postgres@127.0.0.1:5432/test");
  const schema = `plumbline_bench_${randomBytes(4).toString("hex")}`;
  let store: Store;
  try {
    store = await openStore(pgUrl, { idKey: KEY, schema, createSchema: true });
  } catch (error) {
    const why = error instanceof Error ? error.message : String(error);
    return [
      { name: "ingest postgres single", value: 0, unit: "events/s", note: `not run: ${why}` },
    ];
  }
  const n = Math.min(deliveries.length, 2000);
  const part = deliveries.slice(0, n);
  const rows: Row[] = [];
  try {
    rows.push({
      name: "ingest postgres single",
      value: rate(n, await timeSingle(store, part)),
      unit: "events/s",
      note: `${n} events, one transaction each, loopback`,
    });
    await store.eraseChannel("c1");
    await store.eraseChannel("c2");
    await store.eraseChannel("c3");
    await store.purge({ ledgerBefore: 0, deliveriesBefore: Number.MAX_SAFE_INTEGER });
    rows.push({
      name: "ingest postgres batched",
      value: rate(n, await timeBatch(store, part)),
      unit: "events/s",
      note: `${n} events, 500 per transaction, loopback`,
    });
  } finally {
    await store.close();
    const client = new pg.Client({ connectionString: pgUrl });
    await client.connect();
    await client.query(`DROP SCHEMA IF EXISTS ${schema} CASCADE`);
    await client.end();
  }
  return rows;
}
