import { describe, expect, it } from "vitest";
import { syntheticChannel } from "../../bench/synthetic-channel.js";
import { type AnalysisJob, runJob } from "../../src/analysis/analysis-job.js";
import { AnalysisQueue } from "../../src/analysis/analysis-queue.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import type { AnalysisRunner } from "../../src/ports/analysis-runner.js";

// The queue of DESIGN.md §8. The runner underneath is the real analysis, held back until the
// test releases it, so "in flight" is a state the test controls instead of a race.

function snapshotOf(channel: string, seed: number): LedgerSnapshot {
  const c = syntheticChannel({ members: 20, messages: 300, seed, channel });
  const snapshot = buildLedgers(c.events).get(channel);
  if (snapshot === undefined) throw new Error("no ledger");
  return snapshot;
}

function heldRunner() {
  const held: (() => void)[] = [];
  let started = 0;
  const runner: AnalysisRunner = {
    run(job) {
      started++;
      return new Promise((resolve) => held.push(() => resolve(runJob(job))));
    },
  };
  return {
    runner,
    started: () => started,
    releaseAll: () => {
      for (const release of held.splice(0)) release();
    },
  };
}

const settings = { ...DEFAULT_SETTINGS, samples: 20 };
const a = snapshotOf("a", 1);
const job = (snapshot: LedgerSnapshot, until?: number): AnalysisJob => ({
  kind: "analyze",
  snapshot,
  settings,
  ...(until === undefined ? {} : { until }),
});

describe("analysis queue", () => {
  it("runs one analysis for askers of the same channel and settings, and caches it", async () => {
    let now = 0;
    const held = heldRunner();
    const queue = new AnalysisQueue({ runner: held.runner, now: () => now, cacheMs: 60_000 });
    const asks = [queue.run(job(a)), queue.run(job(a)), queue.run(job(a))];
    expect(held.started()).toBe(1);
    expect(queue.inFlight).toBe(1);
    held.releaseAll();
    const [r1, r2, r3] = await Promise.all(asks);
    expect(r2).toBe(r1);
    expect(r3).toBe(r1);
    now = 59_999;
    expect(await queue.run(job(a))).toBe(r1);
    expect(held.started()).toBe(1);
    now = 60_000; // expired
    const again = queue.run(job(a));
    expect(held.started()).toBe(2);
    held.releaseAll();
    expect(JSON.stringify(await again)).toBe(JSON.stringify(r1));
  });

  it("drops a channel's cached result when new signals arrive", async () => {
    const held = heldRunner();
    const queue = new AnalysisQueue({ runner: held.runner, now: () => 0 });
    const first = queue.run(job(a));
    held.releaseAll();
    await first;
    queue.invalidate("b"); // another channel: kept
    void queue.run(job(a));
    expect(held.started()).toBe(1);
    queue.invalidate("a");
    void queue.run(job(a));
    expect(held.started()).toBe(2);
    held.releaseAll();
  });

  it("keeps exact-until jobs (digests) apart, and answers ANALYSIS_BUSY when full", async () => {
    const held = heldRunner();
    const queue = new AnalysisQueue({ runner: held.runner, now: () => 0, capacity: 2 });
    void queue.run(job(a, 1_000), { exactUntil: true });
    void queue.run(job(a, 2_000), { exactUntil: true });
    expect(held.started()).toBe(2);
    const refused = await queue.run(job(snapshotOf("c", 3))).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(PlumblineError);
    expect((refused as PlumblineError).code).toBe("ANALYSIS_BUSY");
    expect((refused as PlumblineError).message).toMatch(/try again in a minute/);
    held.releaseAll();
  });

  it("shares one snapshot load between askers at once (runShared)", async () => {
    const held = heldRunner();
    const queue = new AnalysisQueue({ runner: held.runner, now: () => 0 });
    let loads = 0;
    const load = async () => {
      loads++;
      return a;
    };
    const plain = { kind: "analyze" as const, settings };
    const asks = [1, 2, 3].map(() => queue.runShared(plain, "a", load));
    // The load is deferred one event-loop turn (serve acknowledges first): yield macrotasks.
    while (held.started() === 0) await new Promise((resolve) => setImmediate(resolve));
    held.releaseAll();
    const results = await Promise.all(asks);
    expect(loads).toBe(1);
    expect(results[1]).toBe(results[0]);
    expect(JSON.stringify(results[0].result)).toBe(JSON.stringify(runJob(job(a))));
  });
});
