/**
 * @module safety-contract
 * Issue 11's store findings as one suite run on SQLite files and on the PostgreSQL server: the id
 * key bound to its store and its rotation (with a failure half-way), the broadcast rule and
 * array-parameter queries under a 2,000-mention message, rejected events, erasure of every
 * table, and the report-link secret shared through the store. Each check states its reference.
 */
import { spawn } from "node:child_process";
import { createHmac } from "node:crypto";
import { createInterface } from "node:readline";
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { ChannelLedger } from "../../src/attention/channel-ledger.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { leave } from "../../src/ingest/erase.js";
import { type Delivery, ingest, ingestBatch } from "../../src/ingest/ingest.js";
import type { Store } from "../../src/ports/store.js";
import type { OpenStoreOptions } from "../../src/store/open-store.js";
import { SqlStore } from "../../src/store/sql-store.js";
import { randomDeliveries } from "../ingest/random-events.js";
import { failingInserts } from "./failing-store.js";
import { expectedSnapshot } from "./store-contract.js";
import { TEST_KEY } from "./test-key.js";

/** One database, opened as often as a test likes. */
export interface SafetyTarget {
  /** Arguments for rekey-child.ts naming this database. */
  readonly childArgs: readonly string[];
  /** Opens the same database with these options (key options included). */
  open(options: OpenStoreOptions): Promise<Store>;
  /** Every row of every table, as text (the raw dump an attacker with the database would read). */
  dump(): Promise<string>;
  cleanup(): Promise<void>;
}

const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);
const CHILD = new URL("./rekey-child.ts", import.meta.url).pathname;
const NEW_SECRET = "new-secret-fedcba9876543210fedcba9876543210";

/** RFC 2104 HMAC-SHA256 straight from node:crypto, truncated to 128 bits as member-key.ts says. */
function rfc2104(secret: string, value: string): string {
  return createHmac("sha256", secret).update(value).digest("hex").slice(0, 32);
}

/** A store whose transactions fail for one message id, as a database limit would. */
function failingFor(store: Store, id: string, code: "STORE_TOO_LARGE"): Store {
  return failingInserts(store, new Set([id]), () => new PlumblineError(code, "injected limit"));
}

