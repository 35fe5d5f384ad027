/**
 * @module analysis-runner
 * Where analyses run, as the core sees it: the commands and the scheduler hand over a job and
 * await its result; the composition root decides whether that is the calling thread (CLI, tests),
 * a worker pool, or a bounded queue in front of one (`serve`, DESIGN.md §8).
 */
import type { AnalysisJob, DrawProgress, ResultOf } from "../analysis/analysis-job.js";
import type { LedgerSnapshot } from "../domain/ledger.js";

export interface RunOptions {
  /** Draws done of the total, as they happen. */
  readonly onProgress?: DrawProgress;
  /**
   * Compute for exactly this job's `until` (digests, notes at their slot). Without it a queue may
   * answer with the result of the same channel and settings computed moments earlier, as long as
   * no new signal arrived since (checks).
   */
  readonly exactUntil?: boolean;
}

export interface AnalysisRunner {
  run<J extends AnalysisJob>(job: J, options?: RunOptions): Promise<ResultOf<J>>;
  /** New signals arrived in `channel` (a runner that caches drops that channel's results). */
  invalidate?(channel: string): void;
  /**
   * As `run` for "now" (a check), but loads the snapshot only when no analysis of the same
   * channel and settings is in flight or cached: three askers at once load it once and share
   * both the snapshot and the result.
   */
  runShared?<J extends AnalysisJob>(
    job: Omit<J, "snapshot">,
    channel: string,
    load: () => Promise<LedgerSnapshot>,
  ): Promise<{ readonly result: ResultOf<J>; readonly snapshot: LedgerSnapshot }>;
}
