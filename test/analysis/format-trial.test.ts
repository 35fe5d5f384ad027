/**
 * Format comparison and trials, checked by simulation from a known truth (DESIGN.md rule:
 * statistics are checked by simulation): synthetic channels whose attention matrix is known in
 * every week. The true balance of each matrix is computed here independently, by power iteration
 * of the stationary vector (the DeGroot 1974 model's consensus weights, "Reaching a consensus", JASA 69(345);
 * from memory), with the same self-weight 0.5 the model uses (it changes no shares).
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { compareFormats } from "../../src/analysis/compare-formats.js";
import {
  planTrial,
  trialEvents,
  trialFormatAt,
  trialVerdict,
  WEEK_MS,
} from "../../src/analysis/format-trial.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { createSeededRng, type Rng } from "../../src/ports/rng.js";

const N = 15;
const T0 = Date.UTC(2026, 10, 2, 0, 0, 0);
const members = Array.from({ length: N }, (_, i) => `m${String(i).padStart(2, "0")}`);

/** Row-stochastic attention: every member gives `lead` of their attention to m00, the rest evenly. */
function leaderMatrix(lead: number): number[][] {
  return members.map((_, i) =>
    members.map((_, j) => {
      if (i === j) return 0;
      if (i === 0) return 1 / (N - 1);
      if (j === 0) return lead;
      return (1 - lead) / (N - 2);
    }),
  );
}

/** Balance of T's stationary vector: (1/Σs²)/n, by power iteration (independent of src/). */
function trueBalance(t: number[][]): number {
  let s = new Array(N).fill(1 / N);
  for (let it = 0; it < 2000; it++) {
    const next = new Array(N).fill(0);
    for (let i = 0; i < N; i++)
      for (let j = 0; j < N; j++) next[j] += s[i] * (0.5 * (i === j ? 1 : 0) + 0.5 * t[i][j]);
    s = next;
  }
  return 1 / s.reduce((a, x) => a + x * x, 0) / N;
}

function pick(rng: Rng, row: readonly number[]): number {
  let u = rng.next();
  for (let j = 0; j < row.length; j++) {
    u -= row[j];
    if (u < 0) return j;
  }
  return row.length - 1;
}

/** `signals` mention signals in each week, week w drawn from `matrices[w]`, authors uniform. */
function channelEvents(rng: Rng, matrices: readonly number[][][], signals: number): ChatEvent[] {
  const events: ChatEvent[] = members.map((member) => ({
    type: "consent",
    at: T0 - 1000,
    channel: "c1",
    member,
    level: "counted",
  }));
  let id = 0;
  matrices.forEach((t, w) => {
    for (let k = 0; k < signals; k++) {
      const a = Math.floor(rng.next() * N);
      const b = pick(rng, t[a]);
      const at = T0 + w * WEEK_MS + Math.floor(((k + 0.5) / signals) * WEEK_MS);
      events.push({
        type: "message",
        at,
        channel: "c1",
        id: `x${id++}`,
        author: members[a],
        mentions: [members[b]],
      });
    }
  });
  return events;
}

function snapshotOf(events: ChatEvent[]): LedgerSnapshot {
  const snap = buildLedgers(events.sort((x, y) => x.at - y.at)).get("c1");
  if (!snap) throw new Error("no channel");
  return snap;
}

const SETTINGS = { ...DEFAULT_SETTINGS, samples: 100 };
const SPREAD = leaderMatrix(0.1);
const CONCENTRATED = leaderMatrix(0.27);

