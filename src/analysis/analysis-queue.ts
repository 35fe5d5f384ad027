/**
 * @module analysis-queue
 * The bounded queue in front of the worker pool for `serve` (DESIGN.md §8): one analysis in
 * flight per (channel, settings, job) — later askers share its result; a short-lived result cache
 * (default 60 s) that new signals invalidate; and, when as many distinct analyses as the capacity
 * are already waiting or running, a refusal with the stable code ANALYSIS_BUSY ("try again in a
 * minute") instead of an ever longer wait. A check asks for "now", so askers moments apart share
 * one result (its `until` is the first asker's); digests and notes pass `exactUntil` and get
 * their own slot's analysis. New signals reach the cache two ways: the key carries the
 * snapshot's size and latest event, and `invalidate(channel)` drops the channel's entries.
 */
import { PlumblineError } from "../domain/errors.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisRunner, RunOptions } from "../ports/analysis-runner.js";
import type { AnalysisJob, ResultOf } from "./analysis-job.js";

export interface AnalysisQueueOptions {
  readonly runner: AnalysisRunner;
  /** Distinct analyses waiting or running at once; default 8. */
  readonly capacity?: number;
  /** How long a result answers later askers; default 60 000 ms. */
  readonly cacheMs?: number;
  /** Epoch ms (the bot's clock). */
  readonly now: () => number;
}

interface Entry {
  readonly channel: string;
  readonly promise: Promise<unknown>;
  /** Set when the result is in. */
  doneAt: number | null;
}

function busy(): PlumblineError {
  return new PlumblineError(
    "ANALYSIS_BUSY",
    "plumbline is busy with other analyses right now: try again in a minute",
    { hint: "Try again in a minute." },
  );
}

/** What besides channel and settings tells jobs apart ("now" for a check's until). */
function jobArgs(job: AnalysisJob, exactUntil = false): unknown[] {
  if (job.kind === "analyze") return [exactUntil ? (job.until ?? null) : "now"];
  if (job.kind === "whatif") return [job.cap, exactUntil ? (job.until ?? null) : "now"];
  return [job.ranges.a.start, job.ranges.a.until, job.ranges.b.start, job.ranges.b.until];
}

function jobKey(job: AnalysisJob, exactUntil: boolean): string {
  const { snapshot, settings } = job;
  const signature = [
    snapshot.channel,
    snapshot.messages.length,
    snapshot.consent.length,
    snapshot.groups.length,
    snapshot.lastEventAt,
  ];
  return JSON.stringify([job.kind, signature, settings, jobArgs(job, exactUntil)]);
}

export class AnalysisQueue implements AnalysisRunner {
  private readonly runner: AnalysisRunner;
  private readonly capacity: number;
  private readonly cacheMs: number;
  private readonly now: () => number;
  private readonly entries = new Map<string, Entry>();

  constructor(options: AnalysisQueueOptions) {
    this.runner = options.runner;
    this.capacity = options.capacity ?? 8;
    this.cacheMs = options.cacheMs ?? 60_000;
    this.now = options.now;
  }

  /** Analyses waiting or running (not cached results). */
  get inFlight(): number {
    let count = 0;
    for (const entry of this.entries.values()) if (entry.doneAt === null) count++;
    return count;
  }

  run<J extends AnalysisJob>(job: J, options: RunOptions = {}): Promise<ResultOf<J>> {
    this.expire();
    const key = jobKey(job, options.exactUntil === true);
    const known = this.entries.get(key);
    if (known !== undefined) return known.promise as Promise<ResultOf<J>>;
    if (this.inFlight >= this.capacity) return Promise.reject(busy());
    const entry: Entry = {
      channel: job.snapshot.channel,
      promise: this.runner.run(job, options),
      doneAt: null,
    };
    this.track(key, entry);
    return entry.promise as Promise<ResultOf<J>>;
  }

  private track(key: string, entry: Entry): void {
    this.entries.set(key, entry);
    entry.promise.then(
      () => {
        entry.doneAt = this.now();
      },
      () => {
        if (this.entries.get(key) === entry) this.entries.delete(key); // errors are not cached
      },
    );
  }

  runShared<J extends AnalysisJob>(
    job: Omit<J, "snapshot">,
    channel: string,
    load: () => Promise<LedgerSnapshot>,
  ): Promise<{ readonly result: ResultOf<J>; readonly snapshot: LedgerSnapshot }> {
    type Shared = { readonly result: ResultOf<J>; readonly snapshot: LedgerSnapshot };
    this.expire();
    const plain = job as unknown as AnalysisJob;
    const key = JSON.stringify(["shared", channel, plain.kind, plain.settings, jobArgs(plain)]);
    const known = this.entries.get(key);
    if (known !== undefined) return known.promise as Promise<Shared>;
    if (this.inFlight >= this.capacity) return Promise.reject(busy());
    const entry: Entry = {
      channel,
      // The load waits one turn of the event loop, so requests that arrived together with this
      // one are acknowledged before a synchronous store (SQLite) reads the snapshot.
      promise: new Promise<void>((resolve) => setImmediate(resolve))
        .then(load)
        .then(async (snapshot) => ({
          snapshot,
          result: await this.runner.run({ ...job, snapshot } as unknown as J),
        })),
      doneAt: null,
    };
    this.track(key, entry);
    return entry.promise as Promise<Shared>;
  }

  /** New signals in `channel`: later askers get a fresh analysis. */
  invalidate(channel: string): void {
    for (const [key, entry] of this.entries) {
      if (entry.channel === channel && entry.doneAt !== null) this.entries.delete(key);
    }
  }

  private expire(): void {
    const now = this.now();
    for (const [key, entry] of this.entries) {
      if (entry.doneAt !== null && now - entry.doneAt >= this.cacheMs) this.entries.delete(key);
    }
  }
}
