/**
 * @module run-jobs
 * Runs calibration jobs in this process or spread over child processes (node:child_process
 * `fork` of job-worker.ts, each handed one job at a time), and gathers the results by cell in a
 * fixed order, so the table does not depend on the number of workers. Progress goes to a callback.
 */
import { type ChildProcess, fork } from "node:child_process";
import { fileURLToPath } from "node:url";
import { type ErrorCode, PlumblineError } from "../../src/domain/errors.js";
import { type ChannelJob, type ChannelResult, measureChannel } from "./measure-channel.js";
import { type CalibrationPlan, cellKey, planCells, planJobs } from "./plan.js";
import { type CellSummary, summarizeCell } from "./summarize-cell.js";

/** What a worker sends back: the job's results, or its error (a coded one rebuilt as such). */
interface WorkerMessage {
  readonly k: number;
  readonly result?: ChannelResult[];
  readonly error?: string;
  readonly coded?: { code: ErrorCode; message: string; hint: string };
}

export type Progress = (done: number, total: number, job: ChannelJob) => void;

/** Runs `jobs` on `workers` processes (1 = in this process); results in job order. */
export async function runJobs(
  jobs: readonly ChannelJob[],
  workers: number,
  progress: Progress = () => {},
): Promise<ChannelResult[][]> {
  const results: ChannelResult[][] = new Array(jobs.length);
  if (workers <= 1 || jobs.length <= 1) {
    jobs.forEach((job, k) => {
      results[k] = measureChannel(job);
      progress(k + 1, jobs.length, job);
    });
    return results;
  }
  const script = fileURLToPath(new URL("./job-worker.ts", import.meta.url));
  let next = 0;
  let done = 0;
  await new Promise<void>((resolve, reject) => {
    const children: ChildProcess[] = [];
    // Stopping the run (Ctrl-C, kill) stops the workers it started.
    const stop = () => {
      for (const child of children) child.kill();
      process.exit(130);
    };
    process.once("SIGINT", stop);
    process.once("SIGTERM", stop);
    const finish = (error?: Error) => {
      process.off("SIGINT", stop);
      process.off("SIGTERM", stop);
      for (const child of children) if (child.connected) child.disconnect();
      if (error) reject(error);
      else resolve();
    };
    const feed = (child: ChildProcess) => {
      if (next >= jobs.length) {
        child.disconnect();
        return;
      }
      const k = next++;
      child.send({ k, job: jobs[k] });
    };
    for (let w = 0; w < Math.min(workers, jobs.length); w++) {
      const child = fork(script, [], { execArgv: process.execArgv, stdio: "inherit" });
      children.push(child);
      child.on("message", (message: WorkerMessage) => {
        if (message.coded !== undefined) {
          const { code, message: text, hint } = message.coded;
          finish(new PlumblineError(code, text, { hint }));
          return;
        }
        if (message.error !== undefined) {
          finish(new Error(`job ${message.k} failed: ${message.error}`));
          return;
        }
        results[message.k] = message.result as ChannelResult[];
        done++;
        progress(done, jobs.length, jobs[message.k]);
        if (done === jobs.length) finish();
        else feed(child);
      });
      child.on("exit", (code) => {
        if (code !== 0 && done < jobs.length) finish(new Error(`worker exited with code ${code}`));
      });
      feed(child);
    }
  });
  return results;
}

/** Runs a whole plan and summarises it per cell, in table order. */
export async function runPlan(plan: CalibrationPlan, progress?: Progress): Promise<CellSummary[]> {
  const jobs = planJobs(plan);
  const results = await runJobs(jobs, plan.workers, progress);
  const byCell = new Map<string, ChannelResult[]>();
  // Gather in (cell, channel index) order whatever order the jobs ran in.
  const flat = results.flat().sort((a, b) => a.index - b.index);
  for (const result of flat) {
    const key = cellKey(result);
    const list = byCell.get(key);
    if (list) list.push(result);
    else byCell.set(key, [result]);
  }
  return planCells(plan).map((cell) => {
    const list = byCell.get(cellKey(cell));
    if (!list) throw new Error(`no results for cell ${cellKey(cell)}`);
    return summarizeCell(list);
  });
}
