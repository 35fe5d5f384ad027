/**
 * @module worker-pool
 * Analyses off the calling thread (DESIGN.md §8): a pool of node:worker_threads, each running
 * whole jobs (analysis-job.ts) one at a time; jobs wait in arrival order for a free worker. Size:
 * `PLUMBLINE_WORKERS`, else `os.availableParallelism()`; size 1 runs jobs in the calling thread
 * (the CLI's cheapest path) unless `threads: "always"` (serve, whose event loop must stay free).
 * Workers start on the first job (the CLI starts the pool on demand) or on `warm()` (serve keeps
 * them warm); an idle pool does not keep the process alive. Results cross by structured clone,
 * which keeps key order and −0, so a report is byte-identical whatever the pool size. The worker
 * runs from dist/ when built (worker-pool-entry.js beside this file) and under tsx from the
 * TypeScript source otherwise (tests, `npm run demo`).
 */
import { existsSync } from "node:fs";
import { createRequire } from "node:module";
import { availableParallelism } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker } from "node:worker_threads";
import { PlumblineError } from "../domain/errors.js";
import type { StrengthRowsTask } from "../influence/attention-prior.js";
import type { DrawPlan, DrawRange } from "../influence/posterior-draws.js";
import type { AnalysisRunner, RunOptions } from "../ports/analysis-runner.js";
import { type AnalysisJob, type ResultOf, runJob } from "./analysis-job.js";
import { runStrengthChunks, type StrengthTask } from "./strength-chunks.js";
import type { DrawTask, WorkerReply } from "./worker-pool-entry.js";

/** The pool size from `PLUMBLINE_WORKERS` (a whole number ≥ 1), else the machine's parallelism. */
export function poolSize(env: Readonly<Record<string, string | undefined>>): number {
  const raw = env.PLUMBLINE_WORKERS;
  if (raw === undefined || raw.trim() === "") return Math.max(1, availableParallelism());
  const size = Number(raw);
  if (!Number.isInteger(size) || size < 1 || size > 256) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `PLUMBLINE_WORKERS must be a whole number from 1 to 256, got "${raw}"`,
      { hint: "Set PLUMBLINE_WORKERS to 1 (in-thread) or more, or leave it unset." },
    );
  }
  return size;
}

export interface PoolOptions {
  /** Number of workers; default `poolSize(process.env)`. */
  readonly size?: number;
  /** `auto` (default): size 1 runs in the calling thread; `always`: at least one worker. */
  readonly threads?: "auto" | "always";
}

interface Task {
  readonly id: number;
  readonly job: AnalysisJob;
  readonly onProgress: RunOptions["onProgress"];
  resolve(value: unknown): void;
  reject(error: unknown): void;
}

interface Slot {
  readonly worker: Worker;
  task: Task | null;
}

/** How to start a worker: the built entry, or the TypeScript one through tsx's loader API. */
function startWorker(): Worker {
  const built = new URL("./worker-pool-entry.js", import.meta.url);
  if (existsSync(fileURLToPath(built))) return new Worker(built);
  // Source tree (tests, tsx): register tsx's ESM hooks inside the worker, then load the entry.
  const tsxRoot = dirname(createRequire(import.meta.url).resolve("tsx/package.json"));
  const api = pathToFileURL(join(tsxRoot, "dist", "esm", "api", "index.mjs")).href;
  const entry = new URL("./worker-pool-entry.ts", import.meta.url).href;
  const bootstrap = `import(${JSON.stringify(api)}).then((tsx) => { tsx.register(); return import(${JSON.stringify(entry)}); });`;
  return new Worker(bootstrap, { eval: true });
}

function revive(error: { name: string; message: string; code: string | null; hint: string }) {
  if (error.code !== null) {
    return new PlumblineError(error.code as PlumblineError["code"], error.message, {
      hint: error.hint,
    });
  }
  const e = new Error(error.message);
  e.name = error.name;
  return e;
}

