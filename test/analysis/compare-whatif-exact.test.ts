/**
 * `compare` and `whatif cap` (DESIGN.md §6) field by field, not only by sign: the changes are
 * "B minus A" (after minus before) of the figures each report shows; the probability that B is more
 * balanced is recomputed here from the two periods' member draws (balance per draw = (1/Σ s²)/n,
 * Kish 1965's effective sample size over the headcount; ties count one half, so a period against
 * itself gives exactly ½), pairing draw k with draw k as DESIGN.md §6 specifies; both periods use
 * one seed. A period without figures gives no change and no probability.
 * Written for the mutation run of issue 18 (docs/testing.md).
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshotDetailed } from "../../src/analysis/analyze-snapshot.js";
import { round6 } from "../../src/analysis/assemble-report.js";
import { comparePeriods } from "../../src/analysis/compare-periods.js";
import { whatIfCap } from "../../src/analysis/what-if.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { deriveSeed } from "../../src/ports/rng.js";
import { mentionEvents, snapshotOf, T0 } from "../report/log-builders.js";

const DAY = 86_400_000;

function channel(): ChatEvent[] {
  // Week one (from 2026-11-02): a hub; from day 10: an even ring of six.
  const events = mentionEvents(
    ["b", "c", "d", "e", "f"]
      .map((l) => [l, "a", 8] as [string, string, number])
      .concat([["a", "b", 3]]),
  );
  const ring = ["a", "b", "c", "d", "e", "f"];
  let id = 0;
  for (let rep = 0; rep < 3; rep++) {
    ring.forEach((u, k) => {
      for (const to of [ring[(k + 1) % 6], ring[(k + 2) % 6]]) {
        events.push({
          type: "message",
          at: T0 + 10 * DAY + id * 60_000,
          channel: "c1",
          id: `late${id++}`,
          author: u,
          mentions: [to],
        });
      }
    });
  }
  return events;
}

function balancePerDraw(draws: readonly Float64Array[], n: number): number[] {
  return draws.map((d) => {
    let sum = 0;
    for (const s of d) sum += s * s;
    return 1 / sum / n;
  });
}

const settings = { ...DEFAULT_SETTINGS, halfLifeDays: 0, samples: 60 };
const a = parseDateRange("2026-11-01..2026-11-07");
const b = parseDateRange("2026-11-10..2026-11-16");

describe("compare periods, field by field", () => {
  it("changes are B − A of the shown figures; P(B more balanced) from the paired draws", () => {
    const snapshot = snapshotOf(channel());
    const result = comparePeriods(snapshot, { ...settings, seed: 21 }, { a, b });
    expect(result.kind).toBe("compare");
    expect(result.a.range).toBe(a.label);
    expect(result.b.range).toBe(b.label);
    const ra = result.a.report;
    const rb = result.b.report;
    expect(ra.status).toBe("ok");
    expect(rb.status).toBe("ok");
    expect(ra.window.until).toBe(new Date(a.until).toISOString());
    expect(rb.window.days).toBe(b.days);
    expect(result.change.effectiveVoices).toBe(
      round6((rb.effectiveVoices?.value ?? 0) - (ra.effectiveVoices?.value ?? 0)),
    );
    expect(result.change.balance).toBe(round6((rb.balance ?? 0) - (ra.balance ?? 0)));
    expect(result.change.topShare).toBe(round6((rb.top?.share ?? 0) - (ra.top?.share ?? 0)));
    // Independent: each period analysed on its own with the same seed, balances from member draws.
    const run = (range: typeof a) =>
      analyzeSnapshotDetailed(
        snapshot,
        { ...settings, seed: 21, windowDays: range.days },
        { until: range.until },
      );
    const da = run(a);
    const db = run(b);
    const ba = balancePerDraw(da.influence?.draws ?? [], ra.members);
    const bb = balancePerDraw(db.influence?.draws ?? [], rb.members);
    expect(ba.length).toBe(60);
    let wins = 0;
    for (let k = 0; k < 60; k++) wins += bb[k] > ba[k] ? 1 : bb[k] === ba[k] ? 0.5 : 0;
    expect(result.pBMoreBalanced).toBeCloseTo(wins / 60, 6);
  });

  it("without a seed both periods use the seed of B's end (paired draws)", () => {
    const result = comparePeriods(snapshotOf(channel()), settings, { a, b });
    const seed = deriveSeed("c1", b.until);
    expect(result.a.report.settings.seed).toBe(seed);
    expect(result.b.report.settings.seed).toBe(seed);
  });

  it("a period with no signals: its report says so, and there is no change and no probability", () => {
    const empty = parseDateRange("2026-10-01..2026-10-07");
    const result = comparePeriods(snapshotOf(channel()), { ...settings, seed: 3 }, { a: empty, b });
    expect(result.a.report.status).toBe("insufficient");
    expect(result.b.report.status).toBe("ok");
    expect(result.change).toEqual({ effectiveVoices: null, balance: null, topShare: null });
    expect(result.pBMoreBalanced).toBeNull();
    const reversed = comparePeriods(
      snapshotOf(channel()),
      { ...settings, seed: 3 },
      { a: b, b: empty },
    );
    expect(reversed.change).toEqual({ effectiveVoices: null, balance: null, topShare: null });
    expect(reversed.pBMoreBalanced).toBeNull();
  });
});

describe("what-if cap, field by field", () => {
  it("changes are after − before, at the given end of the window", () => {
    const snapshot = snapshotOf(channel());
    const until = b.until;
    const result = whatIfCap(
      snapshot,
      { ...settings, seed: 4, windowDays: 7 },
      { cap: 0.4, until },
    );
    expect(result.kind).toBe("whatif");
    expect(result.cap).toBe(0.4);
    expect(result.before.window.until).toBe(new Date(until).toISOString());
    expect(result.after.window.until).toBe(new Date(until).toISOString());
    const ev = (r: typeof result.before) => r.effectiveVoices?.value ?? 0;
    expect(result.change.effectiveVoices).toBe(round6(ev(result.after) - ev(result.before)));
    expect(result.change.topShare).toBe(
      round6((result.after.top?.share ?? 0) - (result.before.top?.share ?? 0)),
    );
  });

  it("no figures before the cap: no change", () => {
    const result = whatIfCap(
      snapshotOf(channel()),
      { ...settings, seed: 4, windowDays: 7 },
      {
        cap: 0.4,
        until: parseDateRange("2026-10-01..2026-10-07").until,
      },
    );
    expect(result.before.status).toBe("insufficient");
    expect(result.change).toEqual({ effectiveVoices: null, topShare: null });
  });
});