describe("trial plan (alternating treatments: Barlow & Hersen 1984, Single Case Experimental Designs, 2nd ed., Pergamon; randomised blocks: Cochran & Cox 1957, Experimental Designs, Wiley)", () => {
  it("alternates ABAB, or orders each block of two at random from a seed, each format in every block", () => {
    const plan = planTrial({ a: "A", b: "B", weeks: 4, start: T0 });
    expect(plan.schedule).toEqual(["A", "B", "A", "B"]);
    expect(trialFormatAt(plan, T0 + WEEK_MS + 1)).toBe("B");
    expect(trialFormatAt(plan, T0 + 4 * WEEK_MS)).toBeNull();
    expect(trialEvents(plan, "c1").map((e) => e.format)).toEqual(["A", "B", "A", "B", null]);
    const orders = new Set<string>();
    for (let seed = 1; seed <= 20; seed++) {
      const r = planTrial({ a: "A", b: "B", weeks: 8, start: T0, design: "random", seed });
      for (let block = 0; block < 4; block++) {
        expect([...r.schedule.slice(2 * block, 2 * block + 2)].sort()).toEqual(["A", "B"]);
      }
      expect(
        planTrial({ a: "A", b: "B", weeks: 8, start: T0, design: "random", seed }).schedule,
      ).toEqual(r.schedule);
      orders.add(r.schedule.join(""));
    }
    expect(orders.size).toBeGreaterThan(5); // 16 orders possible; 20 seeds show many
    expect(() => planTrial({ a: "A", b: "B", weeks: 3, start: T0 })).toThrow(/even number/);
    expect(() => planTrial({ a: "A", b: "A", weeks: 4, start: T0 })).toThrow(/two different/);
  });

  it("detects a format that truly spreads influence in ≥ 90% of seeded runs, and says no clear difference in ≥ 90% when both are the same (4 weeks × 15 members × 300 signals)", () => {
    const spread = trueBalance(SPREAD);
    const concentrated = trueBalance(CONCENTRATED);
    // The truth the simulation starts from: B is more balanced than A by well over the margin.
    expect(spread - concentrated).toBeGreaterThan(0.1);
    const runs = 30;
    let detected = 0;
    let quiet = 0;
    for (let seed = 1; seed <= runs; seed++) {
      const plan = planTrial({ a: "A", b: "B", weeks: 4, start: T0 });
      const rng = createSeededRng(1000 + seed);
      const truth = plan.schedule.map((f) => (f === "A" ? CONCENTRATED : SPREAD));
      const events = [...channelEvents(rng, truth, 300), ...trialEvents(plan, "c1")];
      const verdict = trialVerdict(snapshotOf(events), { ...SETTINGS, seed }, plan);
      if (verdict.pair?.verdict === "b more balanced") detected++;
      const same = plan.schedule.map(() => CONCENTRATED);
      const nullEvents = [...channelEvents(rng, same, 300), ...trialEvents(plan, "c1")];
      const nullVerdict = trialVerdict(snapshotOf(nullEvents), { ...SETTINGS, seed }, plan);
      if (nullVerdict.pair?.verdict === "no clear difference") quiet++;
    }
    console.log(
      `format trial: true balance A ${concentrated.toFixed(3)}, B ${spread.toFixed(3)}; detected ${detected}/${runs}, no clear difference when equal ${quiet}/${runs}`,
    );
    expect(detected / runs).toBeGreaterThanOrEqual(0.9);
    expect(quiet / runs).toBeGreaterThanOrEqual(0.9);
  });

  it("warns of time confounding on a before/after split with a trend, and not on the alternating trial", () => {
    // The channel drifts from concentrated to spread week by week, whatever the format.
    const drift = [0.45, 0.35, 0.25, 0.15].map(leaderMatrix);
    const rng = createSeededRng(7);
    const base = channelEvents(rng, drift, 300);
    const split: ChatEvent[] = [
      { type: "format", at: T0, channel: "c1", format: "A" },
      { type: "format", at: T0 + 2 * WEEK_MS, channel: "c1", format: "B" },
    ];
    const before = compareFormats(snapshotOf([...base, ...split]), SETTINGS, {
      until: T0 + 4 * WEEK_MS,
    });
    console.log(`before/after split: trend per week ${before.pair?.trendPerWeek}`);
    expect(before.pair?.confoundedWithTime).toBe(true);
    const plan = planTrial({ a: "A", b: "B", weeks: 4, start: T0 });
    const trial = trialVerdict(snapshotOf([...base, ...trialEvents(plan, "c1")]), SETTINGS, plan);
    expect(trial.pair?.confoundedWithTime).toBe(false);
    // No drift, same split: no warning.
    const flat = channelEvents(
      createSeededRng(8),
      drift.map(() => CONCENTRATED),
      300,
    );
    const still = compareFormats(snapshotOf([...flat, ...split]), SETTINGS, {
      until: T0 + 4 * WEEK_MS,
    });
    console.log(`flat channel, same split: trend per week ${still.pair?.trendPerWeek}`);
    expect(still.pair?.confoundedWithTime).toBe(false);
  });

  it("lists a period too short for figures and leaves it out", () => {
    const rng = createSeededRng(9);
    const events = [
      ...channelEvents(rng, [SPREAD, SPREAD], 300),
      { type: "format", at: T0, channel: "c1", format: "A" } as ChatEvent,
      { type: "format", at: T0 + DAY_MS_, channel: "c1", format: "B" } as ChatEvent,
    ];
    const report = compareFormats(snapshotOf(events), SETTINGS, { until: T0 + 2 * WEEK_MS });
    expect(report.periods.map((p) => [p.format, p.leftOut])).toEqual([
      ["A", "too short"],
      ["B", null],
    ]);
    expect(report.formats.find((f) => f.format === "A")?.balance).toBeNull();
    expect(report.pair).toBeNull();
  });
});

describe("a format's largest share", () => {
  it("is the point-largest member's share with that member's interval, covering the truth of an even channel", () => {
    // Every member spreads attention evenly over the others: the true stationary vector is 1/n
    // for everyone (a doubly stochastic matrix; DeGroot 1974, from memory), so the true largest
    // share is 1/15. The largest entry of each draw is biased upward here (some member is high in
    // every draw by chance); the point-largest member's own draws are not.
    const even = leaderMatrix(1 / (N - 1));
    const events = [
      ...channelEvents(createSeededRng(11), [even, even], 300),
      { type: "format", at: T0, channel: "c1", format: "A" } as ChatEvent,
    ];
    const until = T0 + 2 * WEEK_MS;
    const snapshot = snapshotOf(events);
    const settings = { ...SETTINGS, seed: 5 };
    const report = compareFormats(snapshot, settings, { until });
    const top = report.formats[0].topShare;
    if (top === null) throw new Error("no figures");
    // The same window as a check (no decay, window = the period): the same member, the same range.
    const check = analyzeSnapshot(
      snapshot,
      { ...settings, halfLifeDays: 0, windowDays: 14 },
      { until },
    );
    console.log(`even channel: largest share ${top.value} (${top.low}–${top.high})`);
    expect(top.value).toBeCloseTo(check.top?.share ?? Number.NaN, 6);
    expect(top.low).toBeCloseTo(check.top?.low ?? Number.NaN, 6);
    expect(top.high).toBeCloseTo(check.top?.high ?? Number.NaN, 6);
    expect(top.low).toBeLessThanOrEqual(top.value);
    expect(top.high).toBeGreaterThanOrEqual(top.value);
    expect(top.low).toBeLessThanOrEqual(1 / N);
    expect(top.high).toBeGreaterThanOrEqual(1 / N);
  });
});

const DAY_MS_ = 86_400_000;