export class WorkerPool implements AnalysisRunner {
  readonly size: number;
  readonly inThread: boolean;
  private readonly slots: Slot[] = [];
  private readonly waiting: Task[] = [];
  private nextId = 1;
  private closed = false;

  constructor(options: PoolOptions = {}) {
    this.size = options.size ?? poolSize(process.env);
    if (!Number.isInteger(this.size) || this.size < 1) {
      throw new RangeError(`pool size must be a whole number ≥ 1, got ${this.size}`);
    }
    this.inThread = this.size === 1 && options.threads !== "always";
  }

  /** Jobs started and not yet finished, plus those waiting for a worker. */
  get load(): number {
    return this.waiting.length + this.slots.filter((s) => s.task !== null).length;
  }

  /** Starts every worker now (serve), so the first job does not pay for the start. */
  warm(): void {
    if (this.inThread) return;
    while (this.slots.length < this.size) this.spawn();
  }

  run<J extends AnalysisJob>(job: J, options: RunOptions = {}): Promise<ResultOf<J>> {
    if (this.closed) return Promise.reject(new Error("the analysis pool is closed"));
    if (this.inThread) {
      return new Promise((resolve) => resolve(runJob(job, options.onProgress)));
    }
    return new Promise<ResultOf<J>>((resolve, reject) => {
      this.waiting.push({
        id: this.nextId++,
        job,
        onProgress: options.onProgress,
        resolve: resolve as (value: unknown) => void,
        reject,
      });
      this.dispatch();
    });
  }

  /**
   * Posterior draws [0, samples) of one analysis split over the pool's workers (the calling
   * thread waits, printing progress). Chunks are taken from a shared counter, each chunk is
   * `drawShares(plan, from, to)` on its own per-draw streams, and the results land at their own
   * offsets, so the draws are the same as in one thread for any pool size. Null (draws made by
   * the caller) when the pool runs in-thread, has jobs of its own, or a worker fails or does not
   * start within `startMs`. `meanwhile`, when given, runs on the calling thread right after the
   * workers get the task (the CLI computes |λ2| there), before the wait.
   */
  drawRangesSync(
    plan: DrawPlan,
    samples: number,
    onProgress?: (done: number, total: number) => void,
    startMs = 30_000,
    meanwhile?: () => void,
  ): DrawRange | null {
    if (this.inThread || this.closed || this.load > 0 || samples === 0) return null;
    this.warm();
    const n = plan.n;
    const shares = new Float64Array(new SharedArrayBuffer(8 * samples * n));
    const voices = new Float64Array(new SharedArrayBuffer(8 * samples));
    const control = new Int32Array(new SharedArrayBuffer(16));
    const chunk = Math.max(1, Math.ceil(samples / (8 * this.size)));
    const task: DrawTask = { type: "draws", plan, samples, chunk, shares, voices, control };
    for (const slot of this.slots) slot.worker.postMessage(task);
    // Work of the caller's that does not need the draws runs while the workers draw.
    meanwhile?.();
    const begin = performance.now();
    let done = 0;
    while (done < samples) {
      Atomics.wait(control, 0, done, 250);
      done = Atomics.load(control, 0);
      if (Atomics.load(control, 1) !== 0) return null;
      if (Atomics.load(control, 3) === 0 && performance.now() - begin > startMs) {
        Atomics.store(control, 2, samples); // let late workers find nothing left to do
        return null;
      }
      onProgress?.(done, samples);
    }
    return { shares, effectiveVoices: voices };
  }

