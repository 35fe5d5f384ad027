/**
 * Upgrading a version-1 database (as written before issue 11) to schema version 2: old delivery
 * keys become digests and are still recognised, the key first used is recorded as the store's,
 * and a version-1 store with data but without its key file is refused instead of getting a new
 * key. The version-1 schema is built from the migration list itself.
 */
import { existsSync, mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { ingest } from "../../src/ingest/ingest.js";
import { deliveryDigest, pendingMigrations } from "../../src/store/migrations.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "./test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-upgrade-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);

function versionOne(path: string): void {
  const raw = new Database(path);
  raw.exec("CREATE TABLE plumbline_schema (version INTEGER NOT NULL)");
  raw.exec("INSERT INTO plumbline_schema (version) VALUES (1)");
  for (const statement of pendingMigrations("sqlite", 0)[0].statements) raw.exec(statement);
  raw
    .prepare("INSERT INTO delivery (delivery_key, received_at) VALUES (?, ?)")
    .run("log:msg:c1:m1", T0);
  raw
    .prepare(
      "INSERT INTO consent_change (channel, member, at, level, notice) VALUES (?, ?, ?, ?, ?)",
    )
    .run("c1", "0123456789abcdef0123456789abcdef", T0, "counted", null);
  raw.close();
}

describe("upgrade from schema version 1", () => {
  it("digests old delivery keys, keeps recognising them and binds the key first given", async () => {
    const path = join(dir, "v1.db");
    versionOne(path);
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    expect(store.schemaVersion).toBeGreaterThanOrEqual(2);
    const event = { type: "message", at: T0, channel: "c1", id: "m1", author: "U1" } as const;
    expect(await ingest(store, event, "log:msg:c1:m1")).toEqual({ applied: false });
    await store.close();
    const raw = new Database(path, { readonly: true });
    expect(raw.prepare("SELECT delivery_key FROM delivery").pluck().all()).toEqual([
      deliveryDigest("log:msg:c1:m1"),
    ]);
    raw.close();
    await expect(openSqliteStore(path, { idKey: `${TEST_KEY}-other` })).rejects.toMatchObject({
      code: "STORE_KEY_MISMATCH",
    });
  });

  it("refuses a version-1 store with data whose key file is gone, generating nothing", async () => {
    const path = join(dir, "v1-nokey.db");
    versionOne(path);
    await expect(openSqliteStore(path)).rejects.toMatchObject({
      code: "STORE_NO_ID_KEY",
      hint: expect.stringContaining(`restore the key file ${path}.key`),
    });
    expect(existsSync(`${path}.key`)).toBe(false);
  });
});
