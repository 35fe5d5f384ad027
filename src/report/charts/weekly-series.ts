/**
 * @module weekly-series
 * The channel's history for the trend charts: one full analysis per week, each ending at a week's
 * end (`until`, `until` − 7 days, …) over the retained history, so every point is exactly the
 * figure a digest at that time would have shown (the one computation of DESIGN.md §4).
 */

import { analyzeSnapshot } from "../../analysis/analyze-snapshot.js";
import type { LedgerSnapshot } from "../../domain/ledger.js";
import type { Interval } from "../../domain/report.js";
import { type AnalysisSettings, DAY_MS } from "../../domain/settings.js";

export interface WeeklyPoint {
  /** End of the week's window (epoch ms). */
  readonly until: number;
  readonly members: number;
  /** Null when that week had too little data or no single pooled view. */
  readonly effectiveVoices: Interval | null;
  readonly top: { readonly share: number; readonly low: number; readonly high: number } | null;
  readonly line: number | null;
}

/** Default number of weeks: the 91-day ledger retention (DESIGN.md §7) is 13 weeks. */
export const DEFAULT_HISTORY_WEEKS = 13;

/**
 * Week ends from the oldest that still follows `first` up to `until`, ascending, 7 days apart,
 * at most `maxWeeks` of them; `until` is always the last.
 */
export function weekEnds(args: { first: number; until: number; maxWeeks: number }): number[] {
  const ends: number[] = [];
  for (let k = 0; k < Math.max(1, args.maxWeeks); k++) {
    const end = args.until - k * 7 * DAY_MS;
    if (k > 0 && end < args.first) break;
    ends.push(end);
  }
  return ends.reverse();
}

/** One report per week end; the figures each week would have had. */
export function weeklySeries(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: { until: number; maxWeeks?: number },
): WeeklyPoint[] {
  const first = snapshot.messages.length > 0 ? snapshot.messages[0].at : options.until;
  const ends = weekEnds({
    first,
    until: options.until,
    maxWeeks: options.maxWeeks ?? DEFAULT_HISTORY_WEEKS,
  });
  return ends.map((until): WeeklyPoint => {
    const report = analyzeSnapshot(snapshot, settings, { until });
    return {
      until,
      members: report.members,
      effectiveVoices: report.effectiveVoices,
      top: report.top
        ? { share: report.top.share, low: report.top.low, high: report.top.high }
        : null,
      line: report.line?.threshold ?? null,
    };
  });
}
