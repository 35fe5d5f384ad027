/**
 * The retention purge at its edges and the log's delivery keys, on the in-memory store.
 * Retention: DESIGN.md §7 — ledger messages older than 91 days and delivery keys received more
 * than 7 days ago are deleted; "older than" is strict, so a row exactly 91 days old stays.
 * Delivery keys: a message's key is its channel and id; any other event's is a SHA-256 of its
 * canonical JSON (object keys sorted, undefined left out), so importing the same log twice
 * changes nothing. The canonical text below is written out by hand from that rule, and the digest
 * is checked against SHA-256's published test vector for "abc" (FIPS 180-2, Appendix B.1) through
 * node:crypto before it is trusted for the comparison.
 */
import { createHash } from "node:crypto";
import { afterEach, describe, expect, it } from "vitest";
import type { ChatEvent } from "../../src/domain/events.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { canonicalJson, logDeliveryKey } from "../../src/ingest/delivery-key.js";
import { ingest } from "../../src/ingest/ingest.js";
import { DEFAULT_DEDUPE_DAYS, DEFAULT_RETENTION_DAYS, purge } from "../../src/ingest/purge.js";
import type { Store } from "../../src/ports/store.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { makeConsent } from "../attention/ledger-builders.js";

const KEY = "purge-test-key-0123456789abcdef0123456789";
const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);
const open: Store[] = [];

afterEach(async () => {
  for (const s of open.splice(0)) await s.close();
});

async function store(): Promise<Store> {
  const s = await createMemoryStore({ idKey: KEY });
  open.push(s);
  return s;
}

const message = (id: string, at: number): ChatEvent => ({
  type: "message",
  at,
  channel: "c1",
  id,
  author: "U1",
});

describe("purge at its edges (DESIGN.md §7: 91 days of ledger, 7 days of delivery keys)", () => {
  it("the defaults are 91 and 7 days", () => {
    expect(DEFAULT_RETENTION_DAYS).toBe(91);
    expect(DEFAULT_DEDUPE_DAYS).toBe(7);
  });

  it("a message exactly 91 days old stays; one a millisecond older goes", async () => {
    const s = await store();
    await ingest(s, makeConsent("U1", "counted"), "k0", { receivedAt: T0 });
    const now = T0 + 200 * DAY_MS;
    const edge = now - 91 * DAY_MS;
    await ingest(s, message("edge", edge), "k1", { receivedAt: now });
    await ingest(s, message("older", edge - 1), "k2", { receivedAt: now });
    const counts = await purge(s, { now });
    expect(counts.messages).toBe(1);
    expect((await s.loadSnapshot("c1")).messages.map((m) => m.id)).toEqual(["edge"]);
  });

  it("a delivery key received exactly 7 days ago stays (a redelivery is still a duplicate)", async () => {
    const s = await store();
    const now = T0 + 30 * DAY_MS;
    await ingest(s, makeConsent("U1", "counted"), "edge", { receivedAt: now - 7 * DAY_MS });
    await ingest(s, makeConsent("U2", "counted"), "older", { receivedAt: now - 7 * DAY_MS - 1 });
    const counts = await purge(s, { now });
    expect(counts.deliveries).toBe(1);
    expect(
      (await ingest(s, makeConsent("U1", "counted"), "edge", { receivedAt: now })).applied,
    ).toBe(false);
    expect(
      (await ingest(s, makeConsent("U2", "counted"), "older", { receivedAt: now })).applied,
    ).toBe(true);
  });

  it("given retention and dedupe days are used in place of the defaults", async () => {
    const s = await store();
    const now = T0 + 200 * DAY_MS;
    await ingest(s, makeConsent("U1", "counted"), "k0", { receivedAt: now - 3 * DAY_MS });
    await ingest(s, message("m10", now - 10 * DAY_MS), "k1", { receivedAt: now - 1 * DAY_MS });
    await ingest(s, message("m4", now - 4 * DAY_MS), "k2", { receivedAt: now - 1 * DAY_MS });
    const counts = await purge(s, { now, retentionDays: 5, dedupeDays: 2 });
    expect(counts).toEqual({ messages: 1, deliveries: 1 });
    expect((await s.loadSnapshot("c1")).messages.map((m) => m.id)).toEqual(["m4"]);
  });

  it("0 days is allowed; a negative, NaN or infinite value is refused naming the option and the fix", async () => {
    const s = await store();
    await expect(purge(s, { now: T0, retentionDays: 0, dedupeDays: 0 })).resolves.toEqual({
      messages: 0,
      deliveries: 0,
    });
    for (const [option, value] of [
      ["retentionDays", -1],
      ["retentionDays", Number.NaN],
      ["dedupeDays", -0.5],
      ["dedupeDays", Number.POSITIVE_INFINITY],
    ] as const) {
      let caught: unknown;
      try {
        purge(s, { now: T0, [option]: value });
      } catch (error) {
        caught = error;
      }
      expect(caught).toMatchObject({ code: "ARG_BAD_VALUE" });
      const error = caught as { message: string; hint?: string };
      expect(error.message).toContain(`${option} must be a number of days ≥ 0, got ${value}`);
      expect(error.hint).toContain(`give ${option} as a whole number of days, e.g.`);
      expect(error.hint).toContain(option === "dedupeDays" ? "e.g. 7" : "e.g. 91");
    }
  });
});

describe("log delivery keys", () => {
  it("node:crypto's SHA-256 gives FIPS 180-2's published digest of 'abc'", () => {
    expect(createHash("sha256").update("abc").digest("hex")).toBe(
      "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
    );
  });

  it("canonical JSON sorts keys at every depth and leaves out undefined", () => {
    expect(canonicalJson({ b: 1, a: [{ d: 2, c: 3 }], e: undefined, f: null })).toBe(
      '{"a":[{"c":3,"d":2}],"b":1,"f":null}',
    );
    expect(canonicalJson({ z: "x", y: { b: [1, "2"], a: true } })).toBe(
      '{"y":{"a":true,"b":[1,"2"]},"z":"x"}',
    );
    expect(canonicalJson('a"b')).toBe('"a\\"b"');
    expect(canonicalJson([3, 1, 2])).toBe("[3,1,2]"); // arrays keep their order
  });

  it("a message's key is its channel and id; another event's is the SHA-256 of its canonical JSON", () => {
    expect(logDeliveryKey(message("m7", T0))).toBe("log:msg:c1:m7");
    const event = makeConsent("U9", "counted");
    const text = `{"at":${T0},"channel":"c1","level":"counted","member":"U9","type":"consent"}`;
    expect(logDeliveryKey(event)).toBe(
      `log:evt:${createHash("sha256").update(text).digest("hex")}`,
    );
    // The same event with its fields in another order has the same key; another event does not.
    const reordered = { member: "U9", level: "counted", type: "consent", channel: "c1", at: T0 };
    expect(logDeliveryKey(reordered as ChatEvent)).toBe(logDeliveryKey(event));
    expect(logDeliveryKey(makeConsent("U9", "counted", { at: T0 + 1 }))).not.toBe(
      logDeliveryKey(event),
    );
  });
});
