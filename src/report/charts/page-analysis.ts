/**
 * @module page-analysis
 * Everything a report page shows, computed once from a channel snapshot: the report and the
 * attention counts behind it (one `analyzeSnapshotDetailed` run), the weekly history, an
 * optional compare of two periods, and the meeting formats compared (when the channel has format
 * periods). The caller picks the naming policy and renders.
 */

import { analyzeSnapshotDetailed } from "../../analysis/analyze-snapshot.js";
import { compareFormats, type FormatsReport } from "../../analysis/compare-formats.js";
import { type CompareReport, comparePeriods } from "../../analysis/compare-periods.js";
import type { AttentionInput } from "../../domain/counts.js";
import type { DateRange } from "../../domain/date-range.js";
import type { LedgerSnapshot } from "../../domain/ledger.js";
import type { AnalysisReport } from "../../domain/report.js";
import type { AnalysisSettings } from "../../domain/settings.js";
import { type WeeklyPoint, weeklySeries } from "./weekly-series.js";

export interface PageAnalysis {
  readonly report: AnalysisReport;
  readonly attention: AttentionInput;
  readonly history: readonly WeeklyPoint[];
  readonly compare: CompareReport | null;
  /** The formats compared up to the report's end; null when the channel has no format period. */
  readonly formats: FormatsReport | null;
}

/** The report at `until` (default: the latest event), its history and an optional compare. */
export function analyzeForPage(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: { until?: number; ranges?: { a: DateRange; b: DateRange }; historyWeeks?: number } = {},
): PageAnalysis {
  const outcome = analyzeSnapshotDetailed(
    snapshot,
    settings,
    options.until === undefined ? {} : { until: options.until },
  );
  const until = Date.parse(outcome.report.window.until);
  return {
    report: outcome.report,
    attention: outcome.input,
    history: weeklySeries(snapshot, settings, {
      until,
      ...(options.historyWeeks === undefined ? {} : { maxWeeks: options.historyWeeks }),
    }),
    compare: options.ranges ? comparePeriods(snapshot, settings, options.ranges) : null,
    formats: (snapshot.formats ?? []).some((f) => f.at <= until)
      ? compareFormats(snapshot, settings, { until })
      : null,
  };
}
