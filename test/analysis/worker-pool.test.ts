import { afterEach, describe, expect, it } from "vitest";
import { syntheticChannel } from "../../bench/synthetic-channel.js";
import { runJob } from "../../src/analysis/analysis-job.js";
import { poolSize, WorkerPool } from "../../src/analysis/worker-pool.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";

// DESIGN.md §4.11: same log, settings and seed give byte-identical JSON for any worker count.
// The reference is the calling thread's own run of the same job.

function channel(members: number, messages: number, seed: number): LedgerSnapshot {
  const c = syntheticChannel({ members, messages, seed, channel: `c${seed}` });
  const snapshot = buildLedgers(c.events).get(c.channel);
  if (snapshot === undefined) throw new Error("no ledger");
  return snapshot;
}

const settings = { ...DEFAULT_SETTINGS, samples: 60 };
const snapshots = [channel(40, 900, 1), channel(25, 400, 2), channel(60, 1500, 3)];
const jobs = [
  ...snapshots.map((snapshot) => ({ kind: "analyze" as const, snapshot, settings })),
  { kind: "whatif" as const, snapshot: snapshots[0], settings, cap: 0.2 },
  {
    kind: "compare" as const,
    snapshot: snapshots[2],
    settings,
    ranges: {
      a: parseDateRange("2026-11-02..2026-11-15"),
      b: parseDateRange("2026-11-16..2026-11-29"),
    },
  },
];

let pool: WorkerPool | null = null;
afterEach(async () => {
  await pool?.close();
  pool = null;
});

describe("worker pool", () => {
  const expected = jobs.map((job) => JSON.stringify(runJob(job)));

  for (const size of [1, 2, 3]) {
    it(`gives byte-identical JSON with ${size} worker thread(s), jobs in flight together`, async () => {
      pool = new WorkerPool({ size, threads: "always" });
      const results = await Promise.all(jobs.map((job) => pool?.run(job)));
      expect(results.map((r) => JSON.stringify(r))).toEqual(expected);
      expect(pool.load).toBe(0);
    });
  }

  for (const size of [2, 3]) {
    it(`splits one analysis's draws over ${size} threads with byte-identical JSON`, () => {
      // Per-draw streams (seed, k) make the draws independent of the split (DESIGN.md §4.6).
      pool = new WorkerPool({ size });
      const seen: number[] = [];
      let used = 0;
      const report = runJob(jobs[2], undefined, (plan, samples) => {
        const range = pool?.drawRangesSync(plan, samples, (done) => seen.push(done)) ?? null;
        if (range !== null) used++;
        return range;
      });
      expect(used).toBe(1);
      expect(JSON.stringify(report)).toBe(expected[2]);
      expect(seen.at(-1)).toBe(settings.samples);
    });
  }

  for (const callerTakes of [false, true]) {
    it(`shares the prior's strength rows with 2 workers (caller takes chunks: ${callerTakes}), byte-identical JSON`, async () => {
      pool = new WorkerPool({ size: 2, threads: "always" });
      await Promise.all(jobs.slice(0, 2).map((job) => pool?.run(job))); // both workers loaded
      let shared = 0;
      const report = runJob(jobs[2], undefined, undefined, (task, cumulative, strength) => {
        const done = pool?.strengthRowsSync(task, cumulative, strength, callerTakes) ?? false;
        if (done) shared++;
        return done;
      });
      expect(shared).toBe(2); // both passes of the prior went through the pool
      expect(JSON.stringify(report)).toBe(expected[2]);
    });
  }

  it("leaves the strength rows to the caller when no worker is up", () => {
    pool = new WorkerPool({ size: 2 });
    let answers: boolean[] = [];
    const report = runJob(jobs[0], undefined, undefined, (task, cumulative, strength) => {
      const done = pool?.strengthRowsSync(task, cumulative, strength) ?? true;
      answers = [...answers, done];
      return done;
    });
    expect(answers).toEqual([false, false]);
    expect(JSON.stringify(report)).toBe(expected[0]);
  });

  it("tells /readyz whether it can run analyses: up once warm, down once closed", async () => {
    pool = new WorkerPool({ size: 1, threads: "always" });
    expect(() => pool?.assertUp()).toThrow(/no analysis worker/);
    pool.warm();
    expect(() => pool?.assertUp()).not.toThrow();
    await pool.close();
    expect(() => pool?.assertUp()).toThrow(/closed/);
  });

  it("runs in the calling thread at size 1 and reports draws done of K", async () => {
    pool = new WorkerPool({ size: 1 });
    expect(pool.inThread).toBe(true);
    const seen: number[] = [];
    const report = await pool.run(jobs[0], {
      onProgress: (done, total) => seen.push(done / total),
    });
    expect(JSON.stringify(report)).toBe(expected[0]);
    expect(seen.length).toBeGreaterThan(10);
    expect(seen.at(-1)).toBe(1);
  });

  it("passes progress from a worker, ending at K of K", async () => {
    pool = new WorkerPool({ size: 1, threads: "always" });
    const seen: [number, number][] = [];
    await pool.run(jobs[2], { onProgress: (done, total) => seen.push([done, total]) });
    expect(seen.length).toBeGreaterThan(1);
    expect(seen.at(-1)).toEqual([settings.samples, settings.samples]);
  });

  it("brings a worker's coded error back with its code and hint", async () => {
    pool = new WorkerPool({ size: 1, threads: "always" });
    const bad = { ...jobs[0], settings: { ...settings, selfWeight: 1.5 } };
    const error = await pool.run(bad).catch((e: unknown) => e);
    expect(error).toBeInstanceOf(PlumblineError);
    expect((error as PlumblineError).code).toBe("SETTING_BAD_VALUE");
    expect((error as PlumblineError).hint).toMatch(/self-weight/);
  });

  it("takes its size from PLUMBLINE_WORKERS and refuses a bad one", () => {
    expect(poolSize({ PLUMBLINE_WORKERS: "3" })).toBe(3);
    expect(poolSize({})).toBeGreaterThanOrEqual(1);
    for (const raw of ["0", "1.5", "two", "-1"]) {
      expect(() => poolSize({ PLUMBLINE_WORKERS: raw })).toThrow(/PLUMBLINE_WORKERS/);
    }
  });
});
