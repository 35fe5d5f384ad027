import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it, vi } from "vitest";
import { DAY_MS } from "../../src/domain/settings.js";
import { ManualClock } from "../../src/ports/clock.js";
import type { Store } from "../../src/ports/store.js";
import { NOTHING_POSTED } from "../../src/schedule/scheduler-deps.js";
import type { PostedEntry } from "../../src/schedule/tick-report.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import {
  failure,
  HOUR,
  MINUTE,
  makeScheduler,
  message,
  RecordingPlatform,
  runUntil,
  settingsMap,
} from "./harness.js";

const KEY = "schedule-test-key-0123456789abcdef012345";
const iso = (ms: number) => new Date(ms).toISOString();
const open: Store[] = [];

afterEach(async () => {
  vi.useRealTimers();
  for (const store of open.splice(0)) await store.close();
});

async function memoryStore(...channels: string[]): Promise<Store> {
  const store = createMemoryStore({ idKey: KEY });
  for (const c of channels) await store.registerChannel(c, null);
  return store;
}

async function sharedSqlite(): Promise<[Store, Store]> {
  const path = join(mkdtempSync(join(tmpdir(), "plumbline-schedule-")), "db.sqlite");
  const a = await openSqliteStore(path, { idKey: KEY });
  const b = await openSqliteStore(path, { idKey: KEY });
  open.push(a, b);
  await a.registerChannel("c1", null);
  return [a, b];
}

