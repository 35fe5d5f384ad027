/**
 * The report's intervals and probabilities, read from the product path (`analyzeSnapshot`'s
 * report) and checked against values computed here from the posterior draws behind that report,
 * with jStat's quantile function (jstat 1.9, `jStat.quantiles` with alphap = betap = 1, which is
 * Hyndman & Fan 1996 definition 7, "Sample quantiles in statistical packages", The American
 * Statistician 50(4):361–365) rather than the project's own quantile code. The levels are written
 * here from DESIGN.md §4 (a central 90% interval, so the 5% and 95% quantiles; the line
 * max(0.30, 2/n); the note at P ≥ 0.8), not read from the settings, so a changed default fails.
 * Effective voices per draw (1/Σ s², Kish 1965) and a group's share per draw (the sum of its
 * members' shares) are recomputed here from the member draws, not taken from the code's arrays.
 * Whether the draws themselves are wide enough is the calibration slice's job
 * (test/calibration/calibration-slice.test.ts); this file checks that the report summarises them
 * as promised.
 */
import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { analyzeSnapshotDetailed } from "../../src/analysis/analyze-snapshot.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { type AnalysisSettings, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { mentionEvents, snapshotOf, T0 } from "../report/log-builders.js";

const jStat = createRequire(import.meta.url)("jstat") as {
  quantiles(arr: number[], p: number[], alphap: number, betap: number): number[];
  percentileOfScore(arr: number[], score: number, kind: "strict" | "weak"): number;
};

/** Hyndman & Fan type 7 through jStat (alphap = betap = 1). */
function type7(sample: readonly number[], p: number): number {
  return jStat.quantiles([...sample], [p], 1, 1)[0];
}

/** Share of the sample at or above `line`: 1 − (fraction strictly below), via jStat. */
function atOrAbove(sample: readonly number[], line: number): number {
  return 1 - jStat.percentileOfScore([...sample], line, "strict");
}

// A rounded report value (6 decimals) against an unrounded one: within 5e-7 plus float slack.
const ROUNDED = 6e-7;

const LOW = 0.05; // DESIGN.md §4: `interval` 0.90 → the central 90% range
const HIGH = 0.95;

/** Ten members: "a" draws most attention, two labelled groups of five. */
function leaderChannel(): ChatEvent[] {
  const members = ["a", "b", "c", "d", "e", "f", "g", "h", "i", "j"];
  const pairs: [string, string, number][] = [];
  members.forEach((m, k) => {
    if (m !== "a") pairs.push([m, "a", 2 + (k % 3)]);
    const next = members[(k + 1) % members.length];
    const other = members[(k + 4) % members.length];
    pairs.push([m, next, 2]);
    pairs.push([m, other, 1 + (k % 2)]);
  });
  const events = mentionEvents(pairs);
  members.forEach((m, k) => {
    events.push({
      type: "group",
      at: T0 - 1000 + k,
      channel: "c1",
      member: m,
      group: k < 5 ? "north" : "south",
    });
  });
  return events.sort((x, y) => x.at - y.at);
}

/** Two cliques of five with a thin bridge, no labels: the report has clusters. */
function twoCliques(): ChatEvent[] {
  const left = ["a", "b", "c", "d", "e"];
  const right = ["f", "g", "h", "i", "j"];
  const pairs: [string, string, number][] = [];
  for (const clique of [left, right]) {
    for (const u of clique) for (const v of clique) if (u !== v) pairs.push([u, v, 3]);
  }
  pairs.push(["a", "f", 1], ["f", "a", 1]);
  return mentionEvents(pairs);
}

function analyse(events: readonly ChatEvent[], settings: Partial<AnalysisSettings> = {}) {
  const outcome = analyzeSnapshotDetailed(snapshotOf(events), {
    ...DEFAULT_SETTINGS,
    seed: 20261203,
    ...settings,
  });
  const { report, influence, input } = outcome;
  if (influence === null) throw new Error(`no figures: ${report.status}`);
  const members = input.counts.members;
  const draws = influence.draws.map((d) => Array.from(d));
  const column = (i: number) => draws.map((d) => d[i]);
  return { report, members, draws, column };
}

