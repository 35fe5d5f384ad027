/**
 * @module worker-pool-entry
 * The worker thread's side of the pool (worker-pool.ts): takes `{ id, job }`, runs it with
 * `runJob`, posts progress (at most every 2% of the draws) and then the result or the error.
 */
import { parentPort } from "node:worker_threads";
import { PlumblineError } from "../domain/errors.js";
import { type AnalysisJob, runJob } from "./analysis-job.js";

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

port.on("message", (message: { id: number; job: AnalysisJob }) => {
  const { id, job } = message;
  let last = 0;
  const reply = (value: WorkerReply) => port.postMessage(value);
  try {
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
});