describe("digests on each channel's schedule", () => {
  it("posts six weeks of digests, each once, at the first pass after its slot", async () => {
    const store = await memoryStore("c1", "c2", "c3");
    const start = Date.UTC(2026, 10, 1, 0, 0, 0); // Sunday
    const clock = new ManualClock(start);
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      readSettings: settingsMap({
        c2: { digest: { weekday: 3, time: "17:30" }, timezone: "Asia/Tokyo" },
        c3: { digest: "off" },
      }),
    });
    await runUntil(clock, start + 42 * DAY_MS, 30 * MINUTE, () => scheduler.tick());
    const c1 = platform.posts.filter((p) => p.channel === "c1").map((p) => iso(p.at));
    const c2 = platform.posts.filter((p) => p.channel === "c2").map((p) => iso(p.at));
    // Default: Monday 09:00 UTC.
    expect(c1).toEqual([2, 9, 16, 23, 30, 37].map((d) => iso(Date.UTC(2026, 10, d, 9, 0))));
    // Wednesday 17:30 in Tokyo (UTC+9, no daylight saving) is 08:30Z.
    expect(c2).toEqual([4, 11, 18, 25, 32, 39].map((d) => iso(Date.UTC(2026, 10, d, 8, 30))));
    expect(platform.posts.some((p) => p.channel === "c3")).toBe(false);
    const claim = await store.getClaim({
      channel: "c1",
      kind: "digest",
      period: "2026-11-02T09:00[UTC]",
    });
    expect(claim).toMatchObject({
      status: "posted",
      platformMessageId: platform.posts[0].messageId,
    });
  });

  it("keeps Monday 09:00 Berlin time across the change on 2026-10-25 (07:00Z, then 08:00Z)", async () => {
    // Directive 2000/84/EC: summer time ends on the last Sunday of October at 01:00 GMT.
    const store = await memoryStore("c1");
    const start = Date.UTC(2026, 9, 11);
    const clock = new ManualClock(start);
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      readSettings: settingsMap({ c1: { timezone: "Europe/Berlin" } }),
    });
    await runUntil(clock, Date.UTC(2026, 10, 10), 15 * MINUTE, () => scheduler.tick());
    expect(platform.posts.map((p) => iso(p.at))).toEqual([
      "2026-10-12T07:00:00.000Z",
      "2026-10-19T07:00:00.000Z",
      "2026-10-26T08:00:00.000Z",
      "2026-11-02T08:00:00.000Z",
      "2026-11-09T08:00:00.000Z",
    ]);
    expect(
      await store.getClaim({
        channel: "c1",
        kind: "digest",
        period: "2026-10-26T09:00[Europe/Berlin]",
      }),
    ).toMatchObject({ status: "posted" });
  });

  it("after downtime posts a digest less than 24 h late once", async () => {
    const store = await memoryStore("c1");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot + 24 * HOUR - 1);
    const { scheduler, platform } = makeScheduler({ store, clock });
    const report = await scheduler.tick();
    expect(report.posted).toMatchObject([
      { channel: "c1", period: "2026-11-02T09:00[UTC]", slotAt: slot },
    ]);
    await runUntil(clock, slot + 3 * DAY_MS, HOUR, () => scheduler.tick());
    expect(platform.posts).toHaveLength(1);
  });

  it("after downtime of 24 h or more logs the digest as missed and no replica posts it", async () => {
    const store = await memoryStore("c1");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot + 24 * HOUR);
    const a = makeScheduler({ store, clock, replicaId: "a" });
    const report = await a.scheduler.tick();
    expect(report.posted).toEqual([]);
    expect(report.missed).toEqual([
      {
        channel: "c1",
        kind: "digest",
        period: "2026-11-02T09:00[UTC]",
        claimedBy: "a",
        reason: "too-late",
      },
    ]);
    expect(a.logger.records.filter((r) => r.level === "warn")).toHaveLength(1);
    const b = makeScheduler({ store, clock, replicaId: "b" });
    await runUntil(clock, slot + 6 * DAY_MS, HOUR, async () => {
      await a.scheduler.tick();
      await b.scheduler.tick();
    });
    expect([...a.platform.posts, ...b.platform.posts]).toEqual([]);
    expect(
      await store.getClaim({ channel: "c1", kind: "digest", period: "2026-11-02T09:00[UTC]" }),
    ).toMatchObject({ status: "missed", platformMessageId: "(missed: too late)" });
  });

  it("records a slot with nothing to post as done, not as a miss", async () => {
    const store = await memoryStore("c1");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      composeDigest: async () => null,
    });
    const first = await scheduler.tick();
    expect(first.skipped).toMatchObject([{ reason: "nothing-to-post" }]);
    clock.advance(2 * DAY_MS);
    expect((await scheduler.tick()).missed).toEqual([]);
    expect(platform.posts).toEqual([]);
    const claim = await store.getClaim({
      channel: "c1",
      kind: "digest",
      period: "2026-11-02T09:00[UTC]",
    });
    expect(claim).toMatchObject({ status: "posted", platformMessageId: NOTHING_POSTED });
  });

  it("never retries a failed post: the claim becomes a miss (outcome unknown) after its lease", async () => {
    const store = await memoryStore("c1", "c2");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      leaseMs: 10 * MINUTE,
      readSettings: settingsMap({ c2: { timezone: "Not/AZone" } }),
    });
    platform.failures.push(new Error("socket hang up"));
    const first = await scheduler.tick();
    expect([...first.failed].sort((x, y) => x.channel.localeCompare(y.channel))).toEqual([
      { channel: "c1", kind: "digest", period: "2026-11-02T09:00[UTC]", error: "Error" },
      { channel: "c2", kind: "digest", period: null, error: "SETTING_BAD_VALUE" },
    ]);
    clock.advance(10 * MINUTE + 1);
    const second = await scheduler.tick();
    expect(second.missed).toMatchObject([
      { channel: "c1", reason: "outcome-unknown", claimedBy: "r1" },
    ]);
    await runUntil(clock, slot + DAY_MS, 10 * MINUTE, () => scheduler.tick());
    expect(platform.posts).toEqual([]);
  });

  it("retries a compose failure after its lease (nothing was sent) and posts once", async () => {
    const store = await memoryStore("c1");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    let calls = 0;
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      leaseMs: 10 * MINUTE,
      composeDigest: async () => {
        calls++;
        if (calls === 1) throw new Error("analysis failed");
        return message("digest");
      },
    });
    expect((await scheduler.tick()).failed).toMatchObject([{ channel: "c1", error: "Error" }]);
    clock.advance(10 * MINUTE);
    expect((await scheduler.tick()).posted).toEqual([]);
    clock.advance(1);
    expect((await scheduler.tick()).posted).toMatchObject([{ channel: "c1" }]);
    await runUntil(clock, slot + 2 * DAY_MS, 10 * MINUTE, () => scheduler.tick());
    expect(calls).toBe(2);
    expect(platform.posts).toHaveLength(1);
  });

  it("tries a post the platform refused unsent (rate limited) again, until 24 h late", async () => {
    const store = await memoryStore("c1", "c2");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    const limited = failure({ outcome: "not-sent", retryAfterMs: null }, "rate limited");
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      leaseMs: 10 * MINUTE,
      readSettings: settingsMap({ c2: { digest: { weekday: 1, time: "10:00" } } }),
    });
    platform.failures.push(limited, limited);
    // c1 (09:00) fails twice: first pass, then the next pass after its lease.
    await scheduler.tick();
    clock.advance(10 * MINUTE + 1);
    await scheduler.tick();
    clock.advance(10 * MINUTE + 1);
    expect((await scheduler.tick()).posted).toMatchObject([{ channel: "c1" }]);
    expect(platform.posts.map((p) => p.channel)).toEqual(["c1"]);
    // c2 (10:00) is refused on every try until it is 24 h late: then recorded as missed.
    platform.failures.push(...Array.from({ length: 200 }, () => limited));
    const missed: string[] = [];
    await runUntil(clock, slot + 2 * DAY_MS, 10 * MINUTE, async () => {
      missed.push(...(await scheduler.tick()).missed.map((m) => `${m.channel} ${m.reason}`));
    });
    expect(missed).toEqual(["c2 too-late"]);
    expect(platform.posts.map((p) => p.channel)).toEqual(["c1"]);
    expect(
      await store.getClaim({ channel: "c2", kind: "digest", period: "2026-11-02T10:00[UTC]" }),
    ).toMatchObject({ status: "missed", platformMessageId: "(missed: too late)" });
  });
});