export function safetyContract(name: string, makeTarget: () => Promise<SafetyTarget>): void {
  describe(`store safety: ${name}`, () => {
    it("refuses a different key, naming where it came from; accepts the right one", async () => {
      const target = await makeTarget();
      try {
        const store = await target.open({ idKey: TEST_KEY });
        await ingest(
          store,
          { type: "consent", at: T0, channel: "c1", member: "U1", level: "counted" },
          "k1",
        );
        await store.close();
        await expect(target.open({ idKey: `${TEST_KEY}-other` })).rejects.toMatchObject({
          code: "STORE_KEY_MISMATCH",
          message: expect.stringContaining("PLUMBLINE_ID_KEY"),
          hint: expect.stringContaining("restore the key file"),
        });
        const again = await target.open({ idKey: TEST_KEY });
        expect(
          await ingest(
            again,
            { type: "consent", at: T0, channel: "c1", member: "U1", level: "counted" },
            "k1",
          ),
        ).toEqual({ applied: false });
        await again.close();
        // The fingerprint is an HMAC of a label, never the key.
        expect(await target.dump()).not.toContain(TEST_KEY);
      } finally {
        await target.cleanup();
      }
    });

    it("rekey re-keys every row in one transaction; the old key is refused afterwards", async () => {
      const target = await makeTarget();
      try {
        const deliveries = randomDeliveries({ seed: 21, count: 400, channels: ["c1", "c2"] });
        const store = await target.open({ idKey: TEST_KEY });
        await ingestBatch(store, deliveries, { receivedAt: T0 });
        await store.addFacilitator("c1", "U3");
        await store.claimPost({
          channel: "c1",
          kind: "note",
          period: "2026-W45",
          claimedBy: "r1",
          now: T0,
          leaseMs: 1000,
          member: "U2",
        });
        if (!(store instanceof SqlStore)) throw new Error("a SQL store was expected");
        const result = await store.rekey({ oldKey: TEST_KEY, newSecret: NEW_SECRET });
        await store.close();
        expect(result.key).toBe(`${TEST_KEY}\n${NEW_SECRET}`);
        await expect(target.open({ idKey: TEST_KEY })).rejects.toMatchObject({
          code: "STORE_KEY_MISMATCH",
        });
        const rekeyed = await target.open({ idKey: result.key });
        // Chained keys: HMAC(new, HMAC(old, id)) (RFC 2104 computed by node:crypto directly).
        expect(rekeyed.memberKey("U1")).toBe(rfc2104(NEW_SECRET, rfc2104(TEST_KEY, "U1")));
        const events = deliveries.map((d) => d.event);
        for (const channel of ["c1", "c2"]) {
          expect(await rekeyed.loadSnapshot(channel)).toEqual(
            expectedSnapshot(rekeyed, events, channel),
          );
        }
        expect(await rekeyed.isFacilitator("c1", "U3")).toBe(true);
        expect(
          (await rekeyed.getClaim({ channel: "c1", kind: "note", period: "2026-W45" }))?.member,
        ).toBe(rekeyed.memberKey("U2"));
        // Every delivery is still recognised after the re-key.
        expect(await ingestBatch(rekeyed, deliveries)).toMatchObject({ applied: 0, skipped: 400 });
        await rekeyed.close();
        const dump = await target.dump();
        expect(dump).not.toContain(rfc2104(TEST_KEY, "U1"));
      } finally {
        await target.cleanup();
      }
    });

    it("a rekey that fails half-way leaves the old key valid and every row intact", async () => {
      const target = await makeTarget();
      try {
        const deliveries = randomDeliveries({ seed: 22, count: 300, channels: ["c1"] });
        const store = await target.open({ idKey: TEST_KEY });
        await ingestBatch(store, deliveries, { receivedAt: T0 });
        const before = await store.loadSnapshot("c1");
        const dumpBefore = await target.dump();
        if (!(store instanceof SqlStore)) throw new Error("a SQL store was expected");
        let columns = 0;
        await expect(
          store.rekey({
            oldKey: TEST_KEY,
            newSecret: NEW_SECRET,
            afterColumn: () => {
              columns++;
              if (columns === 4) throw new Error("injected crash after 4 of 9 columns");
            },
          }),
        ).rejects.toThrow(/injected crash/);
        await store.close();
        await expect(target.open({ idKey: `${TEST_KEY}\n${NEW_SECRET}` })).rejects.toMatchObject({
          code: "STORE_KEY_MISMATCH",
        });
        const reopened = await target.open({ idKey: TEST_KEY });
        expect(await reopened.loadSnapshot("c1")).toEqual(before);
        await reopened.close();
        expect(await target.dump()).toBe(dumpBefore);
      } finally {
        await target.cleanup();
      }
    });

    it("a rekey whose process is SIGKILLed mid-transaction leaves the old key valid", {
      timeout: 60_000,
    }, async () => {
      const target = await makeTarget();
      try {
        const deliveries = randomDeliveries({ seed: 23, count: 200, channels: ["c1"] });
        const store = await target.open({ idKey: TEST_KEY });
        await ingestBatch(store, deliveries, { receivedAt: T0 });
        const before = await store.loadSnapshot("c1");
        await store.close();
        const dumpBefore = await target.dump();
        const child = spawn(process.execPath, ["--import", "tsx", CHILD, ...target.childArgs], {
          stdio: ["ignore", "pipe", "inherit"],
        });
        const outcome = await new Promise<string>((resolve, reject) => {
          createInterface({ input: child.stdout }).on("line", (line) => {
            if (line === "half") child.kill("SIGKILL");
          });
          child.on("error", reject);
          child.on("close", (_code, signal) => resolve(String(signal)));
        });
        expect(outcome).toBe("SIGKILL");
        const reopened = await target.open({ idKey: TEST_KEY });
        expect(await reopened.loadSnapshot("c1")).toEqual(before);
        await reopened.close();
        expect(await target.dump()).toBe(dumpBefore);
      } finally {
        await target.cleanup();
      }
    });

    it("a 2,000-mention message is a broadcast: stored once, its reply kept, as the log path does", async () => {
      const target = await makeTarget();
      try {
        const store = await target.open({ idKey: TEST_KEY });
        const members = Array.from({ length: 2001 }, (_, i) => `M${String(i).padStart(4, "0")}`);
        const events: ChatEvent[] = members.map((member, i) => ({
          type: "consent",
          at: T0 + i,
          channel: "c1",
          member,
          level: "counted",
        }));
        const at = T0 + DAY;
        events.push(
          { type: "message", at, channel: "c1", id: "root", author: members[1] },
          {
            type: "message",
            at: at + 1,
            channel: "c1",
            id: "all",
            author: members[0],
            parent: "root",
            mentions: members.slice(1),
          },
          {
            type: "message",
            at: at + 2,
            channel: "c1",
            id: "fifty",
            author: members[0],
            mentions: members.slice(1, 51),
          },
          {
            type: "message",
            at: at + 3,
            channel: "c1",
            id: "later",
            author: members[2],
            mentions: members.slice(3, 10),
          },
          { type: "edit", at: at + 4, channel: "c1", id: "later", mentions: members.slice(3) },
        );
        const totals = await ingestBatch(
          store,
          events.map((event, i): Delivery => ({ event, deliveryKey: `d${i}` })),
        );
        expect(totals).toMatchObject({ applied: events.length, skipped: 0, rejected: {} });
        const snapshot = await store.loadSnapshot("c1");
        expect(snapshot).toEqual(expectedSnapshot(store, events, "c1"));
        const byId = new Map(snapshot.messages.map((m) => [m.id, m]));
        expect(byId.get("all")).toMatchObject({ broadcast: true, mentions: [] });
        expect(byId.get("all")?.parentAuthor).not.toBeNull();
        // Exactly 50 is not a broadcast (DESIGN.md §4.2: "more than 50").
        expect(byId.get("fifty")?.mentions).toHaveLength(50);
        expect(byId.get("fifty")?.broadcast).toBeUndefined();
        expect(byId.get("later")).toMatchObject({ broadcast: true, mentions: [] });
        // The report counts them; the log path (ChannelLedger) gives the same figure.
        const settings = { ...DEFAULT_SETTINGS, samples: 20 };
        const fromStore = analyzeSnapshot(snapshot, settings, { until: at + 10 });
        const ledger = new ChannelLedger("c1");
        for (const e of events) ledger.apply(e);
        const fromLog = analyzeSnapshot(ledger.snapshot(), settings, { until: at + 10 });
        expect(fromStore.broadcasts).toBe(2);
        expect(fromLog.broadcasts).toBe(2);
        // 1 reply + 50 mentions + 0 for both broadcasts except "all"'s reply.
        expect(fromStore.signals).toBe(fromLog.signals);
        expect(fromLog.signals).toBe(51);
        // The transaction API itself takes 2,000 members in one lookup and one insert.
        const keys = members.map((m) => store.memberKey(m));
        const levels = await store.transaction((tx) => tx.consentAtMany("c1", keys, at));
        expect(new Set(levels)).toEqual(new Set(["counted"]));
        await store.transaction((tx) =>
          tx.insertMessage("c1", {
            id: "direct",
            author: keys[0],
            at,
            parentAuthor: null,
            mentions: keys.slice(1),
            deleted: false,
          }),
        );
        expect(
          (await store.loadSnapshot("c1")).messages.find((m) => m.id === "direct")?.mentions,
        ).toHaveLength(2000);
        await store.close();
      } finally {
        await target.cleanup();
      }
    });

    it("an event the store cannot apply is recorded as rejected and the others go on", async () => {
      const target = await makeTarget();
      try {
        const store = await target.open({ idKey: TEST_KEY });
        const events: ChatEvent[] = [
          { type: "consent", at: T0, channel: "c1", member: "U1", level: "counted" },
          { type: "consent", at: T0, channel: "c1", member: "U2", level: "counted" },
          { type: "message", at: T0 + 1, channel: "c1", id: "m1", author: "U1", mentions: ["U2"] },
          {
            type: "message",
            at: T0 + 2,
            channel: "c1",
            id: "poison",
            author: "U2",
            mentions: ["U1"],
          },
          { type: "message", at: T0 + 3, channel: "c1", id: "m3", author: "U2", mentions: ["U1"] },
        ];
        const failing = failingFor(store, "poison", "STORE_TOO_LARGE");
        const totals = await ingestBatch(
          failing,
          events.map((event, i) => ({ event, deliveryKey: `e${i}` })),
        );
        expect(totals).toEqual({ applied: 4, skipped: 0, rejected: { STORE_TOO_LARGE: 1 } });
        expect((await store.loadSnapshot("c1")).messages.map((m) => m.id)).toEqual(["m1", "m3"]);
        expect(await store.countRejected()).toBe(1);
        // Seen: a redelivery neither applies it nor records it twice.
        expect(await ingest(failing, events[3], "e3")).toEqual({ applied: false });
        expect(await ingest(failing, events[3], "e3-single")).toEqual({
          applied: false,
          rejected: "STORE_TOO_LARGE",
        });
        expect(await store.countRejected()).toBe(2);
        await store.close();
        const dump = await target.dump();
        expect(dump).not.toContain("e3-single");
        expect(dump).toContain("STORE_TOO_LARGE");
      } finally {
        await target.cleanup();
      }
    });

    it("leave erases every row naming the member, delivery keys included", async () => {
      const target = await makeTarget();
      try {
        const store = await target.open({ idKey: TEST_KEY });
        const leaver = "ULEAVER7QX";
        const label = "night-shift-owls";
        const key = store.memberKey(leaver);
        const events: [ChatEvent, string][] = [
          [
            {
              type: "consent",
              at: T0,
              channel: "c1",
              member: leaver,
              level: "named",
              notice: "v1",
            },
            `cmd:consent:c1:${key}:named:${T0}`,
          ],
          [
            { type: "consent", at: T0, channel: "c1", member: "U2", level: "counted" },
            `cmd:consent:c1:${store.memberKey("U2")}:counted:${T0}`,
          ],
          [
            { type: "group", at: T0 + 1, channel: "c1", member: leaver, group: label },
            `cmd:group:c1:${key}:${T0 + 1}:${label}`,
          ],
          [
            {
              type: "message",
              at: T0 + 2,
              channel: "c1",
              id: "m1",
              author: leaver,
              mentions: ["U2"],
            },
            "Ev01",
          ],
          [
            {
              type: "message",
              at: T0 + 3,
              channel: "c1",
              id: "m2",
              author: "U2",
              parent: "m1",
              mentions: [leaver],
            },
            "Ev02",
          ],
        ];
        for (const [event, k] of events) await ingest(store, event, k, { receivedAt: T0 });
        await store.addFacilitator("c1", leaver);
        expect(await target.dump()).toContain(leaver);
        await leave(store, "c1", leaver);
        await store.close();
        const dump = await target.dump();
        for (const needle of [leaver, label, key]) expect(dump).not.toContain(needle);
        // The other member's rows stay: their message and delivery.
        expect(dump).toContain(`"m2"`);
      } finally {
        await target.cleanup();
      }
    });

    it("keeps one report-link secret for every opener of the database", async () => {
      const target = await makeTarget();
      try {
        // Opened one after the other: two SQLite connections of one process must not interleave writes.
        const a = await target.open({ idKey: TEST_KEY });
        const b = await target.open({ idKey: TEST_KEY });
        // One after the other: two writers in one process would wait on each other in SQLite.
        const sa = await a.sharedSecret("report-links");
        const sb = await b.sharedSecret("report-links");
        expect(sa).toMatch(/^[0-9a-f]{64}$/);
        expect(sb).toBe(sa);
        expect(await a.sharedSecret("other")).not.toBe(sa);
        await a.close();
        await b.close();
        const c = await target.open({ idKey: TEST_KEY });
        expect(await c.sharedSecret("report-links")).toBe(sa);
        await c.close();
      } finally {
        await target.cleanup();
      }
    });
  });
}

const DAY = 86_400_000;
