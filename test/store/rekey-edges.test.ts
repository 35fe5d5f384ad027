/**
 * `rekey` on SQLite at its edges (src/store/sql-rekey.ts): an empty store, more members than one
 * insert batch (100), a new secret already in the key, and an old key that is not the store's.
 * Every refusal leaves the store as it was, still open to its old key.
 */
import { createHmac } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { ingestBatch } from "../../src/ingest/ingest.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import { MEMBER_COLUMNS } from "../../src/store/sql-rekey.js";
import type { SqlStore } from "../../src/store/sql-store.js";
import { makeConsent, makeMessage, T0 } from "../attention/ledger-builders.js";
import { TEST_KEY } from "./test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-rekey-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let n = 0;
const NEW_SECRET = "rekey-edge-secret-00112233445566778899aabbccdd";
const OTHER_KEY = "some-other-key-ffeeddccbbaa99887766554433221100";

// RFC 2104 HMAC-SHA256 by node:crypto directly, first 128 bits (the store's member key form).
const hmac = (key: string, value: string) =>
  createHmac("sha256", key).update(value).digest("hex").slice(0, 32);

async function fresh(): Promise<{ path: string; store: SqlStore }> {
  const path = join(dir, `rekey-${n++}.db`);
  return { path, store: (await openSqliteStore(path, { idKey: TEST_KEY })) as SqlStore };
}

/** Non-null member cells in every member column, counted with SQLite directly. */
function memberCells(path: string): number {
  const raw = new Database(path, { readonly: true });
  try {
    return MEMBER_COLUMNS.reduce((total, [table, column]) => {
      const row = raw
        .prepare(`SELECT COUNT(*) AS n FROM ${table} WHERE ${column} IS NOT NULL`)
        .get() as { n: number };
      return total + row.n;
    }, 0);
  } finally {
    raw.close();
  }
}

describe("rekey edges (SQLite)", () => {
  it("re-keys an empty store", async () => {
    const { path, store } = await fresh();
    const result = await store.rekey({ oldKey: TEST_KEY, newSecret: NEW_SECRET });
    expect(result).toEqual({ key: `${TEST_KEY}\n${NEW_SECRET}`, members: 0, rows: 0 });
    await store.close();
    const reopened = await openSqliteStore(path, { idKey: result.key });
    await reopened.close();
  });

  it("re-keys 150 members (two insert batches), counting every member cell it rewrites", async () => {
    const { path, store } = await fresh();
    const members = Array.from({ length: 150 }, (_, i) => `U${i}`);
    const events = [
      ...members.map((m) => makeConsent(m, "counted")),
      ...members.map((m, i) =>
        makeMessage({ id: `m${i}`, author: m, at: T0 + 1 + i, mentions: [members[(i + 1) % 150]] }),
      ),
    ];
    await ingestBatch(
      store,
      events.map((event, i) => ({ event, deliveryKey: `k${i}` })),
      { receivedAt: T0 },
    );
    const before = await store.loadSnapshot("c1");
    await store.close();
    const cells = memberCells(path);
    const again = (await openSqliteStore(path, { idKey: TEST_KEY })) as SqlStore;
    const result = await again.rekey({ oldKey: TEST_KEY, newSecret: NEW_SECRET });
    await again.close();
    expect(result.members).toBe(150);
    expect(result.rows).toBe(cells);
    const rekeyed = await openSqliteStore(path, { idKey: result.key });
    expect(rekeyed.memberKey("U7")).toBe(hmac(NEW_SECRET, hmac(TEST_KEY, "U7")));
    const after = await rekeyed.loadSnapshot("c1");
    expect(after.messages).toHaveLength(before.messages.length);
    expect(after.messages.every((m) => m.mentions.length === 1)).toBe(true);
    await rekeyed.close();
  });

  it("refuses a new secret already in the key, and an old key that is not the store's", async () => {
    const { path, store } = await fresh();
    await ingestBatch(store, [{ event: makeConsent("U1", "counted"), deliveryKey: "c" }], {
      receivedAt: T0,
    });
    const before = await store.loadSnapshot("c1");
    await expect(store.rekey({ oldKey: TEST_KEY, newSecret: TEST_KEY })).rejects.toMatchObject({
      code: "ARG_BAD_VALUE",
      message: "the new key is already part of the store's key",
    });
    await expect(store.rekey({ oldKey: OTHER_KEY, newSecret: NEW_SECRET })).rejects.toMatchObject({
      code: "STORE_KEY_MISMATCH",
    });
    await store.close();
    const reopened = await openSqliteStore(path, { idKey: TEST_KEY });
    expect(await reopened.loadSnapshot("c1")).toEqual(before);
    await reopened.close();
  });
});
