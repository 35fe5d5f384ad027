/**
 * Issue 11's store findings on the PostgreSQL server: the shared safety suite (each run in its
 * own schema, dumped raw with row_to_json), a real program-limit failure recorded as rejected
 * (an index row above btree's maximum, SQLSTATE 54000 — PostgreSQL manual, appendix A and
 * "B-Tree Indexes", the 1/3-page limit), connect and statement timeouts (a loopback listener that
 * accepts and never answers; `pg_sleep` past `statement_timeout`, SQLSTATE 57014) and
 * `sslmode=require` against this server, which runs without TLS.
 */
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { createServer, type Socket } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import pg from "pg";
import { afterAll, describe, expect, it } from "vitest";
import { main } from "../../adapters/local/cli.js";
import { ingest } from "../../src/ingest/ingest.js";
import { openStore } from "../../src/store/open-store.js";
import { PostgresDriver } from "../../src/store/postgres-driver.js";
import { dropSchema, freshSchema, PG_URL, shouldRunPostgres } from "./postgres-env.js";
import { safetyContract } from "./safety-contract.js";
import { TEST_KEY } from "./test-key.js";

const run = await shouldRunPostgres();
const dir = mkdtempSync(join(tmpdir(), "plumbline-pgsafety-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

async function dumpSchema(schema: string): Promise<string> {
  const client = new pg.Client({ connectionString: PG_URL });
  await client.connect();
  try {
    const tables = await client.query(
      "SELECT table_name FROM information_schema.tables WHERE table_schema = $1 ORDER BY 1",
      [schema],
    );
    const parts: string[] = [];
    for (const { table_name: table } of tables.rows as { table_name: string }[]) {
      const rows = await client.query(`SELECT row_to_json(t)::text AS j FROM ${schema}.${table} t`);
      parts.push(`${table}: ${rows.rows.map((r: { j: string }) => r.j).join(",")}`);
    }
    return parts.join("\n");
  } finally {
    await client.end();
  }
}

function io(env: Record<string, string | undefined>) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    io: { stdout: (s: string) => out.push(s), stderr: (s: string) => err.push(s), env, cwd: dir },
    out,
    err,
  };
}

/** The server URL with a search_path, so the CLI works in a test schema. */
function urlIn(schema: string): string {
  return `${PG_URL}?options=${encodeURIComponent(`-c search_path=${schema}`)}`;
}

