/**
 * What `ingest` and `ingestBatch` do when the store fails (src/ingest/ingest.ts, DESIGN.md §8):
 * a transient code is thrown and nothing is kept, so the platform's redelivery can succeed; any
 * other failure is recorded as rejected and counts as seen; batches report their totals and
 * restate STORE_FULL with what was committed. Failures are injected into the in-memory store's
 * transactions, one operation at a time.
 */
import { describe, expect, it } from "vitest";
import { type ErrorCode, PlumblineError } from "../../src/domain/errors.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { leave } from "../../src/ingest/erase.js";
import {
  type Delivery,
  type IngestTotals,
  ingest,
  ingestBatch,
  sum,
} from "../../src/ingest/ingest.js";
import type { Store, StoreTx } from "../../src/ports/store.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { makeConsent, makeGroup, makeMessage, T0 } from "../attention/ledger-builders.js";
import { failingInserts } from "../store/failing-store.js";
import { TEST_KEY } from "../store/test-key.js";

const coded = (code: ErrorCode) => () => new PlumblineError(code, "injected");

async function seeded(): Promise<Store> {
  const store = createMemoryStore({ idKey: TEST_KEY });
  await ingest(store, makeConsent("U1", "counted"), "c-U1", { receivedAt: T0 });
  await ingest(store, makeConsent("U2", "counted"), "c-U2", { receivedAt: T0 });
  return store;
}

const msg = (id: string, i = 1): ChatEvent =>
  makeMessage({ id, author: "U1", at: T0 + i, mentions: ["U2"] });

async function messageIds(store: Store): Promise<string[]> {
  return (await store.loadSnapshot("c1")).messages.map((m) => m.id);
}

// The codes ingest.ts documents as transient ("a redelivery may succeed").
const TRANSIENT: ErrorCode[] = [
  "STORE_LOCKED",
  "STORE_FULL",
  "STORE_UNAVAILABLE",
  "STORE_READ_ONLY",
  "STORE_TLS",
  "STORE_NO_ID_KEY",
  "STORE_KEY_MISMATCH",
];

describe("ingest: a failing store", () => {
  it.each(TRANSIENT)(
    "%s is thrown, nothing is recorded, and the redelivery applies",
    async (code) => {
      const store = await seeded();
      const flaky = failingInserts(store, new Set(["m1"]), coded(code));
      await expect(ingest(flaky, msg("m1"), "k1", { receivedAt: T0 })).rejects.toMatchObject({
        code,
      });
      expect(await store.countRejected()).toBe(0);
      expect(await messageIds(store)).toEqual([]);
      // The key was not kept: the same delivery applies once the store works again.
      expect(await ingest(store, msg("m1"), "k1", { receivedAt: T0 })).toEqual({ applied: true });
      expect(await messageIds(store)).toEqual(["m1"]);
    },
  );

  it("any other code is recorded as rejected under that code, once; the key counts as seen", async () => {
    const store = await seeded();
    const flaky = failingInserts(store, new Set(["m1"]), coded("STORE_TOO_LARGE"));
    expect(await ingest(flaky, msg("m1"), "k1", { receivedAt: T0 })).toEqual({
      applied: false,
      rejected: "STORE_TOO_LARGE",
    });
    expect(await store.countRejected()).toBe(1);
    expect(await ingest(store, msg("m1"), "k1", { receivedAt: T0 })).toEqual({ applied: false });
    expect(await store.countRejected()).toBe(1);
    expect(await messageIds(store)).toEqual([]);
  });

  it("an error without a code is recorded as STORE_REJECTED", async () => {
    const store = await seeded();
    const flaky = failingInserts(store, new Set(["m1"]), () => new TypeError("injected bug"));
    expect(await ingest(flaky, msg("m1"), "k1", { receivedAt: T0 })).toEqual({
      applied: false,
      rejected: "STORE_REJECTED",
    });
    expect(await store.countRejected()).toBe(1);
  });

  it("a key recorded by someone else between the failure and the record is not recorded again", async () => {
    const store = await seeded();
    // Another replica stores the same delivery after this one's transaction failed.
    const racing = new Proxy(store, {
      get(target, prop, receiver) {
        if (prop === "transaction") {
          let first = true;
          return async <T>(fn: (tx: StoreTx) => Promise<T>) => {
            try {
              return await failingInserts(
                target,
                new Set(["m1"]),
                coded("STORE_TOO_LARGE"),
              ).transaction(fn);
            } catch (error) {
              if (first) {
                first = false;
                await target.transaction((tx) => tx.addDelivery("k1", T0));
              }
              throw error;
            }
          };
        }
        const value = Reflect.get(target, prop, receiver);
        return typeof value === "function" ? value.bind(target) : value;
      },
    });
    expect(await ingest(racing, msg("m1"), "k1", { receivedAt: T0 })).toEqual({ applied: false });
    expect(await store.countRejected()).toBe(0);
  });

  it("without receivedAt the delivery is stamped now, so a purge of older keys keeps it", async () => {
    const store = await seeded();
    const before = Date.now();
    expect(await ingest(store, msg("m1"), "k1")).toEqual({ applied: true });
    // Keys received before `before` go (the two consents at T0, long past); k1 stays.
    const counts = await store.purge({ ledgerBefore: 0, deliveriesBefore: before });
    expect(counts.deliveries).toBe(2);
    expect(await ingest(store, msg("m1"), "k1")).toEqual({ applied: false });
    // A cutoff a minute from now takes k1 too: it was stamped with a real time.
    const later = await store.purge({ ledgerBefore: 0, deliveriesBefore: Date.now() + 60_000 });
    expect(later.deliveries).toBe(1);
  });
});

