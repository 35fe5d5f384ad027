/**
 * @module worker-pool-entry
 * The worker thread's side of the pool (worker-pool.ts): takes `{ id, job }`, runs it with
 * `runJob`, posts progress (at most every 2% of the draws) and then the result or the error.
 * Also takes `{ type: "draws" }`: a share of one analysis's posterior draws, chunk by chunk from a
 * counter shared with the other workers, written straight into shared arrays (DrawTask), and
 * `{ type: "strength" }`: ranges of rows of the prior's strength posterior, the same way
 * (StrengthTask).
 */
import { parentPort } from "node:worker_threads";
import { PlumblineError } from "../domain/errors.js";
import { type DrawPlan, drawShares } from "../influence/posterior-draws.js";
import type { AnalysisJob } from "./analysis-job.js";
import { runStrengthChunks, type StrengthTask } from "./strength-chunks.js";

export type WorkerReply =
  | {
      readonly id: number;
      readonly type: "progress";
      readonly done: number;
      readonly total: number;
    }
  | { readonly id: number; readonly type: "result"; readonly result: unknown }
  | {
      readonly id: number;
      readonly type: "error";
      readonly error: { name: string; message: string; code: string | null; hint: string };
    };

const port = parentPort;
if (port === null) throw new Error("worker-pool-entry runs only as a worker thread");

/** Draws [0, samples) of `plan` in chunks; control = [done, failed, next chunk, started]. */
export interface DrawTask {
  readonly type: "draws";
  readonly plan: DrawPlan;
  readonly samples: number;
  readonly chunk: number;
  readonly shares: Float64Array;
  readonly voices: Float64Array;
  readonly control: Int32Array;
}

function runDraws(task: DrawTask): void {
  const { plan, samples, chunk, shares, voices, control } = task;
  Atomics.add(control, 3, 1);
  try {
    for (;;) {
      const from = Atomics.add(control, 2, 1) * chunk;
      if (from >= samples) break;
      const to = Math.min(samples, from + chunk);
      const range = drawShares(plan, from, to);
      shares.set(range.shares, from * plan.n);
      voices.set(range.effectiveVoices, from);
      Atomics.add(control, 0, to - from);
      Atomics.notify(control, 0);
    }
  } catch {
    Atomics.store(control, 1, 1);
    Atomics.notify(control, 0);
  }
}

port.on("message", (message: { id: number; job: AnalysisJob } | DrawTask | StrengthTask) => {
  if ("type" in message && message.type === "draws") {
    runDraws(message);
    return;
  }
  if ("type" in message && message.type === "strength") {
    runStrengthChunks(message);
    return;
  }
  const { id, job } = message as { id: number; job: AnalysisJob };
  void runWholeJob(id, job);
});

// Whole jobs (serve, compare, what-if) need the whole analysis (ledger, signals, Louvain,
// reports); the CLI's analyze sends only draws and strength rows. Loaded on the first job, so a
// worker that only draws starts with half the modules (≈0.2 s of CPU less per worker).
let analysisJob: Promise<typeof import("./analysis-job.js")> | null = null;

async function runWholeJob(id: number, job: AnalysisJob): Promise<void> {
  let last = 0;
  const reply = (value: WorkerReply) => port?.postMessage(value);
  try {
    analysisJob ??= import("./analysis-job.js");
    const { runJob } = await analysisJob;
    const result = runJob(job, (done, total) => {
      if (done === total || done - last >= Math.max(1, Math.ceil(total / 50))) {
        last = done;
        reply({ id, type: "progress", done, total });
      }
    });
    reply({ id, type: "result", result });
  } catch (error) {
    const e = error instanceof Error ? error : new Error(String(error));
    reply({
      id,
      type: "error",
      error: {
        name: e.name,
        message: e.message,
        code: e instanceof PlumblineError ? e.code : null,
        hint: e instanceof PlumblineError ? e.hint : "",
      },
    });
  }
}