describe("several replicas on one SQLite file", () => {
  it("post each period exactly once between two schedulers", async () => {
    // better-sqlite3 is synchronous: two connections in one thread cannot hold transactions at
    // once, so the replicas take turns (which one goes first alternates); `blind` makes the
    // second replica miss the first one's claim on read, so the insert conflict must stop it.
    const [storeA, storeB] = await sharedSqlite();
    await storeA.registerChannel("c2", null);
    const start = Date.UTC(2026, 9, 31);
    const clock = new ManualClock(start);
    const readSettings = settingsMap({
      c2: { timezone: "Europe/Berlin", digest: { weekday: 5, time: "16:00" } },
    });
    const a = makeScheduler({ store: storeA, clock, replicaId: "a", readSettings });
    const b = makeScheduler({ store: blind(storeB), clock, replicaId: "b", readSettings });
    let turn = 0;
    const skipped: string[] = [];
    const posted: PostedEntry[] = [];
    await runUntil(clock, start + 28 * DAY_MS, HOUR, async () => {
      const order = turn++ % 2 === 0 ? [a, b] : [b, a];
      for (const r of order) {
        const report = await r.scheduler.tick();
        skipped.push(...report.skipped.map((s) => s.reason));
        posted.push(...report.posted);
      }
    });
    const posts = [...a.platform.posts, ...b.platform.posts];
    expect(posts.map((p) => `${p.channel} ${iso(p.at)}`).sort()).toEqual(
      [
        ...[2, 9, 16, 23].map((d) => `c1 ${iso(Date.UTC(2026, 10, d, 9, 0))}`),
        // Friday 30 October 16:00 CET was 9 h before the start: caught up at once.
        `c2 ${iso(start)}`,
        // Friday 16:00 CET (UTC+1) is 15:00Z.
        ...[6, 13, 20, 27].map((d) => `c2 ${iso(Date.UTC(2026, 10, d, 15, 0))}`),
      ].sort(),
    );
    expect(a.platform.posts.length).toBeGreaterThan(0);
    expect(b.platform.posts.length).toBeGreaterThan(0);
    // b, blind to a's claims, was refused by the insert every time it tried a slot a held.
    expect(skipped.length).toBeGreaterThan(0);
    expect(skipped.every((r) => r === "claimed-elsewhere")).toBe(true);
    expect(posted).toContainEqual(
      expect.objectContaining({
        channel: "c2",
        period: "2026-10-30T16:00[Europe/Berlin]",
        slotAt: Date.UTC(2026, 9, 30, 15, 0),
      }),
    );
    expect(new Set(posted.map((p) => `${p.channel} ${p.period}`)).size).toBe(posted.length);
    for (const post of posted) {
      const claim = await storeA.getClaim(post);
      expect(claim).toMatchObject({ status: "posted", platformMessageId: post.messageId });
      expect(claim?.claimedBy).toBe(post.messageId.split("-")[0]);
    }
  });

  it("race in one store: concurrent passes post each slot once", async () => {
    const store = await memoryStore("c1", "c2", "c3");
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot + MINUTE);
    const replicas = ["a", "b", "c"].map((id) => makeScheduler({ store, clock, replicaId: id }));
    const reports = await Promise.all(replicas.map((r) => r.scheduler.tick()));
    const posted = reports.flatMap((r) => r.posted.map((p) => p.channel)).sort();
    expect(posted).toEqual(["c1", "c2", "c3"]);
    expect(replicas.flatMap((r) => r.platform.posts)).toHaveLength(3);
  });

  it("logs a claim whose replica died while posting as a miss, and nobody posts it", async () => {
    const [storeA, storeB] = await sharedSqlite();
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    const dead = makeScheduler({ store: storeA, clock, replicaId: "dead", leaseMs: 15 * MINUTE });
    dead.platform.hang = true;
    const started = new Promise<void>((resolve) => {
      dead.platform.onPost = resolve;
    });
    void dead.scheduler.tick(); // never finishes: the replica "dies" mid-post
    await started;
    const live = makeScheduler({ store: storeB, clock, replicaId: "live", leaseMs: 15 * MINUTE });
    expect((await live.scheduler.tick()).posted).toEqual([]);
    clock.advance(15 * MINUTE);
    expect((await live.scheduler.tick()).missed).toEqual([]);
    clock.advance(1);
    const report = await live.scheduler.tick();
    expect(report.missed).toEqual([
      {
        channel: "c1",
        kind: "digest",
        period: "2026-11-02T09:00[UTC]",
        claimedBy: "dead",
        reason: "outcome-unknown",
      },
    ]);
    expect(
      live.logger.records.some((r) => r.level === "warn" && r.fields.claimedBy === "dead"),
    ).toBe(true);
    await runUntil(clock, slot + 5 * DAY_MS, HOUR, async () => {
      const r = await live.scheduler.tick();
      expect(r.missed).toEqual([]);
    });
    expect(live.platform.posts).toEqual([]);
    expect(
      await storeB.getClaim({ channel: "c1", kind: "digest", period: "2026-11-02T09:00[UTC]" }),
    ).toMatchObject({
      status: "missed",
      claimedBy: "dead",
      platformMessageId: "(missed: outcome unknown)",
    });
  });

  it("asks the platform about a claim whose replica died while posting: absent, posted once; present, recorded", async () => {
    for (const arrived of [false, true]) {
      const [storeA, storeB] = await sharedSqlite();
      const slot = Date.UTC(2026, 10, 2, 9, 0);
      const clock = new ManualClock(slot);
      const dead = makeScheduler({ store: storeA, clock, replicaId: "dead", leaseMs: 15 * MINUTE });
      dead.platform.hang = true;
      const started = new Promise<void>((resolve) => {
        dead.platform.onPost = resolve;
      });
      void dead.scheduler.tick(); // never finishes: the replica is killed mid-post
      await started;
      const live = makeScheduler({ store: storeB, clock, replicaId: "live", leaseMs: 15 * MINUTE });
      const asked: [string, string, number][] = [];
      live.platform.findPost = async (channel, marker, since) => {
        asked.push([channel, marker, since]);
        return arrived ? "ts-of-the-dead-post" : null;
      };
      clock.advance(15 * MINUTE);
      expect((await live.scheduler.tick()).settled).toEqual([]);
      expect(asked).toEqual([]);
      clock.advance(1);
      const report = await live.scheduler.tick();
      const period = "2026-11-02T09:00[UTC]";
      expect(asked).toEqual([["c1", `digest ${period}`, slot - 60_000]]);
      expect(report.settled).toEqual([{ channel: "c1", kind: "digest", period, found: arrived }]);
      expect(report.missed).toEqual([]);
      expect(report.posted.map((p) => p.channel)).toEqual(arrived ? [] : ["c1"]);
      await runUntil(clock, slot + 3 * DAY_MS, HOUR, () => live.scheduler.tick());
      expect(live.platform.posts.map((p) => p.marker)).toEqual(arrived ? [] : [`digest ${period}`]);
      expect(await storeB.getClaim({ channel: "c1", kind: "digest", period })).toMatchObject({
        status: "posted",
        platformMessageId: arrived ? "ts-of-the-dead-post" : "live-1",
      });
    }
  });

  it("takes over a claim whose replica died while composing, once its lease ends", async () => {
    const [storeA, storeB] = await sharedSqlite();
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot);
    let wake: (() => void) | null = null;
    const started = new Promise<void>((resolve) => {
      wake = resolve;
    });
    let resume: (() => void) | null = null;
    const dead = makeScheduler({
      store: storeA,
      clock,
      replicaId: "dead",
      leaseMs: 15 * MINUTE,
      composeDigest: async () => {
        wake?.();
        await new Promise<void>((resolve) => {
          resume = resolve;
        });
        return message("late digest");
      },
    });
    const deadPass = dead.scheduler.tick();
    await started;
    const live = makeScheduler({ store: storeB, clock, replicaId: "live", leaseMs: 15 * MINUTE });
    clock.advance(15 * MINUTE);
    expect((await live.scheduler.tick()).posted).toEqual([]);
    clock.advance(1);
    const report = await live.scheduler.tick();
    expect(report.posted).toMatchObject([{ channel: "c1", period: "2026-11-02T09:00[UTC]" }]);
    expect(report.missed).toEqual([]);
    // The stalled replica wakes up with its digest composed: it must not post.
    (resume as (() => void) | null)?.();
    const late = await deadPass;
    expect(late.skipped).toMatchObject([{ channel: "c1", reason: "claimed-elsewhere" }]);
    expect(dead.platform.posts).toEqual([]);
    expect(live.platform.posts).toHaveLength(1);
    expect(
      await storeA.getClaim({ channel: "c1", kind: "digest", period: "2026-11-02T09:00[UTC]" }),
    ).toMatchObject({ status: "posted", claimedBy: "live" });
  });

  it("splits a burst between replicas: each walks the channels in its own order", async () => {
    const channels = Array.from({ length: 60 }, (_, i) => `c${String(i).padStart(2, "0")}`);
    const store = await memoryStore(...channels);
    const slot = Date.UTC(2026, 10, 2, 9, 0);
    const clock = new ManualClock(slot + MINUTE);
    const replicas = ["a", "b", "c"].map((id) => makeScheduler({ store, clock, replicaId: id }));
    const reports = await Promise.all(replicas.map((r) => r.scheduler.tick()));
    const posted = reports.flatMap((r) => r.posted.map((p) => p.channel)).sort();
    expect(posted).toEqual(channels);
    for (const r of replicas) {
      expect(r.platform.posts.length).toBeGreaterThan(0);
      expect(r.platform.posts.length).toBeLessThanOrEqual(30);
    }
  });
});

