/**
 * @module compare-formats
 * Compare meeting formats (DESIGN.md §1 format, §6 `compare formats`). Each format period is
 * analysed as its own window (no decay inside it: every signal of the period counts once) with one
 * seed, so draw k of every period pairs with draw k of every other (common random numbers, as
 * compare-periods.ts does). A format's figure is the mean of its periods' figures, draw by draw, so
 * a busy period does not outweigh the others. Periods too short or too sparse for figures are
 * listed and left out. The verdict asks for a margin: B is called more balanced only when the
 * posterior puts at least `VERDICT_CONFIDENCE` on B's balance exceeding A's by `MARGIN` or more
 * (a region of practical equivalence: Kruschke 2018, "Rejecting or accepting parameter values in
 * Bayesian estimation", Advances in Methods and Practices in Psychological Science 1(2);
 * from memory).
 * A before/after split with a trend inside the formats raises the time warning.
 */
import { formatNames, formatPeriods } from "../attention/format-periods.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import { type AnalysisSettings, DAY_MS } from "../domain/settings.js";
import { centralInterval } from "../influence/interval.js";
import { deriveSeed } from "../ports/rng.js";
import { analyzeSnapshotDetailed } from "./analyze-snapshot.js";
import { round6 } from "./assemble-report.js";

/** A period shorter than this many days gives no figures of its own. */
export const MIN_PERIOD_DAYS = 3;
/** The smallest difference in balance the verdict calls a difference (0–1 scale). */
export const MARGIN = 0.05;
/** Posterior mass needed on a difference of at least MARGIN for a clear verdict. */
export const VERDICT_CONFIDENCE = 0.9;
/** Weekly balance drifting by at least this much per week counts as a trend. */
export const TREND_PER_WEEK = 0.02;
/** …and lies at least this many standard errors from zero. */
export const TREND_Z = 2;
const WEEK = 7 * DAY_MS;

export interface FormatPeriodFigures {
  readonly format: string;
  readonly start: string;
  readonly end: string;
  readonly open: boolean;
  readonly members: number;
  readonly signals: number;
  /** Why the period gives no figures; null when it counts. */
  readonly leftOut: "too short" | "too few members or signals" | null;
  readonly effectiveVoices: number | null;
  readonly balance: number | null;
  readonly topShare: number | null;
}

export interface FigureInterval {
  readonly value: number;
  readonly low: number;
  readonly high: number;
}

export interface FormatFigures {
  readonly format: string;
  /** Periods that gave figures. */
  readonly periods: number;
  readonly days: number;
  readonly effectiveVoices: FigureInterval | null;
  readonly balance: FigureInterval | null;
  readonly topShare: FigureInterval | null;
}

export type FormatVerdict = "b more balanced" | "a more balanced" | "no clear difference";

export interface FormatsReport {
  readonly version: 1;
  readonly kind: "formats";
  readonly channel: string;
  readonly until: string;
  readonly interval: number;
  readonly periods: readonly FormatPeriodFigures[];
  readonly formats: readonly FormatFigures[];
  /** The pair compared (A first); null when fewer than two formats have figures. */
  readonly pair: {
    readonly a: string;
    readonly b: string;
    /** P(balance_B > balance_A | data) from paired draws. */
    readonly pBMoreBalanced: number;
    /** P(balance_B − balance_A ≥ MARGIN) and P(balance_A − balance_B ≥ MARGIN). */
    readonly pBClearlyMore: number;
    readonly pAClearlyMore: number;
    readonly balanceChange: FigureInterval;
    readonly verdict: FormatVerdict;
    /** One format only before the other, and the weekly figures drift inside them. */
    readonly confoundedWithTime: boolean;
    /** Within-format trend of weekly balance, per week (least squares, common slope). */
    readonly trendPerWeek: number | null;
  } | null;
}

interface PeriodRun {
  readonly figures: FormatPeriodFigures;
  readonly start: number;
  readonly end: number;
  readonly balanceDraws: Float64Array | null;
  readonly voicesDraws: Float64Array | null;
  readonly topDraws: Float64Array | null;
}

export interface CompareFormatsOptions {
  readonly until: number;
  /** The two formats to compare, A then B; default the two first used (the earlier is A). */
  readonly pair?: readonly [string, string];
}

