/**
 * @module store-contract
 * One suite for every `Store` (memory, SQLite, PostgreSQL), in the manner of a spec factory: the
 * same calls must give the same answers. The event rules are checked against
 * docs/event-semantics.md directly and against the independent in-memory `ChannelLedger`.
 */
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { ChannelLedger } from "../../src/attention/channel-ledger.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { eraseChannel, eraseWorkspace, leave } from "../../src/ingest/erase.js";
import { ingest, ingestBatch } from "../../src/ingest/ingest.js";
import { purge } from "../../src/ingest/purge.js";
import { missedMarker, type Store } from "../../src/ports/store.js";
import { makeConsent } from "../attention/ledger-builders.js";
import { randomDeliveries } from "../ingest/random-events.js";

export interface StoreFixture {
  readonly store: Store;
  /** A second store on the same database (another replica); closed by the suite. */
  readonly openPeer?: () => Promise<Store>;
  /**
   * Whether the peer may run calls at the same time as the store (PostgreSQL). Two SQLite
   * connections in one thread cannot (better-sqlite3 is synchronous: one would wait on the other's
   * transaction while holding the thread), so SQLite races within one store only.
   */
  readonly peerConcurrent?: boolean;
  readonly cleanup: () => Promise<void>;
}

const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);
const c = "c1";
/** The consent events here carry a notice version, as the bot records one. */
const NOTICE = { notice: "v1" } as const;
const msg = (id: string, author: string, at: number, extra: object = {}): ChatEvent => ({
  type: "message",
  at,
  channel: c,
  id,
  author,
  ...extra,
});

/** The ChannelLedger snapshot with ids mapped the way stores map them. */
export function expectedSnapshot(
  store: Store,
  events: readonly ChatEvent[],
  channel: string,
): LedgerSnapshot {
  const ledger = new ChannelLedger(channel);
  for (const e of events) if (e.channel === channel) ledger.apply(e);
  const snap = ledger.snapshot();
  const id = (m: string) =>
    ledger.consentAt(m, Number.MAX_SAFE_INTEGER) === "named" ? m : `~${store.memberKey(m)}`;
  const messages = snap.messages.map((m) => ({
    ...m,
    author: id(m.author),
    parentAuthor: m.parentAuthor === null ? null : id(m.parentAuthor),
    mentions: m.mentions.map(id).sort(),
  }));
  return {
    channel,
    messages,
    consent: snap.consent.map((x) => ({ ...x, member: id(x.member) })),
    groups: snap.groups.map((x) => ({ ...x, member: id(x.member) })),
    formats: snap.formats ?? [],
    lastEventAt: snap.lastEventAt,
  };
}

async function feed(store: Store, events: readonly ChatEvent[]): Promise<void> {
  let i = 0;
  for (const e of events) await ingest(store, e, `k${i++}`, { receivedAt: T0 });
}

