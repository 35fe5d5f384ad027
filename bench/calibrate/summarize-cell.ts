/**
 * @module summarize-cell
 * Per cell (regime, decay, n, N/n): the measured rates with their counts, and the verdict against
 * DESIGN.md §4's calibration targets. Floor, in every cell: the leader's true share inside its
 * interval ≥ 85%; false notes (true top ≤ line − 0.05) < 5%; notes for a true top ≥ line + 0.10
 * ≥ 95% once N/n ≥ 5; all-member coverage ≥ 80%; |bias of the leader's share| ≤ 2 points once
 * N/n ≥ 15. Goal: all-member coverage in [85%, 95%]. A rate with no eligible channel is not judged.
 * Verdicts compare the measured value itself with the target; the counts (and the binomial
 * standard error printed beside them) say how far that value can be trusted.
 */
import type { ChannelResult, Decay } from "./measure-channel.js";
import type { Regime } from "./true-matrix.js";

/** Leeway when comparing a computed true share with a designed boundary (line − 0.05 etc.). */
const BOUNDARY_EPS = 1e-9;

export interface Rate {
  readonly hits: number;
  readonly total: number;
}

export interface CellSummary {
  readonly regime: Regime;
  readonly decay: Decay;
  readonly n: number;
  readonly ratio: number;
  readonly channels: number;
  /** Channels whose report had no figures (counted as misses everywhere). */
  readonly insufficient: number;
  readonly coverage: Rate;
  readonly below: number;
  readonly above: number;
  readonly leaderInside: Rate;
  readonly leaderBelow: number;
  readonly leaderAbove: number;
  /** Mean reported leader share minus the truth, in points, and its standard error. */
  readonly bias: { readonly points: number; readonly se: number } | null;
  /** Mean point at the expected counts minus the truth, in points (the prior's shrinkage). */
  readonly shrinkage: number | null;
  readonly falseNotes: Rate;
  readonly notes: Rate;
  readonly floor: { readonly met: boolean; readonly missed: readonly string[] };
  readonly goal: boolean;
}

export const FLOOR = Object.freeze({
  leaderInside: 0.85,
  falseNotes: 0.05,
  notes: 0.95,
  notesFromRatio: 5,
  coverage: 0.8,
  biasPoints: 2,
  biasFromRatio: 15,
});

export const GOAL = Object.freeze({ low: 0.85, high: 0.95 });

export function rateOf(rate: Rate): number | null {
  return rate.total > 0 ? rate.hits / rate.total : null;
}

/** Binomial standard error of a rate, in points. */
export function standardErrorPoints(rate: Rate): number | null {
  const p = rateOf(rate);
  return p === null ? null : 100 * Math.sqrt((p * (1 - p)) / rate.total);
}

/** Two-sided normal quantile of a 95% interval (z for 0.975). */
export const Z95 = 1.959963984540054;

/**
 * Wilson's score interval of a binomial rate (Wilson 1927, "Probable inference, the law of
 * succession, and statistical inference", JASA 22:209–212; recommended over the Wald interval
 * for small counts and rates near 0 or 1 by Newcombe 1998, "Two-sided confidence intervals for the
 * single proportion: comparison of seven methods", Statistics in Medicine 17:857–872): the p with
 * |p̂ − p| ≤ z·√(p(1−p)/t), i.e. centre (p̂ + z²/2t)/(1 + z²/t) and half-width
 * z/(1 + z²/t)·√(p̂(1−p̂)/t + z²/4t²). Null for an empty rate.
 */
export function wilsonInterval(
  rate: Rate,
  z: number = Z95,
): { readonly low: number; readonly high: number } | null {
  const t = rate.total;
  if (!(t > 0)) return null;
  const p = rate.hits / t;
  const z2 = z * z;
  const denominator = 1 + z2 / t;
  const centre = (p + z2 / (2 * t)) / denominator;
  const half = (z / denominator) * Math.sqrt((p * (1 - p)) / t + z2 / (4 * t * t));
  return { low: Math.max(0, centre - half), high: Math.min(1, centre + half) };
}

/** The leader rate of the leader cells of one size and decay setting, pooled over N/n and regimes. */
export interface PooledLeader {
  readonly n: number;
  readonly decay: Decay;
  readonly cells: number;
  readonly inside: Rate;
  readonly below: number;
  readonly above: number;
}

/**
 * Leader channels pooled per size n and decay setting, in table order. Decay settings are kept
 * apart because both analyse the same simulated channels: pooled together, each channel would be
 * counted twice and the binomial interval would be too narrow. Sizes without leader cells are
 * left out.
 */