describe("several channels at once in one replica (jobs)", () => {
  // DESIGN.md §8: one post per (channel, kind, period) across replicas; `jobs` only lets one pass
  // overlap a job's analysis with another's store and platform waits.
  async function overlapOf(jobs: number | undefined, channels: string[]) {
    const store = await memoryStore(...channels);
    const clock = new ManualClock(Date.UTC(2026, 10, 2, 9, 0) + MINUTE);
    let inFlight = 0;
    let most = 0;
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      ...(jobs === undefined ? {} : { jobs }),
      composeDigest: async (channel) => {
        inFlight++;
        most = Math.max(most, inFlight);
        // A compose that waits (as on the store and a worker): other lanes may run meanwhile.
        for (let i = 0; i < 3; i++) await new Promise((resolve) => setImmediate(resolve));
        inFlight--;
        return message(`digest ${channel}`);
      },
    });
    const report = await scheduler.tick();
    return { most, inFlight, report, platform };
  }

  it("composes up to `jobs` digests at once and posts each channel once", async () => {
    const channels = ["c1", "c2", "c3", "c4", "c5", "c6", "c7"];
    const { most, inFlight, report, platform } = await overlapOf(3, channels);
    expect(most).toBe(3);
    expect(inFlight).toBe(0); // the pass ends only when every lane has finished
    expect(report.posted.map((p) => p.channel).sort()).toEqual(channels);
    expect(platform.posts.map((p) => p.channel).sort()).toEqual(channels);
  });

  it("works on one channel at a time by default", async () => {
    const { most, report } = await overlapOf(undefined, ["c1", "c2", "c3"]);
    expect(most).toBe(1);
    expect(report.posted).toHaveLength(3);
  });

  it("two replicas with three lanes each post every slot of a burst once", async () => {
    const channels = Array.from({ length: 40 }, (_, i) => `c${String(i).padStart(2, "0")}`);
    const store = await memoryStore(...channels);
    const clock = new ManualClock(Date.UTC(2026, 10, 2, 9, 0) + MINUTE);
    const replicas = ["a", "b"].map((id) =>
      makeScheduler({ store, clock, replicaId: id, jobs: 3 }),
    );
    const reports = await Promise.all(replicas.map((r) => r.scheduler.tick()));
    const posted = reports.flatMap((r) => r.posted.map((p) => p.channel)).sort();
    expect(posted).toEqual(channels);
    expect(replicas.flatMap((r) => r.platform.posts)).toHaveLength(40);
  });

  it("refuses a number of jobs that is not a whole number from 1 to 64", async () => {
    const store = await memoryStore("c1");
    const clock = new ManualClock(0);
    for (const jobs of [0, 1.5, 65, Number.NaN]) {
      expect(() => makeScheduler({ store, clock, jobs })).toThrow(
        expect.objectContaining({ code: "ARG_BAD_VALUE" }),
      );
    }
  });
});

