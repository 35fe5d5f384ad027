/**
 * @module compare-periods
 * Compare two periods of one channel (DESIGN.md §6): each is analysed as its own window, both with
 * the same seed so draw k of A pairs with draw k of B, and the report gives the change in the
 * headline figures and the posterior probability that B is more balanced than A.
 */
import type { DateRange } from "../domain/date-range.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import type { AnalysisSettings } from "../domain/settings.js";
import { probabilityMoreBalanced } from "../influence/compare-draws.js";
import { deriveSeed } from "../ports/rng.js";
import { analyzeSnapshotDetailed } from "./analyze-snapshot.js";
import { round6 } from "./assemble-report.js";

export interface ComparePeriod {
  readonly range: string;
  readonly report: AnalysisReport;
}

export interface CompareReport {
  readonly version: 1;
  readonly kind: "compare";
  readonly channel: string;
  readonly a: ComparePeriod;
  readonly b: ComparePeriod;
  /** B minus A; null where either period has no figures. */
  readonly change: {
    readonly effectiveVoices: number | null;
    readonly balance: number | null;
    readonly topShare: number | null;
  };
  /** P(balance_B > balance_A | data), from paired draws; null without figures in both. */
  readonly pBMoreBalanced: number | null;
}

function difference(a: number | null | undefined, b: number | null | undefined): number | null {
  return a === null || a === undefined || b === null || b === undefined ? null : round6(b - a);
}

export function comparePeriods(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  ranges: { a: DateRange; b: DateRange },
): CompareReport {
  const seed = settings.seed ?? deriveSeed(snapshot.channel, ranges.b.until);
  const run = (range: DateRange) =>
    analyzeSnapshotDetailed(
      snapshot,
      { ...settings, seed, windowDays: range.days },
      { until: range.until },
    );
  const a = run(ranges.a);
  const b = run(ranges.b);
  const p =
    a.influence && b.influence
      ? probabilityMoreBalanced({
          voicesA: a.influence.effectiveVoicesDraws,
          membersA: a.report.members,
          voicesB: b.influence.effectiveVoicesDraws,
          membersB: b.report.members,
        })
      : null;
  return {
    version: 1,
    kind: "compare",
    channel: snapshot.channel,
    a: { range: ranges.a.label, report: a.report },
    b: { range: ranges.b.label, report: b.report },
    change: {
      effectiveVoices: difference(a.report.effectiveVoices?.value, b.report.effectiveVoices?.value),
      balance: difference(a.report.balance, b.report.balance),
      topShare: difference(a.report.top?.share, b.report.top?.share),
    },
    pBMoreBalanced: p === null ? null : round6(p),
  };
}