export function compareFormats(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  options: CompareFormatsOptions,
): FormatsReport {
  const { until } = options;
  const seed = settings.seed ?? deriveSeed(snapshot.channel, until);
  const periods = formatPeriods(snapshot.formats ?? [], until);
  const runs = periods.map((p) =>
    runPeriod(snapshot, { ...settings, seed, halfLifeDays: 0 }, p.format, p.start, p.end, p.open),
  );
  const names = formatNames(periods);
  const formats = names.map((name) => pooled(name, runs, settings.interval));
  const withFigures = formats.filter((f) => f.balance !== null).map((f) => f.format);
  let pairNames: [string, string] | null = null;
  if (options.pair) pairNames = [options.pair[0], options.pair[1]];
  else if (withFigures.length >= 2) pairNames = [withFigures[0], withFigures[1]];
  let pair: FormatsReport["pair"] = null;
  if (pairNames && withFigures.includes(pairNames[0]) && withFigures.includes(pairNames[1])) {
    pair = comparePair(snapshot, { ...settings, seed, halfLifeDays: 0 }, runs, {
      a: pairNames[0],
      b: pairNames[1],
      interval: settings.interval,
    });
  }
  return {
    version: 1,
    kind: "formats",
    channel: snapshot.channel,
    until: new Date(until).toISOString(),
    interval: settings.interval,
    periods: runs.map((r) => r.figures),
    formats,
    pair,
  };
}

function runPeriod(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  format: string,
  start: number,
  end: number,
  open: boolean,
): PeriodRun {
  const days = (end - start) / DAY_MS;
  const base = {
    format,
    start: new Date(start).toISOString(),
    end: new Date(end).toISOString(),
    open,
  };
  if (days < MIN_PERIOD_DAYS) {
    return {
      figures: {
        ...base,
        members: 0,
        signals: 0,
        leftOut: "too short",
        effectiveVoices: null,
        balance: null,
        topShare: null,
      },
      start,
      end,
      balanceDraws: null,
      voicesDraws: null,
      topDraws: null,
    };
  }
  const outcome = analyzeSnapshotDetailed(
    snapshot,
    { ...settings, windowDays: days },
    { until: end },
  );
  const { report, influence } = outcome;
  const figures: FormatPeriodFigures = {
    ...base,
    members: report.members,
    signals: report.signals,
    leftOut: influence === null ? "too few members or signals" : null,
    effectiveVoices: report.effectiveVoices?.value ?? null,
    balance: report.balance,
    topShare: report.top?.share ?? null,
  };
  if (influence === null || report.members === 0) {
    return { figures, start, end, balanceDraws: null, voicesDraws: null, topDraws: null };
  }
  const k = influence.effectiveVoicesDraws.length;
  const voicesDraws = Float64Array.from(influence.effectiveVoicesDraws);
  const balanceDraws = new Float64Array(k);
  const topDraws = new Float64Array(k);
  // The largest share is the share of the member largest in the point estimate, drawn from that
  // member's draws (as a check's top figure is). The largest entry of each draw would be biased
  // upward: with many members of similar shares some member is high in every draw by chance.
  const topIndex = outcome.input.counts.members.indexOf(report.top?.member ?? "");
  for (let i = 0; i < k; i++) {
    balanceDraws[i] = voicesDraws[i] / report.members;
    topDraws[i] = influence.draws[i][topIndex];
  }
  return { figures, start, end, balanceDraws, voicesDraws, topDraws };
}

/** The mean over the format's counted periods, draw by draw. */
function meanDraws(runs: readonly PeriodRun[], pick: (r: PeriodRun) => Float64Array | null) {
  const lists = runs.map(pick).filter((d): d is Float64Array => d !== null);
  if (lists.length === 0) return null;
  const k = Math.min(...lists.map((d) => d.length));
  const out = new Float64Array(k);
  for (const d of lists) for (let i = 0; i < k; i++) out[i] += d[i] / lists.length;
  return out;
}

function meanOf(values: readonly number[]): number {
  return values.reduce((a, b) => a + b, 0) / values.length;
}

function intervalOf(draws: Float64Array | null, point: number, mass: number): FigureInterval {
  if (draws === null || draws.length === 0)
    return { value: round6(point), low: round6(point), high: round6(point) };
  const { low, high } = centralInterval(draws, mass, point);
  return { value: round6(point), low: round6(low), high: round6(high) };
}

function pooled(format: string, runs: readonly PeriodRun[], mass: number): FormatFigures {
  const mine = runs.filter((r) => r.figures.format === format && r.figures.leftOut === null);
  const days = runs
    .filter((r) => r.figures.format === format)
    .reduce((sum, r) => sum + (r.end - r.start) / DAY_MS, 0);
  if (mine.length === 0) {
    return {
      format,
      periods: 0,
      days: round6(days),
      effectiveVoices: null,
      balance: null,
      topShare: null,
    };
  }
  const point = (pick: (f: FormatPeriodFigures) => number | null) =>
    meanOf(mine.map((r) => pick(r.figures) ?? 0));
  return {
    format,
    periods: mine.length,
    days: round6(days),
    effectiveVoices: intervalOf(
      meanDraws(mine, (r) => r.voicesDraws),
      point((f) => f.effectiveVoices),
      mass,
    ),
    balance: intervalOf(
      meanDraws(mine, (r) => r.balanceDraws),
      point((f) => f.balance),
      mass,
    ),
    topShare: intervalOf(
      meanDraws(mine, (r) => r.topDraws),
      point((f) => f.topShare),
      mass,
    ),
  };
}