/** A store whose claim reads see nothing, as if every read came before the other replica's insert. */
function blind(store: Store): Store {
  return new Proxy(store, {
    get(target, prop, receiver) {
      if (prop === "getClaim") return async () => null;
      const value = Reflect.get(target, prop, receiver);
      return typeof value === "function" ? value.bind(target) : value;
    },
  });
}

describe("start and stop", () => {
  it("ticks at once and then every interval, and stops", async () => {
    vi.useFakeTimers();
    const store = await memoryStore("c1");
    const clock = new ManualClock(Date.UTC(2026, 10, 2, 9, 0));
    const { scheduler, platform } = makeScheduler({ store, clock });
    const tick = vi.spyOn(scheduler, "tick");
    expect(() => scheduler.start(0)).toThrow(expect.objectContaining({ code: "ARG_BAD_VALUE" }));
    scheduler.start(MINUTE);
    await vi.advanceTimersByTimeAsync(3 * MINUTE);
    await scheduler.stop();
    expect(tick).toHaveBeenCalledTimes(4);
    await vi.advanceTimersByTimeAsync(5 * MINUTE);
    expect(tick).toHaveBeenCalledTimes(4);
    expect(platform.posts).toHaveLength(1);
  });
});

describe("the platform double", () => {
  it("records the clock's time", async () => {
    const clock = new ManualClock(5);
    const platform = new RecordingPlatform(clock, "x");
    expect(await platform.postToChannel("c", { blocks: [], text: "t" })).toEqual({
      messageId: "x-1",
    });
    expect(platform.posts).toEqual([{ channel: "c", text: "t", at: 5, messageId: "x-1" }]);
  });
});