describe.skipIf(!run)("PostgreSQL store safety", () => {
  safetyContract("postgres", async () => {
    const schema = freshSchema();
    return {
      childArgs: ["postgres", PG_URL, schema],
      open: (options) => openStore(PG_URL, { ...options, schema, createSchema: true }),
      dump: () => dumpSchema(schema),
      cleanup: () => dropSchema(schema),
    };
  });

  it("a message id the server cannot index is recorded as rejected (SQLSTATE 54000)", async () => {
    const schema = freshSchema();
    const store = await openStore(PG_URL, { idKey: TEST_KEY, schema, createSchema: true });
    try {
      const at = Date.UTC(2026, 10, 2, 9);
      await ingest(
        store,
        { type: "consent", at, channel: "c1", member: "U1", level: "counted" },
        "c1",
      );
      // 12,000 random hex characters: incompressible, far above btree's 2,704-byte row limit.
      const id = randomBytes(6000).toString("hex");
      expect(
        await ingest(store, { type: "message", at, channel: "c1", id, author: "U1" }, "big"),
      ).toEqual({
        applied: false,
        rejected: "STORE_TOO_LARGE",
      });
      expect(
        await ingest(store, { type: "message", at, channel: "c1", id: "m2", author: "U1" }, "m2"),
      ).toEqual({ applied: true });
      expect(await store.countRejected()).toBe(1);
    } finally {
      await store.close();
      await dropSchema(schema);
    }
  });

  it('ingest reports an event the server refuses as "1 rejected: STORE_BAD_DATA" and goes on', async () => {
    const schema = freshSchema();
    const client = new pg.Client({ connectionString: PG_URL });
    await client.connect();
    await client.query(`CREATE SCHEMA ${schema}`);
    await client.end();
    try {
      const at = "2026-11-02T09:00:00Z";
      const lines = [
        { type: "consent", at, channel: "c1", member: "U1", level: "counted" },
        { type: "consent", at, channel: "c1", member: "U2", level: "counted" },
        // PostgreSQL text cannot hold NUL (SQLSTATE 22021); SQLite can.
        { type: "message", at, channel: "c1", id: "m\u0000x", author: "U1", mentions: ["U2"] },
        { type: "message", at, channel: "c1", id: "m2", author: "U2", mentions: ["U1"] },
      ];
      writeFileSync(
        join(dir, "poison.jsonl"),
        `${lines.map((l) => JSON.stringify(l)).join("\n")}\n`,
      );
      const env = { PLUMBLINE_ID_KEY: TEST_KEY, DATABASE_URL: urlIn(schema) };
      const first = io(env);
      expect(await main(["ingest", "poison.jsonl"], first.io), first.err.join("")).toBe(0);
      expect(first.out.join("")).toMatch(
        /4 events, 3 applied, 0 already seen, 1 rejected: STORE_BAD_DATA\n$/,
      );
      const second = io(env);
      expect(await main(["ingest", "poison.jsonl"], second.io)).toBe(0);
      expect(second.out.join("")).toMatch(/4 events, 0 applied, 4 already seen\n$/);
      const dump = await dumpSchema(schema);
      expect(dump).toMatch(
        /rejected_delivery: \{"delivery_key":"[0-9a-f]{64}","code":"STORE_BAD_DATA"/,
      );
    } finally {
      await dropSchema(schema);
    }
  });

  it("a listener that accepts and never answers gives STORE_UNAVAILABLE naming the fix", async () => {
    const sockets: Socket[] = [];
    const silent = createServer((socket) => {
      sockets.push(socket);
    });
    await new Promise<void>((resolve) => silent.listen(0, "127.0.0.1", resolve));
    const port = (silent.address() as { port: number }).port;
    try {
      const error = await openStore(`postgres://postgres@127.0.0.1:${port}/test`, {
        idKey: TEST_KEY,
        connectTimeoutMs: 300,
      }).catch((e: unknown) => e);
      expect(error).toMatchObject({
        code: "STORE_UNAVAILABLE",
        hint: expect.stringContaining("PLUMBLINE_PG_CONNECT_TIMEOUT_MS"),
      });
      expect(sockets.length).toBeGreaterThan(0);
      // The CLI: exit 2, one line, never a hang (the default would be 5 s; the setting shortens it).
      const cli = io({ PLUMBLINE_ID_KEY: TEST_KEY, PLUMBLINE_PG_CONNECT_TIMEOUT_MS: "300" });
      expect(
        await main(["migrate", "--db", `postgres://postgres@127.0.0.1:${port}/test`], cli.io),
      ).toBe(2);
      expect(cli.err.join("")).toContain("[STORE_UNAVAILABLE]");
    } finally {
      for (const s of sockets) s.destroy();
      await new Promise<void>((resolve) => silent.close(() => resolve()));
    }
  });

  it("a statement past the statement timeout gives STORE_UNAVAILABLE (SQLSTATE 57014)", async () => {
    const driver = new PostgresDriver({ url: PG_URL, statementTimeoutMs: 200 });
    try {
      await expect(
        driver.transaction((conn) => conn.all("SELECT pg_sleep(3)"), "read"),
      ).rejects.toMatchObject({
        code: "STORE_UNAVAILABLE",
        message: expect.stringContaining("statement timeout"),
      });
      // The pool still works afterwards.
      expect(await driver.transaction((conn) => conn.all("SELECT 1 AS one"), "read")).toEqual([
        { one: 1 },
      ]);
    } finally {
      await driver.close();
    }
  });

  it("sslmode=require against a server without TLS gives STORE_TLS naming the fix", async () => {
    const error = await openStore(`${PG_URL}?sslmode=require`, { idKey: TEST_KEY }).catch(
      (e: unknown) => e,
    );
    expect(error).toMatchObject({
      code: "STORE_TLS",
      hint: expect.stringContaining("sslmode=require"),
    });
    const cli = io({ PLUMBLINE_ID_KEY: TEST_KEY });
    expect(await main(["migrate", "--db", `${PG_URL}?sslmode=require`], cli.io)).toBe(2);
    expect(cli.err.join("")).toContain("[STORE_TLS]");
    expect(cli.err.join("")).not.toContain("internal error");
  });
});