  /**
   * One pass of the prior's strength posterior over the rows (`StrengthRowsRunner`), shared by
   * the calling thread and the workers already started (the CLI starts them before reading the
   * log; they are idle until the draws): chunks of rows from a shared counter, each computed by
   * `strengthRows`, results at the rows' offsets, so the same numbers as in one thread. The
   * calling thread takes chunks too, so a worker still loading costs nothing: it finds none
   * left. False (the caller computes every row) when no worker is up, the pool has jobs of its
   * own, or a worker failed on a chunk.
   */
  strengthRowsSync(
    task: StrengthRowsTask,
    cumulative: Float64Array,
    strength: Float64Array,
    callerTakes = true,
  ): boolean {
    if (this.inThread || this.closed || this.load > 0 || this.slots.length === 0) return false;
    const n = task.n;
    const G = task.grid.length;
    const sharedCumulative = new Float64Array(new SharedArrayBuffer(8 * n * G));
    const sharedStrength = new Float64Array(new SharedArrayBuffer(8 * n));
    const control = new Int32Array(new SharedArrayBuffer(12));
    const chunk = Math.max(1, Math.ceil(n / (8 * (this.slots.length + 1))));
    const message: StrengthTask = {
      type: "strength",
      task,
      chunk,
      cumulative: sharedCumulative,
      strength: sharedStrength,
      control,
    };
    for (const slot of this.slots) slot.worker.postMessage(message);
    if (callerTakes) runStrengthChunks(message); // false: the workers take every chunk (tests)
    // The chunks the workers took: each takes milliseconds; 30 s without progress means a worker
    // died holding one (its exit event cannot be handled while this thread waits).
    let last = performance.now();
    for (let done = Atomics.load(control, 0); done < n; ) {
      if (Atomics.load(control, 1) !== 0) return false;
      Atomics.wait(control, 0, done, 250);
      const now = Atomics.load(control, 0);
      if (now !== done) last = performance.now();
      else if (performance.now() - last > 30_000) return false;
      done = now;
    }
    if (Atomics.load(control, 1) !== 0) return false;
    cumulative.set(sharedCumulative);
    strength.set(sharedStrength);
    return true;
  }

  /** For readiness (`/readyz`): throws when the pool is closed or, off-thread, has no worker. */
  assertUp(): void {
    if (this.closed) throw new Error("the analysis pool is closed");
    if (!this.inThread && this.slots.length === 0) throw new Error("no analysis worker is running");
  }

  /** Stops the workers; jobs not finished are rejected. */
  async close(): Promise<void> {
    this.closed = true;
    const pending = [...this.waiting, ...this.slots.flatMap((s) => (s.task ? [s.task] : []))];
    this.waiting.length = 0;
    for (const task of pending) task.reject(new Error("the analysis pool was closed"));
    await Promise.all(this.slots.map((slot) => slot.worker.terminate()));
    this.slots.length = 0;
  }

  private spawn(): Slot {
    const worker = startWorker();
    const slot: Slot = { worker, task: null };
    worker.unref();
    worker.on("message", (reply: WorkerReply) => this.onReply(slot, reply));
    worker.on("error", (error) => this.onCrash(slot, error));
    worker.on("exit", (code) => {
      if (!this.closed) this.onCrash(slot, new Error(`analysis worker exited with code ${code}`));
    });
    this.slots.push(slot);
    return slot;
  }

  private dispatch(): void {
    while (this.waiting.length > 0) {
      let slot = this.slots.find((s) => s.task === null);
      if (slot === undefined && this.slots.length < this.size) slot = this.spawn();
      if (slot === undefined) return;
      const task = this.waiting.shift() as Task;
      slot.task = task;
      slot.worker.ref(); // a job in flight keeps the process alive until it settles
      slot.worker.postMessage({ id: task.id, job: task.job });
    }
  }

  private onReply(slot: Slot, reply: WorkerReply): void {
    const task = slot.task;
    if (task === null || task.id !== reply.id) return;
    if (reply.type === "progress") {
      task.onProgress?.(reply.done, reply.total);
      return;
    }
    slot.task = null;
    slot.worker.unref();
    if (reply.type === "result") task.resolve(reply.result);
    else task.reject(revive(reply.error));
    this.dispatch();
  }

  private onCrash(slot: Slot, error: Error): void {
    const index = this.slots.indexOf(slot);
    if (index < 0) return;
    this.slots.splice(index, 1);
    slot.task?.reject(error);
    slot.task = null;
    void slot.worker.terminate();
    this.dispatch();
  }
}