export function pooledLeaderBySize(summaries: readonly CellSummary[]): PooledLeader[] {
  const pooled = new Map<string, PooledLeader & { inside: { hits: number; total: number } }>();
  for (const s of summaries) {
    if (s.leaderInside.total === 0) continue;
    const key = `${s.n}|${s.decay}`;
    const entry = pooled.get(key) ?? {
      n: s.n,
      decay: s.decay,
      cells: 0,
      inside: { hits: 0, total: 0 },
      below: 0,
      above: 0,
    };
    pooled.set(key, {
      ...entry,
      cells: entry.cells + 1,
      inside: {
        hits: entry.inside.hits + s.leaderInside.hits,
        total: entry.inside.total + s.leaderInside.total,
      },
      below: entry.below + s.leaderBelow,
      above: entry.above + s.leaderAbove,
    });
  }
  const decayOrder = (d: Decay) => (d === "decay" ? 0 : 1);
  return [...pooled.values()].sort(
    (a, b) => a.n - b.n || decayOrder(a.decay) - decayOrder(b.decay),
  );
}

/** Summarises the results of one cell (all of the same regime, decay, n and ratio). */
export function summarizeCell(results: readonly ChannelResult[]): CellSummary {
  if (results.length === 0) throw new Error("a cell needs at least one channel");
  const { regime, decay, n, ratio } = results[0];
  let covered = 0;
  let intervals = 0;
  let below = 0;
  let above = 0;
  let insufficient = 0;
  const leaderInside = { hits: 0, total: 0 };
  let leaderBelow = 0;
  let leaderAbove = 0;
  const errors: number[] = [];
  const shrink: number[] = [];
  const falseNotes = { hits: 0, total: 0 };
  const notes = { hits: 0, total: 0 };
  for (const r of results) {
    if (!r.sufficient) {
      insufficient++;
      intervals += r.n; // every member-interval of a channel with no figures is a miss
    }
    covered += r.covered;
    intervals += r.intervals;
    below += r.below;
    above += r.above;
    if (r.leader !== null || (regime.startsWith("leader") && !r.sufficient)) {
      leaderInside.total++;
      if (r.leader !== null) {
        if (r.leader.high < r.leader.truth) leaderBelow++;
        else if (r.leader.low > r.leader.truth) leaderAbove++;
        else leaderInside.hits++;
        errors.push(100 * (r.leader.share - r.leader.truth));
        if (r.leader.expected !== null) shrink.push(100 * (r.leader.expected - r.leader.truth));
      }
    }
    if (r.trueTop <= r.line - 0.05 + BOUNDARY_EPS) {
      falseNotes.total++;
      if (r.crossed) falseNotes.hits++;
    }
    if (r.trueTop >= r.line + 0.1 - BOUNDARY_EPS) {
      notes.total++;
      if (r.crossed) notes.hits++;
    }
  }
  const mean = (xs: readonly number[]) => xs.reduce((a, b) => a + b, 0) / xs.length;
  let bias: CellSummary["bias"] = null;
  if (errors.length > 0) {
    const m = mean(errors);
    const variance =
      errors.length > 1
        ? errors.reduce((a, e) => a + (e - m) ** 2, 0) / (errors.length - 1)
        : Number.NaN;
    bias = { points: m, se: Math.sqrt(variance / errors.length) };
  }
  const coverage = { hits: covered, total: intervals };
  const missed: string[] = [];
  const check = (name: string, ok: boolean) => {
    if (!ok) missed.push(name);
  };
  const cov = rateOf(coverage);
  if (cov !== null) check("coverage", cov >= FLOOR.coverage);
  const lead = rateOf(leaderInside);
  if (lead !== null) check("leader", lead >= FLOOR.leaderInside);
  const fal = rateOf(falseNotes);
  if (fal !== null) check("false notes", fal < FLOOR.falseNotes);
  const not = rateOf(notes);
  if (not !== null && ratio >= FLOOR.notesFromRatio) check("notes", not >= FLOOR.notes);
  if (bias !== null && ratio >= FLOOR.biasFromRatio) {
    check("bias", Math.abs(bias.points) <= FLOOR.biasPoints);
  }
  return {
    regime,
    decay,
    n,
    ratio,
    channels: results.length,
    insufficient,
    coverage,
    below,
    above,
    leaderInside,
    leaderBelow,
    leaderAbove,
    bias,
    shrinkage: shrink.length > 0 ? mean(shrink) : null,
    falseNotes,
    notes,
    floor: { met: missed.length === 0, missed },
    goal: cov !== null && cov >= GOAL.low && cov <= GOAL.high,
  };
}
