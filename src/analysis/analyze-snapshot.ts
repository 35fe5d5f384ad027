/**
 * @module analyze-snapshot
 * Builds the `AnalysisReport` (DESIGN.md §5) from a channel's ledger snapshot: the one computation
 * behind the CLI, the digests, checks and notes. Same snapshot, settings and seed give the same
 * report, byte for byte, once serialised.
 */

import { buildAttentionInput } from "../attention/build-attention-input.js";
import type { AttentionInput } from "../domain/counts.js";
import { PlumblineError } from "../domain/errors.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import { type AnalysisSettings, resolveThreshold } from "../domain/settings.js";
import {
  analyzeInfluence,
  type DrawRangeRunner,
  type InfluenceResult,
} from "../influence/analyze-influence.js";
import type { StrengthRowsRunner } from "../influence/attention-prior.js";
import type { AttentionRows } from "../influence/attention-rows.js";
import { deriveSeed } from "../ports/rng.js";
import {
  assembleReport,
  insufficientReport,
  noUniqueSharesReport,
  reportFrame,
} from "./assemble-report.js";

export interface AnalyzeOptions {
  /** End of the window (epoch ms); defaults to the snapshot's latest event. */
  readonly until?: number;
  /** Row transform applied before solving (the what-if cap). */
  readonly transform?: (rows: AttentionRows) => AttentionRows;
  /** Called after each posterior draw with the number done so far (progress lines). */
  readonly onDraw?: (done: number) => void;
  /** Where the posterior draws run (the CLI: the worker pool's threads); default here. */
  readonly drawRanges?: DrawRangeRunner;
  /** Where the prior's strength posterior of the rows runs (the CLI: shared with the pool). */
  readonly strengthRows?: StrengthRowsRunner;
}

/** The report together with the draws behind it, for compare and what-if. */
export interface AnalysisOutcome {
  readonly report: AnalysisReport;
  readonly input: AttentionInput;
  readonly influence: InfluenceResult | null;
}

export function analyzeSnapshot(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: AnalyzeOptions = {},
): AnalysisReport {
  return analyzeSnapshotDetailed(snapshot, settings, options).report;
}

export function analyzeSnapshotDetailed(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: AnalyzeOptions = {},
): AnalysisOutcome {
  const until = options.until ?? snapshot.lastEventAt;
  if (until === null || until === undefined) {
    throw new PlumblineError(
      "ARG_MISSING",
      `channel "${snapshot.channel}" has no events to analyse`,
      {
        hint: "check the channel id, or give --until",
      },
    );
  }
  const seed = settings.seed ?? deriveSeed(snapshot.channel, until);
  const input = buildAttentionInput(snapshot, { ...settings, until }, { seed });
  const n = input.counts.members.length;
  const threshold = resolveThreshold(settings.threshold, n);
  const frame = reportFrame({ channel: snapshot.channel, until, settings, seed, threshold, input });
  const minMembers = Math.max(3, settings.minMembers);
  if (n < minMembers || input.signals < settings.minSignals) {
    const needed = {
      members: Math.max(0, minMembers - n),
      signals: Math.max(0, settings.minSignals - input.signals),
    };
    return { report: insufficientReport(frame, needed), input, influence: null };
  }
  if (settings.background === 0 && input.closedGroups.length > 1) {
    return {
      report: noUniqueSharesReport(frame, input.closedGroups.length),
      input,
      influence: null,
    };
  }
  const influence = analyzeInfluence(input.counts, {
    background: settings.background,
    selfWeight: settings.selfWeight,
    samples: settings.samples,
    seed,
    ...(input.priorGroups ? { groupOf: input.priorGroups } : {}),
    ...(options.transform ? { transform: options.transform } : {}),
    ...(options.onDraw ? { onDraw: options.onDraw } : {}),
    ...(options.drawRanges ? { drawRanges: options.drawRanges } : {}),
    ...(options.strengthRows ? { strengthRows: options.strengthRows } : {}),
  });
  return { report: assembleReport(frame, input, influence), input, influence };
}