function deliveries(ids: readonly string[]): Delivery[] {
  return ids.map((id, i) => ({ event: msg(id, i + 1), deliveryKey: `k-${id}` }));
}

describe("ingestBatch", () => {
  it("commits batchSize deliveries per transaction and reports running totals after each", async () => {
    const store = await seeded();
    const seen: IngestTotals[] = [];
    const totals = await ingestBatch(store, deliveries(["a", "b", "c", "d", "e"]), {
      batchSize: 2,
      receivedAt: T0,
      onBatch: (t) => seen.push(t),
    });
    expect(totals).toEqual({ applied: 5, skipped: 0, rejected: {} });
    expect(seen.map((t) => t.applied)).toEqual([2, 4, 5]);
    // Each report is a copy: later batches do not change what an earlier callback was given.
    expect(seen[0]).toEqual({ applied: 2, skipped: 0, rejected: {} });
  });

  it("a batch size below 1 means 1 and a fraction is truncated; the default is 500", async () => {
    const store = await seeded();
    const calls: number[] = [];
    await ingestBatch(store, deliveries(["a", "b", "c"]), {
      batchSize: 0,
      receivedAt: T0,
      onBatch: (t) => calls.push(t.applied),
    });
    expect(calls).toEqual([1, 2, 3]);
    calls.length = 0;
    await ingestBatch(store, deliveries(["d", "e", "f", "g", "h"]), {
      batchSize: 2.9,
      receivedAt: T0,
      onBatch: (t) => calls.push(t.applied),
    });
    expect(calls).toEqual([2, 4, 5]);
    calls.length = 0;
    const many = deliveries(Array.from({ length: 501 }, (_, i) => `n${i}`));
    await ingestBatch(store, many, { receivedAt: T0, onBatch: (t) => calls.push(t.applied) });
    expect(calls).toEqual([500, 501]);
  });

  it("counts repeats as skipped, in a batch and in the replay after a rejected event", async () => {
    const store = await seeded();
    await ingest(store, msg("a", 1), "k-a", { receivedAt: T0 });
    const flaky = failingInserts(store, new Set(["bad"]), coded("STORE_TOO_LARGE"));
    const totals = await ingestBatch(flaky, deliveries(["a", "b", "bad", "c"]), {
      receivedAt: T0,
    });
    // The batch failed for "bad", so it was replayed one delivery at a time.
    expect(totals).toEqual({ applied: 2, skipped: 1, rejected: { STORE_TOO_LARGE: 1 } });
    const again = await ingestBatch(store, deliveries(["a", "b", "bad", "c"]), { receivedAt: T0 });
    expect(again).toEqual({ applied: 0, skipped: 4, rejected: {} });
    expect(await messageIds(store)).toEqual(["a", "b", "c"]);
  });

  it("adds up rejections of one code across batches", async () => {
    const store = await seeded();
    const flaky = failingInserts(store, new Set(["x", "y"]), coded("STORE_TOO_LARGE"));
    const seen: IngestTotals[] = [];
    const totals = await ingestBatch(flaky, deliveries(["x", "a", "y"]), {
      batchSize: 2,
      receivedAt: T0,
      onBatch: (t) => seen.push(t),
    });
    expect(totals).toEqual({ applied: 1, skipped: 0, rejected: { STORE_TOO_LARGE: 2 } });
    // The progress reports carry the rejections so far, each a copy of its moment.
    expect(seen).toEqual([
      { applied: 1, skipped: 0, rejected: { STORE_TOO_LARGE: 1 } },
      { applied: 1, skipped: 0, rejected: { STORE_TOO_LARGE: 2 } },
    ]);
  });

  it("STORE_FULL is restated with the count committed before it and the fix", async () => {
    const store = await seeded();
    const full = failingInserts(store, new Set(["d"]), coded("STORE_FULL"));
    const error = await ingestBatch(full, deliveries(["a", "b", "c", "d"]), {
      batchSize: 2,
      receivedAt: T0,
    }).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(PlumblineError);
    const e = error as PlumblineError;
    expect(e.code).toBe("STORE_FULL");
    expect(e.message).toBe(
      "the database is full: 2 events were committed before the failure (2 applied), the batch in progress was not stored",
    );
    expect(e.hint).toContain("run the same import again");
    expect(e.hint).toContain("plumbline purge");
    expect((e as Error & { cause?: unknown }).cause).toMatchObject({ message: "injected" });
    expect(await messageIds(store)).toEqual(["a", "b"]);
  });

  it("STORE_FULL after one committed event says 'was'; repeats and rejections count as committed", async () => {
    const store = await seeded();
    await ingest(store, msg("a", 1), "k-a", { receivedAt: T0 });
    const full = failingInserts(store, new Set(["c"]), coded("STORE_FULL"));
    const one = await ingestBatch(full, deliveries(["a", "c"]), {
      batchSize: 1,
      receivedAt: T0,
    }).catch((e: unknown) => e);
    expect((one as Error).message).toBe(
      "the database is full: 1 event was committed before the failure (0 applied), the batch in progress was not stored",
    );
    // A rejected event in an earlier batch counts too; the failure inside the replay is restated.
    const mixed = failingInserts(store, new Set(["r"]), coded("STORE_TOO_LARGE"));
    const both = new Proxy(mixed, {
      get(target, prop, receiver) {
        if (prop === "transaction") {
          return <T>(fn: (tx: StoreTx) => Promise<T>) =>
            failingInserts(target, new Set(["z"]), coded("STORE_FULL")).transaction(fn);
        }
        const value = Reflect.get(target, prop, receiver);
        return typeof value === "function" ? value.bind(target) : value;
      },
    });
    const replay = await ingestBatch(both, deliveries(["b", "r", "z"]), {
      batchSize: 3,
      receivedAt: T0,
    }).catch((e: unknown) => e);
    // The batch fails for "r" (not transient) and is replayed; "b" and "r" are then committed
    // one at a time and "z" fails for good.
    expect((replay as Error).message).toBe(
      "the database is full: 2 events were committed before the failure (1 applied), the batch in progress was not stored",
    );
  });

  it("other transient codes are thrown unchanged", async () => {
    const store = await seeded();
    const injected = new PlumblineError("STORE_LOCKED", "injected lock");
    const locked = failingInserts(store, new Set(["b"]), () => injected);
    const error = await ingestBatch(locked, deliveries(["a", "b"]), {
      batchSize: 1,
      receivedAt: T0,
    }).catch((e: unknown) => e);
    expect(error).toBe(injected);
  });

  it("sum adds the counts of every code", () => {
    expect(sum({})).toBe(0);
    expect(sum({ A: 2, B: 3 })).toBe(5);
  });
});

