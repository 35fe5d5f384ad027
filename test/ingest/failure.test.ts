/**
 * Failure modes of ingestion into SQLite: a full database (SQLite's `max_page_count`, which makes
 * writes fail with SQLITE_FULL — sqlite.org/pragma.html#pragma_max_page_count) and a database
 * locked by another writer (SQLITE_BUSY after the busy timeout — sqlite.org/rescode.html). Either
 * way the event gets a coded error, is not acknowledged, and leaves nothing behind.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import type { MessageEvent } from "../../src/domain/events.js";
import { ingest } from "../../src/ingest/ingest.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "../store/test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-fail-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);
const members = Array.from({ length: 20 }, (_, i) => `U${i}`);

function message(i: number): MessageEvent {
  return {
    type: "message",
    at: T0 + i,
    channel: "c1",
    id: `m${i}-${"x".repeat(200)}`,
    author: members[i % 20],
    mentions: [members[(i + 1) % 20], members[(i + 2) % 20], members[(i + 3) % 20]],
  };
}

describe("ingestion failures", () => {
  it("a full database gives STORE_FULL and applies nothing of the event", async () => {
    const store = await openSqliteStore(join(dir, "full.db"), { idKey: TEST_KEY });
    for (const m of members) {
      await ingest(
        store,
        { type: "consent", at: T0, channel: "c1", member: m, level: "counted" },
        `c-${m}`,
      );
    }
    const [{ page_count: pages }] = store.pragma("page_count") as { page_count: number }[];
    store.pragma(`max_page_count = ${pages + 2}`);
    let failedAt = -1;
    let error: unknown;
    for (let i = 0; i < 5000 && failedAt < 0; i++) {
      try {
        await ingest(store, message(i), `k${i}`);
      } catch (e) {
        failedAt = i;
        error = e;
      }
    }
    expect(failedAt).toBeGreaterThan(0);
    expect(error).toMatchObject({ code: "STORE_FULL" });
    const before = await store.loadSnapshot("c1");
    expect(before.messages.some((m) => m.id === message(failedAt).id)).toBe(false);
    expect(before.messages).toHaveLength(failedAt);
    store.pragma("max_page_count = 1000000");
    // The key was not kept: the redelivery applies in full.
    expect(await ingest(store, message(failedAt), `k${failedAt}`)).toEqual({ applied: true });
    const after = await store.loadSnapshot("c1");
    expect(after.messages).toHaveLength(failedAt + 1);
    expect(after.messages.find((m) => m.id === message(failedAt).id)?.mentions).toHaveLength(3);
    expect(store.pragma("integrity_check")).toEqual([{ integrity_check: "ok" }]);
    await store.close();
  });

  it("a database locked by another writer gives STORE_LOCKED and applies nothing", async () => {
    const path = join(dir, "locked.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY, busyTimeoutMs: 20 });
    await ingest(
      store,
      { type: "consent", at: T0, channel: "c1", member: "U1", level: "counted" },
      "c1",
    );
    const other = new Database(path, { timeout: 0 });
    other.exec("BEGIN EXCLUSIVE");
    await expect(ingest(store, message(1), "k1")).rejects.toMatchObject({ code: "STORE_LOCKED" });
    other.exec("ROLLBACK");
    other.close();
    expect((await store.loadSnapshot("c1")).messages).toEqual([]);
    expect(await ingest(store, message(1), "k1")).toEqual({ applied: true });
    expect(await ingest(store, message(1), "k1")).toEqual({ applied: false });
    await store.close();
  });
});
