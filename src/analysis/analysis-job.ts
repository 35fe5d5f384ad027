/**
 * @module analysis-job
 * One analysis as plain data (a ledger snapshot, settings and what to compute), so it can cross
 * to a worker thread by structured clone, and `runJob`, the one function that computes it — in a
 * worker or in the calling thread, with the same result byte for byte (DESIGN.md §4.11).
 */
import type { DateRange } from "../domain/date-range.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import type { AnalysisSettings } from "../domain/settings.js";
import type { DrawRangeRunner } from "../influence/analyze-influence.js";
import type { StrengthRowsRunner } from "../influence/attention-prior.js";
import { analyzeSnapshot } from "./analyze-snapshot.js";
import { type CompareReport, comparePeriods } from "./compare-periods.js";
import { type WhatIfReport, whatIfCap } from "./what-if.js";

interface JobBase {
  readonly snapshot: LedgerSnapshot;
  readonly settings: AnalysisSettings;
}

export interface AnalyzeJob extends JobBase {
  readonly kind: "analyze";
  readonly until?: number;
}

export interface CompareJob extends JobBase {
  readonly kind: "compare";
  readonly ranges: { readonly a: DateRange; readonly b: DateRange };
}

export interface WhatIfJob extends JobBase {
  readonly kind: "whatif";
  readonly cap: number;
  readonly until?: number;
}

export type AnalysisJob = AnalyzeJob | CompareJob | WhatIfJob;

/** What each kind of job gives. */
export interface AnalysisResults {
  readonly analyze: AnalysisReport;
  readonly compare: CompareReport;
  readonly whatif: WhatIfReport;
}

export type ResultOf<J extends AnalysisJob> = AnalysisResults[J["kind"]];

/** Progress of one job: posterior draws done of the total it makes. */
export type DrawProgress = (done: number, total: number) => void;

/** The runner of the CLI's tests and the console: every job in the calling thread. */
export const inThreadRunner = {
  run<J extends AnalysisJob>(job: J, options: { onProgress?: DrawProgress } = {}) {
    return new Promise<ResultOf<J>>((resolve) => resolve(runJob(job, options.onProgress)));
  },
};

/**
 * Computes `job` in the calling thread; an analysis may hand its draws (`drawRanges`) and its
 * prior's strength rows (`strengthRows`) to other threads.
 */
export function runJob<J extends AnalysisJob>(
  job: J,
  onProgress?: DrawProgress,
  drawRanges?: DrawRangeRunner,
  strengthRows?: StrengthRowsRunner,
): ResultOf<J> {
  return runAny(job, onProgress, drawRanges, strengthRows) as ResultOf<J>;
}

function runAny(
  job: AnalysisJob,
  onProgress?: DrawProgress,
  drawRanges?: DrawRangeRunner,
  strengthRows?: StrengthRowsRunner,
): ResultOf<AnalysisJob> {
  switch (job.kind) {
    case "analyze": {
      const total = job.settings.samples;
      return analyzeSnapshot(job.snapshot, job.settings, {
        ...(job.until === undefined ? {} : { until: job.until }),
        ...(onProgress ? { onDraw: (done: number) => onProgress(done, total) } : {}),
        ...(drawRanges ? { drawRanges } : {}),
        ...(strengthRows ? { strengthRows } : {}),
      });
    }
    case "compare":
      return comparePeriods(job.snapshot, job.settings, job.ranges);
    case "whatif":
      return whatIfCap(job.snapshot, job.settings, {
        cap: job.cap,
        ...(job.until === undefined ? {} : { until: job.until }),
      });
  }
}