describe("delivery keys: their owner and their time", () => {
  it("a message's, consent's and group change's delivery key belongs to its member: leave erases it", async () => {
    // DESIGN.md §7: leave deletes every row naming the member, delivery keys included. A key left
    // behind would still be a trace of the member's activity, and would skip a later redelivery.
    const store = await seeded();
    const events: Delivery[] = [
      { event: msg("m1", 1), deliveryKey: "k-m1" },
      { event: makeGroup("U1", "north", T0 + 2), deliveryKey: "k-g1" },
      { event: makeMessage({ id: "m2", author: "U2", at: T0 + 3 }), deliveryKey: "k-m2" },
      { event: { type: "delete", at: T0 + 4, channel: "c1", id: "m2" }, deliveryKey: "k-d2" },
    ];
    await ingestBatch(store, events, { receivedAt: T0 });
    await leave(store, "c1", "U1");
    // U1's consent, message and group keys are gone; U2's consent and message keys stay, and the
    // delete (which names no member) stays.
    const counts = await store.purge({ ledgerBefore: 0, deliveriesBefore: T0 + 1 });
    expect(counts.deliveries).toBe(3);
    expect(await ingest(store, msg("m1", 1), "k-m1", { receivedAt: T0 })).toEqual({
      applied: true,
    });
  });

  it("a batch stamps its deliveries with receivedAt, also when it is replayed one by one", async () => {
    const store = await seeded();
    const flaky = failingInserts(store, new Set(["bad"]), coded("STORE_TOO_LARGE"));
    await ingestBatch(store, deliveries(["a", "b"]), { receivedAt: T0 + 5 });
    await ingestBatch(flaky, deliveries(["c", "bad", "d"]), { receivedAt: T0 + 5 });
    // Everything was received at T0 + 5: a cutoff just after takes every key (2 consents too).
    const counts = await store.purge({ ledgerBefore: 0, deliveriesBefore: T0 + 6 });
    expect(counts.deliveries).toBe(2 + 2 + 3);
  });
});