function comparePair(
  snapshot: LedgerSnapshot,
  weekSettings: AnalysisSettings,
  runs: readonly PeriodRun[],
  args: { a: string; b: string; interval: number },
): NonNullable<FormatsReport["pair"]> {
  const counted = (name: string) =>
    runs.filter((r) => r.figures.format === name && r.figures.leftOut === null);
  const a = counted(args.a);
  const b = counted(args.b);
  const da = meanDraws(a, (r) => r.balanceDraws);
  const db = meanDraws(b, (r) => r.balanceDraws);
  const pointA = meanOf(a.map((r) => r.figures.balance ?? 0));
  const pointB = meanOf(b.map((r) => r.figures.balance ?? 0));
  let wins = 0;
  let bClear = 0;
  let aClear = 0;
  let diff = new Float64Array(0);
  if (da !== null && db !== null) {
    const k = Math.min(da.length, db.length);
    diff = new Float64Array(k);
    for (let i = 0; i < k; i++) {
      const d = db[i] - da[i];
      diff[i] = d;
      if (d > 0) wins++;
      else if (d === 0) wins += 0.5;
      if (d >= MARGIN) bClear++;
      if (-d >= MARGIN) aClear++;
    }
  }
  const k = diff.length;
  const pB = k === 0 ? (pointB > pointA ? 1 : 0) : wins / k;
  const pBClearlyMore = k === 0 ? (pointB - pointA >= MARGIN ? 1 : 0) : bClear / k;
  const pAClearlyMore = k === 0 ? (pointA - pointB >= MARGIN ? 1 : 0) : aClear / k;
  const verdict: FormatVerdict =
    pBClearlyMore >= VERDICT_CONFIDENCE
      ? "b more balanced"
      : pAClearlyMore >= VERDICT_CONFIDENCE
        ? "a more balanced"
        : "no clear difference";
  const trend = withinFormatTrend(snapshot, weekSettings, [...a, ...b]);
  const trending =
    trend !== null &&
    Math.abs(trend.slope) >= TREND_PER_WEEK &&
    Math.abs(trend.slope) >= TREND_Z * trend.se;
  const aEnd = Math.max(...a.map((r) => r.end));
  const bEnd = Math.max(...b.map((r) => r.end));
  const aStart = Math.min(...a.map((r) => r.start));
  const bStart = Math.min(...b.map((r) => r.start));
  const split = aEnd <= bStart || bEnd <= aStart;
  return {
    a: args.a,
    b: args.b,
    pBMoreBalanced: round6(pB),
    pBClearlyMore: round6(pBClearlyMore),
    pAClearlyMore: round6(pAClearlyMore),
    balanceChange: intervalOf(k === 0 ? null : diff, pointB - pointA, args.interval),
    verdict,
    confoundedWithTime: split && trending,
    trendPerWeek: trend === null ? null : round6(trend.slope),
  };
}

/**
 * The common within-format slope of weekly balance (least squares on deviations from each
 * format's own means, the within-group estimator of analysis of covariance; common practice) and
 * its standard error from each week's posterior spread (weighted least squares with known
 * variances: Var(b) = Σ(t−t̄)²σ² / (Σ(t−t̄)²)²). Each counted period is cut into whole weeks from
 * its start; weeks without figures are skipped. Null when no format has two weeks with figures.
 */
export function withinFormatTrend(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  runs: readonly PeriodRun[],
): { slope: number; se: number } | null {
  const byFormat = new Map<string, { t: number; y: number; v: number }[]>();
  for (const run of runs) {
    const list = byFormat.get(run.figures.format) ?? [];
    for (let s = run.start; s + WEEK <= run.end + 1; s += WEEK) {
      const end = Math.min(run.end, s + WEEK);
      const { report, influence } = analyzeSnapshotDetailed(
        snapshot,
        { ...settings, windowDays: (end - s) / DAY_MS },
        { until: end },
      );
      if (report.balance === null || influence === null) continue;
      const draws = Array.from(influence.effectiveVoicesDraws, (x) => x / report.members);
      const m = draws.length > 0 ? meanOf(draws) : report.balance;
      const v =
        draws.length > 1 ? draws.reduce((a, x) => a + (x - m) ** 2, 0) / (draws.length - 1) : 0;
      list.push({ t: s / WEEK, y: report.balance, v });
    }
    byFormat.set(run.figures.format, list);
  }
  let sxy = 0;
  let sxx = 0;
  let sxxv = 0;
  for (const points of byFormat.values()) {
    if (points.length < 2) continue;
    const mt = meanOf(points.map((p) => p.t));
    const my = meanOf(points.map((p) => p.y));
    for (const p of points) {
      sxy += (p.t - mt) * (p.y - my);
      sxx += (p.t - mt) ** 2;
      sxxv += (p.t - mt) ** 2 * p.v;
    }
  }
  if (sxx === 0) return null;
  return { slope: sxy / sxx, se: Math.sqrt(sxxv) / sxx };
}