export function storeContract(name: string, makeStore: () => Promise<StoreFixture>): void {
  describe(`Store contract: ${name}`, () => {
    let fixture: StoreFixture;
    let store: Store;
    beforeEach(async () => {
      fixture = await makeStore();
      store = fixture.store;
    });
    afterEach(async () => {
      await fixture.cleanup();
    });

    it("keys members by a 128-bit hex HMAC, never the platform id", () => {
      const k = store.memberKey("U1");
      expect(k).toMatch(/^[0-9a-f]{32}$/);
      expect(store.memberKey("U1")).toBe(k);
      expect(store.memberKey("U2")).not.toBe(k);
    });

    it("applies a delivery once and reports the repeat", async () => {
      expect(
        await ingest(store, makeConsent("U1", "counted", NOTICE), "a", { receivedAt: T0 }),
      ).toEqual({
        applied: true,
      });
      expect(
        await ingest(store, makeConsent("U1", "counted", NOTICE), "a", { receivedAt: T0 }),
      ).toEqual({
        applied: false,
      });
      expect((await store.loadSnapshot(c)).consent).toHaveLength(1);
    });

    it("rule 2: stores only consenting authors, resolves parents, filters mentions", async () => {
      const events = [
        makeConsent("U1", "named", NOTICE),
        makeConsent("U2", "counted", NOTICE),
        msg("m0", "U3", T0 + 1, { mentions: ["U1"] }), // U3 off: nothing stored
        msg("m1", "U1", T0 + 2, { mentions: ["U2", "U2", "U1", "U3"] }),
        msg("m2", "U2", T0 + 3, { parent: "m1" }),
        msg("m3", "U2", T0 + 4, { parent: "m0" }), // parent not stored: no parent author
        msg("m1", "U2", T0 + 5), // first wins
      ];
      await feed(store, events);
      const snap = await store.loadSnapshot(c);
      const u2 = `~${store.memberKey("U2")}`;
      expect(snap.messages.map((m) => [m.id, m.author, m.parentAuthor, m.mentions])).toEqual([
        ["m1", "U1", null, [u2]],
        ["m2", u2, "U1", []],
        ["m3", u2, null, []],
      ]);
      expect(snap.lastEventAt).toBe(T0 + 5);
      expect(snap).toEqual(expectedSnapshot(store, events, c));
    });

    it("rule 1: consent is read at the event's time; a late change with an earlier time counts", async () => {
      const events = [
        makeConsent("U1", "counted", { ...NOTICE, at: T0 + 10 }),
        msg("m1", "U1", T0 + 5), // before U1 opted in: dropped
        msg("m2", "U1", T0 + 20, { mentions: ["U2"] }), // U2 not yet consenting
        makeConsent("U2", "counted", { ...NOTICE, at: T0 + 1 }), // arrives late, time before m2
        msg("m3", "U1", T0 + 30, { mentions: ["U2"] }),
        { type: "edit", at: T0 + 40, channel: c, id: "m2", mentions: ["U2"] } as ChatEvent,
      ];
      await feed(store, events);
      const snap = await store.loadSnapshot(c);
      expect(snap.messages.map((m) => [m.id, m.mentions.length])).toEqual([
        ["m2", 1],
        ["m3", 1],
      ]);
      expect(snap).toEqual(expectedSnapshot(store, events, c));
    });

    it("rules 3–5: edits, deletes, undeletes and groups", async () => {
      const events: ChatEvent[] = [
        makeConsent("U1", "named", NOTICE),
        makeConsent("U2", "named", NOTICE),
        makeConsent("U3", "named", NOTICE),
        msg("m1", "U1", T0 + 1, { mentions: ["U2"] }),
        { type: "edit", at: T0 + 2, channel: c, id: "m1", mentions: ["U3", "U1"] },
        { type: "edit", at: T0 + 2, channel: c, id: "nope", mentions: ["U3"] },
        { type: "delete", at: T0 + 3, channel: c, id: "m1" },
        { type: "group", at: T0 + 4, channel: c, member: "U2", group: "north" },
        { type: "group", at: T0 + 5, channel: c, member: "U2", group: null },
      ];
      await feed(store, events);
      let snap = await store.loadSnapshot(c);
      expect(snap.messages).toEqual([
        { id: "m1", author: "U1", at: T0 + 1, parentAuthor: null, mentions: ["U3"], deleted: true },
      ]);
      expect(snap.groups.map((g) => g.group)).toEqual(["north", null]);
      await ingest(store, { type: "undelete", at: T0 + 6, channel: c, id: "m1" }, "u", {
        receivedAt: T0,
      });
      snap = await store.loadSnapshot(c);
      expect(snap.messages[0].deleted).toBe(false);
    });

    it("keeps format periods in applied order, like group labels, and erases them with the channel", async () => {
      const events: ChatEvent[] = [
        makeConsent("U1", "named", NOTICE),
        { type: "format", at: T0 + 1, channel: c, format: "written-first" },
        msg("m1", "U1", T0 + 2),
        { type: "format", at: T0 + 3, channel: c, format: null },
        // A late event with an earlier time keeps its applied place, as group changes do.
        { type: "format", at: T0 + 2, channel: c, format: "rotating-hosts" },
      ];
      await feed(store, events);
      const snap = await store.loadSnapshot(c);
      expect(snap.formats).toEqual([
        { at: T0 + 1, format: "written-first" },
        { at: T0 + 3, format: null },
        { at: T0 + 2, format: "rotating-hosts" },
      ]);
      expect(snap).toEqual(expectedSnapshot(store, events, c));
      await eraseChannel(store, c);
      expect((await store.loadSnapshot(c)).formats).toEqual([]);
    });

    it("keeps a platform id only while the member's consent is named", async () => {
      await feed(store, [
        makeConsent("U1", "named", NOTICE),
        makeConsent("U1", "counted", { ...NOTICE, at: T0 + 1 }),
      ]);
      const snap = await store.loadSnapshot(c);
      expect(snap.consent.map((x) => x.member)).toEqual([
        `~${store.memberKey("U1")}`,
        `~${store.memberKey("U1")}`,
      ]);
      await ingest(store, makeConsent("U1", "named", { ...NOTICE, at: T0 + 2 }), "n", {
        receivedAt: T0,
      });
      expect((await store.loadSnapshot(c)).consent.map((x) => x.member)).toEqual([
        "U1",
        "U1",
        "U1",
      ]);
    });

    it("matches the in-memory ChannelLedger on seeded random streams", async () => {
      for (const seed of [1, 2, 3]) {
        const deliveries = randomDeliveries({ seed, count: 400, channels: ["c1", "c2"] });
        await ingestBatch(store, deliveries, { batchSize: 37, receivedAt: T0 });
        const events = deliveries.map((d) => d.event);
        for (const ch of ["c1", "c2"]) {
          expect(await store.loadSnapshot(ch)).toEqual(expectedSnapshot(store, events, ch));
        }
        await eraseChannel(store, "c1");
        await eraseChannel(store, "c2");
        await purge(store, { now: T0 + 100 * DAY_MS, dedupeDays: 0 });
      }
    });

    it("rolls a failed transaction back completely", async () => {
      await expect(
        store.transaction(async (tx) => {
          await tx.addDelivery("x", T0);
          await tx.addConsent(c, {
            member: store.memberKey("U1"),
            at: T0,
            level: "counted",
            notice: null,
          });
          throw new Error("boom");
        }),
      ).rejects.toThrow("boom");
      expect((await store.loadSnapshot(c)).consent).toEqual([]);
      expect(
        await ingest(store, makeConsent("U1", "counted", NOTICE), "x", { receivedAt: T0 }),
      ).toEqual({
        applied: true,
      });
    });

    it("leave erases every row naming the member in that channel only", async () => {
      const events: ChatEvent[] = [
        makeConsent("U1", "named", NOTICE),
        makeConsent("U2", "named", NOTICE),
        makeConsent("U3", "counted", NOTICE),
        msg("m1", "U1", T0 + 1, { mentions: ["U2", "U3"] }),
        msg("m2", "U2", T0 + 2, { parent: "m1", mentions: ["U1", "U3"] }),
        msg("m3", "U3", T0 + 3, { mentions: ["U1"] }),
        { type: "group", at: T0 + 4, channel: c, member: "U1", group: "north" },
        makeConsent("U1", "named", { ...NOTICE, channel: "c2" }),
      ];
      await feed(store, events);
      await store.addFacilitator(c, "U1");
      await store.claimPost({
        channel: c,
        kind: "note",
        period: "p1",
        claimedBy: "r1",
        now: T0,
        leaseMs: 1000,
        member: "U1",
      });
      await store.claimPost({
        channel: c,
        kind: "digest",
        period: "p1",
        claimedBy: "r1",
        now: T0,
        leaseMs: 1000,
      });
      const erased = await leave(store, c, "U1");
      expect(erased.rows).toBeGreaterThan(0);
      const snap = await store.loadSnapshot(c);
      const k1 = `~${store.memberKey("U1")}`;
      const text = JSON.stringify(snap);
      expect(text).not.toContain('"U1"');
      expect(text).not.toContain(k1);
      expect(snap.messages.map((m) => [m.id, m.parentAuthor, m.mentions.length])).toEqual([
        ["m2", null, 1],
        ["m3", null, 0],
      ]);
      expect(await store.isFacilitator(c, "U1")).toBe(false);
      expect(await store.getClaim({ channel: c, kind: "note", period: "p1" })).toBeNull();
      expect(await store.getClaim({ channel: c, kind: "digest", period: "p1" })).not.toBeNull();
      expect((await store.loadSnapshot("c2")).consent.map((x) => x.member)).toEqual(["U1"]);
    });

    it("erases a channel and a workspace", async () => {
      await store.registerChannel("c1", "w1");
      await store.registerChannel("c2", "w1");
      await store.registerChannel("c3", "w2");
      for (const ch of ["c1", "c2", "c3"]) {
        await ingest(store, makeConsent("U1", "named", { ...NOTICE, channel: ch }), `k-${ch}`, {
          receivedAt: T0,
        });
        await store.writeChannelState(ch, "settings", { windowDays: 14 });
      }
      expect(
        (await store.listChannels()).map((x) => [x.channel, x.workspace, x.lastEventAt]),
      ).toEqual([
        ["c1", "w1", T0],
        ["c2", "w1", T0],
        ["c3", "w2", T0],
      ]);
      await eraseWorkspace(store, "w1");
      expect((await store.listChannels()).map((x) => x.channel)).toEqual(["c3"]);
      expect((await store.loadSnapshot("c1")).consent).toEqual([]);
      expect(await store.readChannelState("c2", "settings")).toBeNull();
      await eraseChannel(store, "c3");
      expect(await store.listChannels()).toEqual([]);
      expect((await store.loadSnapshot("c3")).consent).toEqual([]);
    });

    it("purges ledger rows past retention and delivery keys past the dedupe window", async () => {
      await ingest(store, makeConsent("U1", "counted", NOTICE), "k1", { receivedAt: T0 });
      await ingest(store, msg("old", "U1", T0 + 1), "k2", { receivedAt: T0 });
      await ingest(store, msg("new", "U1", T0 + 50 * DAY_MS), "k3", {
        receivedAt: T0 + 50 * DAY_MS,
      });
      const counts = await purge(store, { now: T0 + 92 * DAY_MS });
      expect(counts).toEqual({ messages: 1, deliveries: 3 });
      const snap = await store.loadSnapshot(c);
      expect(snap.messages.map((m) => m.id)).toEqual(["new"]);
      expect(snap.consent).toHaveLength(1);
      // k3 was received 42 days before the purge: gone, so it could apply again.
      expect(await ingest(store, msg("x", "U1", T0 + 2), "k3", { receivedAt: T0 })).toEqual({
        applied: true,
      });
    });

    it("keeps opaque channel state and facilitators", async () => {
      expect(await store.readChannelState(c, "balance-note")).toBeNull();
      await store.writeChannelState(c, "balance-note", { last: "2026-11-01", above: true });
      await store.writeChannelState(c, "conversation", { serviceUrl: "https://example.invalid" });
      expect(await store.readChannelState(c, "balance-note")).toEqual({
        last: "2026-11-01",
        above: true,
      });
      await store.writeChannelState(c, "balance-note", null);
      expect(await store.readChannelState(c, "balance-note")).toBeNull();
      await ingest(store, makeConsent("F1", "named", NOTICE), "f", { receivedAt: T0 });
      await store.addFacilitator(c, "F1");
      await store.addFacilitator(c, "F2");
      await store.addFacilitator(c, "F2");
      expect(await store.isFacilitator(c, "F2")).toBe(true);
      expect(await store.listFacilitators(c)).toEqual(["F1", `~${store.memberKey("F2")}`].sort());
      await store.removeFacilitator(c, "F2");
      expect(await store.listFacilitators(c)).toEqual(["F1"]);
    });

    it("keeps a facilitator's platform id with the role, whatever their consent (DESIGN.md §7)", async () => {
      // F3 joined counted: their consent keeps no platform id, the role does.
      await ingest(store, makeConsent("F3", "counted", NOTICE), "f3", { receivedAt: T0 });
      await store.addFacilitator(c, "F3");
      await store.addFacilitator(c, "F4");
      expect(await store.facilitatorPlatformIds(c)).toEqual(["F3", "F4"]);
      // The snapshot still shows F3 only as a pseudonym: the role does not name them in figures.
      const snap = await store.loadSnapshot(c);
      expect(snap.consent.map((x) => x.member)).toEqual([`~${store.memberKey("F3")}`]);
      await store.removeFacilitator(c, "F4");
      expect(await store.facilitatorPlatformIds(c)).toEqual(["F3"]);
      // Leaving erases the role and its platform id with everything else.
      await store.eraseMember(c, "F3");
      expect(await store.facilitatorPlatformIds(c)).toEqual([]);
      expect(await store.isFacilitator(c, "F3")).toBe(false);
    });

    it("lets exactly one claimant post, records the message id, marks expired claims missed", async () => {
      const req = { channel: c, kind: "digest", period: "2026-W45", now: T0, leaseMs: 60_000 };
      const results = await Promise.all([
        store.claimPost({ ...req, claimedBy: "r1" }),
        store.claimPost({ ...req, claimedBy: "r2" }),
      ]);
      expect(results.filter(Boolean)).toHaveLength(1);
      const holder = results[0] ? "r1" : "r2";
      const other = holder === "r1" ? "r2" : "r1";
      expect(await store.completePost({ ...req, claimedBy: other, platformMessageId: "x" })).toBe(
        false,
      );
      expect(
        await store.completePost({ ...req, claimedBy: holder, platformMessageId: "ts1" }),
      ).toBe(true);
      expect(await store.getClaim(req)).toMatchObject({
        status: "posted",
        platformMessageId: "ts1",
        claimedBy: holder,
        leaseUntil: T0 + 60_000,
      });
      const w46 = { ...req, period: "2026-W46", claimedBy: "r1" };
      await store.claimPost(w46);
      expect(await store.beginPost({ ...w46, now: T0 + 1000, leaseMs: 60_000 })).toBe(true);
      expect(await store.markMissedClaims(T0 + 30_000)).toEqual([]);
      const missed = await store.markMissedClaims(T0 + 61_001);
      expect(missed.map((m) => [m.period, m.status, m.platformMessageId])).toEqual([
        ["2026-W46", "missed", missedMarker("outcome unknown")],
      ]);
      expect(await store.markMissedClaims(T0 + 61_002)).toEqual([]);
    });

    it("lets another replica take over a claimed (unsent) job once its lease ends, never a posting one", async () => {
      const peer = fixture.openPeer ? await fixture.openPeer() : store;
      try {
        const req = { channel: c, kind: "digest", period: "2026-W45", leaseMs: 60_000 };
        expect(await store.claimPost({ ...req, claimedBy: "dead", now: T0 })).toBe(true);
        expect(await peer.claimPost({ ...req, claimedBy: "r2", now: T0 + 60_000 })).toBe(false);
        expect(await peer.claimPost({ ...req, claimedBy: "r2", now: T0 + 60_001 })).toBe(true);
        expect(await store.getClaim(req)).toMatchObject({
          status: "claimed",
          claimedBy: "r2",
          claimedAt: T0 + 60_001,
          leaseUntil: T0 + 120_001,
        });
        // The old holder woke up: it may not start posting, nor complete.
        expect(await store.beginPost({ ...req, claimedBy: "dead", now: T0 + 70_000 })).toBe(false);
        expect(
          await store.completePost({ ...req, claimedBy: "dead", platformMessageId: "x" }),
        ).toBe(false);
        expect(await peer.beginPost({ ...req, claimedBy: "r2", now: T0 + 70_000 })).toBe(true);
        expect(await peer.beginPost({ ...req, claimedBy: "r2", now: T0 + 70_000 })).toBe(false);
        expect(await store.getClaim(req)).toMatchObject({
          status: "posting",
          leaseUntil: T0 + 130_000,
        });
        // A posting claim is never taken over, even long after its lease.
        expect(await store.claimPost({ ...req, claimedBy: "r3", now: T0 + 9 * DAY_MS })).toBe(
          false,
        );
        expect(
          await store.recordMiss({
            ...req,
            claimedBy: "r3",
            now: T0 + 9 * DAY_MS,
            reason: "too late",
          }),
        ).toBe(false);
        // Refused by the platform without being taken: back to claimed, held by the same replica.
        expect(await store.releasePost({ ...req, claimedBy: "r3" })).toBe(false);
        expect(await peer.releasePost({ ...req, claimedBy: "r2" })).toBe(true);
        expect(await store.getClaim(req)).toMatchObject({ status: "claimed", claimedBy: "r2" });
        expect(await peer.completePost({ ...req, claimedBy: "r2", platformMessageId: "ts9" })).toBe(
          true,
        );
        expect(await store.markMissedClaims(T0 + 9 * DAY_MS)).toEqual([]);
      } finally {
        if (peer !== store) await peer.close();
      }
    });

    it("records a late slot as missed once, and an abandoned claim after a further lease", async () => {
      const req = { channel: c, kind: "digest", leaseMs: 60_000, now: T0 };
      const late = { ...req, period: "late", claimedBy: "r1", reason: "too late" as const };
      expect(await store.recordMiss(late)).toBe(true);
      expect(await store.recordMiss({ ...late, claimedBy: "r2" })).toBe(false);
      expect(
        await store.claimPost({ ...req, period: "late", claimedBy: "r2", now: T0 + DAY_MS }),
      ).toBe(false);
      expect(await store.getClaim({ ...req, period: "late" })).toMatchObject({
        status: "missed",
        claimedBy: "r1",
        platformMessageId: missedMarker("too late"),
      });
      // An expired claimed row may be turned into a miss (still unsent when the slot is 24 h late).
      await store.claimPost({ ...req, period: "stale", claimedBy: "r1" });
      expect(await store.recordMiss({ ...late, period: "stale", now: T0 + 60_000 })).toBe(false);
      expect(await store.recordMiss({ ...late, period: "stale", now: T0 + 60_001 })).toBe(true);
      // A claimed row nobody took over: listed as expired, missed once its lease ended before
      // the caller's cut-off.
      await store.claimPost({ ...req, period: "note", kind: "note", claimedBy: "r1" });
      expect(await store.expiredClaims(T0 + 60_000, "note")).toEqual([]);
      expect((await store.expiredClaims(T0 + 60_001, "note")).map((m) => m.period)).toEqual([
        "note",
      ]);
      expect(await store.expiredClaims(T0 + 60_001, "digest")).toEqual([]);
      expect(await store.markMissedClaims(T0 + DAY_MS)).toEqual([]);
      expect(await store.markMissedClaims(T0 + DAY_MS, T0 + 60_000)).toEqual([]);
      expect(
        (await store.markMissedClaims(T0 + DAY_MS, T0 + 60_001)).map((m) => [
          m.period,
          m.platformMessageId,
        ]),
      ).toEqual([["note", missedMarker("not taken over")]]);
    });

    it("reopens a rate-limited post at its retry time and settles a post whose outcome was unknown", async () => {
      const peer = fixture.openPeer ? await fixture.openPeer() : store;
      try {
        const req = { channel: c, kind: "digest", leaseMs: 60_000 };
        // Rate limited: back to claimed with its lease ending at the retry time.
        const slow = { ...req, period: "slow", claimedBy: "r1", now: T0 };
        await store.claimPost(slow);
        await store.beginPost({ ...slow, now: T0 + 1000 });
        expect(await store.releasePost({ ...slow, retryAt: T0 + 31_000 })).toBe(true);
        expect(await store.getClaim(slow)).toMatchObject({
          status: "claimed",
          leaseUntil: T0 + 31_000,
        });
        expect(await peer.claimPost({ ...slow, claimedBy: "r2", now: T0 + 31_000 })).toBe(false);
        expect(await peer.claimPost({ ...slow, claimedBy: "r2", now: T0 + 31_001 })).toBe(true);
        // Unknown outcome: listed as an expired posting claim once its lease ended.
        const lost = { ...req, period: "lost", claimedBy: "r1", now: T0 };
        await store.claimPost(lost);
        await store.beginPost({ ...lost, now: T0 + 1000 });
        expect(await store.expiredClaims(T0 + 61_000, "digest", "posting")).toEqual([]);
        expect(
          (await store.expiredClaims(T0 + 61_001, "digest", "posting")).map((m) => m.period),
        ).toEqual(["lost"]);
        expect((await store.expiredClaims(T0 + 61_001, "digest")).map((m) => m.period)).toEqual([]);
        // Another replica may settle it only after the lease; the holder at any time.
        const found = { status: "posted" as const, platformMessageId: "ts7" };
        expect(
          await peer.settlePost({ ...lost, claimedBy: null, now: T0 + 61_000, settlement: found }),
        ).toBe(false);
        expect(
          await peer.settlePost({ ...lost, claimedBy: null, now: T0 + 61_001, settlement: found }),
        ).toBe(true);
        expect(await store.getClaim(lost)).toMatchObject({
          status: "posted",
          platformMessageId: "ts7",
          claimedBy: "r1",
        });
        expect(
          await store.settlePost({ ...lost, claimedBy: "r1", now: T0, settlement: found }),
        ).toBe(false);
        // Not found on the platform: open again at once (lease kept), so one replica re-posts.
        const gone = { ...req, period: "gone", claimedBy: "r1", now: T0 };
        await store.claimPost(gone);
        await store.beginPost({ ...gone, now: T0 + 1000 });
        const reopen = { status: "claimed" as const };
        expect(
          await peer.settlePost({ ...gone, claimedBy: null, now: T0 + 61_001, settlement: reopen }),
        ).toBe(true);
        expect(await store.getClaim(gone)).toMatchObject({
          status: "claimed",
          platformMessageId: null,
          leaseUntil: T0 + 61_000,
        });
        expect(await peer.claimPost({ ...gone, claimedBy: "r2", now: T0 + 61_002 })).toBe(true);
        // Refused by the platform: the holder records the miss with the platform's reason.
        const bad = { ...req, period: "bad", claimedBy: "r1", now: T0 };
        await store.claimPost(bad);
        await store.beginPost({ ...bad, now: T0 + 1000 });
        const refused = {
          status: "missed" as const,
          reason: "refused: channel_not_found" as const,
        };
        expect(
          await peer.settlePost({ ...bad, claimedBy: "r2", now: T0 + 2000, settlement: refused }),
        ).toBe(false);
        expect(
          await store.settlePost({ ...bad, claimedBy: "r1", now: T0 + 2000, settlement: refused }),
        ).toBe(true);
        expect(await store.getClaim(bad)).toMatchObject({
          status: "missed",
          platformMessageId: "(missed: refused: channel_not_found)",
        });
      } finally {
        if (peer !== store) await peer.close();
      }
    });

    it("gives an expired claim to exactly one of several replicas racing for it", async () => {
      const peer = fixture.openPeer ? await fixture.openPeer() : store;
      try {
        const req = { channel: c, kind: "digest", leaseMs: 60_000 };
        for (let round = 0; round < 5; round++) {
          const period = `race-${round}`;
          expect(await store.claimPost({ ...req, period, claimedBy: "dead", now: T0 })).toBe(true);
          const wins = await Promise.all(
            ["a", "b", "c", "d"].map((id, i) =>
              (i % 2 === 1 && fixture.peerConcurrent === true ? peer : store).claimPost({
                ...req,
                period,
                claimedBy: id,
                now: T0 + 60_001 + i,
              }),
            ),
          );
          expect(wins.filter(Boolean)).toHaveLength(1);
          const winner = ["a", "b", "c", "d"][wins.indexOf(true)];
          expect(await peer.getClaim({ ...req, period })).toMatchObject({ claimedBy: winner });
        }
      } finally {
        if (peer !== store) await peer.close();
      }
    });
  });
}
