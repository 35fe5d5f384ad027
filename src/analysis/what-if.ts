/**
 * @module what-if
 * `whatif cap` (DESIGN.md §6): recompute the channel as if no member gave any one other member
 * more than `cap` of their attention. Baseline and capped runs share their draws (same seed), so
 * the change is read pairwise.
 */
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import type { AnalysisSettings } from "../domain/settings.js";
import { capAttentionRows } from "../influence/cap-attention.js";
import { analyzeSnapshotDetailed } from "./analyze-snapshot.js";
import { round6 } from "./assemble-report.js";

export interface WhatIfReport {
  readonly version: 1;
  readonly kind: "whatif";
  readonly channel: string;
  readonly cap: number;
  readonly before: AnalysisReport;
  readonly after: AnalysisReport;
  readonly change: { readonly effectiveVoices: number | null; readonly topShare: number | null };
}

export function whatIfCap(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: { cap: number; until?: number },
): WhatIfReport {
  const until = options.until === undefined ? {} : { until: options.until };
  const before = analyzeSnapshotDetailed(snapshot, settings, until);
  const after = analyzeSnapshotDetailed(snapshot, settings, {
    ...until,
    transform: (rows) => capAttentionRows(rows, options.cap),
  });
  const ev = (r: AnalysisReport) => r.effectiveVoices?.value ?? null;
  const top = (r: AnalysisReport) => r.top?.share ?? null;
  const diff = (a: number | null, b: number | null) =>
    a === null || b === null ? null : round6(b - a);
  return {
    version: 1,
    kind: "whatif",
    channel: snapshot.channel,
    cap: options.cap,
    before: before.report,
    after: after.report,
    change: {
      effectiveVoices: diff(ev(before.report), ev(after.report)),
      topShare: diff(top(before.report), top(after.report)),
    },
  };
}