describe("the report's intervals are the draws' quantiles (jStat, Hyndman & Fan type 7)", () => {
  it("member intervals, top, pAbove and the line at the default 90% and line max(0.30, 2/n)", () => {
    const { report, members, draws, column } = analyse(leaderChannel());
    expect(report.status).toBe("ok");
    expect(draws).toHaveLength(400); // DESIGN.md §4: samples K = 400
    expect(report.settings.interval).toBe(0.9);
    const n = members.length;
    expect(n).toBe(10);
    const line = Math.max(0.3, 2 / n);
    expect(report.line?.threshold).toBeCloseTo(line, 6);
    const entries = report.influence ?? [];
    expect(entries).toHaveLength(n);
    let widest = 0;
    for (const entry of entries) {
      const sample = column(members.indexOf(entry.member));
      expect(Math.abs(entry.low - type7(sample, LOW))).toBeLessThan(ROUNDED);
      expect(Math.abs(entry.high - type7(sample, HIGH))).toBeLessThan(ROUNDED);
      expect(Math.abs(entry.pAbove - atOrAbove(sample, line))).toBeLessThan(ROUNDED);
      widest = Math.max(widest, entry.high - entry.low);
    }
    // Not a degenerate check: the intervals have width, and the leader's P straddles neither end.
    expect(widest).toBeGreaterThan(0.02);
    const top = report.top;
    expect(top?.member).toBe("a");
    const topSample = column(members.indexOf("a"));
    expect(Math.abs((top?.low ?? 0) - type7(topSample, LOW))).toBeLessThan(ROUNDED);
    expect(Math.abs((top?.high ?? 0) - type7(topSample, HIGH))).toBeLessThan(ROUNDED);
    const pTop = atOrAbove(topSample, line);
    expect(pTop).toBeGreaterThan(0.02);
    expect(pTop).toBeLessThan(0.98);
    expect(Math.abs((top?.pAbove ?? 0) - pTop)).toBeLessThan(ROUNDED);
    // The line's probability is the largest P(share ≥ line) over members; crossed at ≥ 0.8.
    const best = Math.max(...members.map((_, i) => atOrAbove(column(i), line)));
    expect(Math.abs((report.line?.probability ?? 0) - best)).toBeLessThan(ROUNDED);
    expect(report.line?.crossed).toBe(best >= 0.8);
  });

  it("effective voices: the 5%/95% quantiles of 1/Σ s² over the draws", () => {
    const { report, draws } = analyse(leaderChannel());
    const voices = draws.map((d) => 1 / d.reduce((acc, s) => acc + s * s, 0));
    const ev = report.effectiveVoices;
    expect(ev).not.toBeNull();
    expect(Math.abs((ev?.low ?? 0) - type7(voices, LOW))).toBeLessThan(ROUNDED);
    expect(Math.abs((ev?.high ?? 0) - type7(voices, HIGH))).toBeLessThan(ROUNDED);
    expect((ev?.high ?? 0) - (ev?.low ?? 0)).toBeGreaterThan(0.1);
  });

  it("labelled groups: the quantiles of the per-draw sum of the group's shares", () => {
    const { report, members, draws } = analyse(leaderChannel());
    const groups = report.groups ?? [];
    expect(groups.map((g) => g.group).sort()).toEqual(["north", "south"]);
    const inGroup: Record<string, string[]> = {
      north: ["a", "b", "c", "d", "e"],
      south: ["f", "g", "h", "i", "j"],
    };
    for (const g of groups) {
      const idx = inGroup[g.group].map((m) => members.indexOf(m));
      const sums = draws.map((d) => idx.reduce((acc, i) => acc + d[i], 0));
      expect(g.members).toBe(5);
      expect(Math.abs(g.low - type7(sums, LOW))).toBeLessThan(ROUNDED);
      expect(Math.abs(g.high - type7(sums, HIGH))).toBeLessThan(ROUNDED);
      expect(g.high - g.low).toBeGreaterThan(0.01);
    }
  });

  it("clusters (no labels): the same quantiles of each cluster's per-draw sum", () => {
    const { report, members, draws } = analyse(twoCliques());
    expect(report.groups).toBeNull();
    const clusters = report.clusters?.groups ?? [];
    expect(clusters).toHaveLength(2);
    const left = ["a", "b", "c", "d", "e"].map((m) => members.indexOf(m));
    const right = ["f", "g", "h", "i", "j"].map((m) => members.indexOf(m));
    const intervals = [left, right].map((idx) => {
      const sums = draws.map((d) => idx.reduce((acc, i) => acc + d[i], 0));
      return [type7(sums, LOW), type7(sums, HIGH)];
    });
    for (const c of clusters) {
      expect(c.members).toBe(5);
      const match = intervals.some(
        ([lo, hi]) => Math.abs(c.low - lo) < ROUNDED && Math.abs(c.high - hi) < ROUNDED,
      );
      expect(match, `${c.group} [${c.low}, ${c.high}] vs ${JSON.stringify(intervals)}`).toBe(true);
    }
  });

  it("another interval setting is honoured: 50% gives the 25%/75% quantiles", () => {
    const { report, members, column } = analyse(leaderChannel(), { interval: 0.5 });
    expect(report.settings.interval).toBe(0.5);
    for (const entry of report.influence ?? []) {
      const sample = column(members.indexOf(entry.member));
      expect(Math.abs(entry.low - type7(sample, 0.25))).toBeLessThan(ROUNDED);
      expect(Math.abs(entry.high - type7(sample, 0.75))).toBeLessThan(ROUNDED);
    }
  });
});
