/**
 * The influence engine's edges and guards, each against a value fixed outside the code: sample
 * quantiles by Hyndman & Fan 1996 definition 7 ("Sample quantiles in statistical packages", The
 * American Statistician 50(4):361–365; checked through jStat's `quantiles` with alphap = betap = 1),
 * the settings' documented ranges (DESIGN.md §4: σ in [0, 1)), and closed forms derived in place.
 * Written for the mutation run of issue 18 (docs/testing.md lists which mutant each check kills).
 */
import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { isPlumblineError } from "../../src/domain/errors.js";
import {
  analyzeInfluence,
  type DrawRangeRunner,
  effectiveVoicesOf,
} from "../../src/influence/analyze-influence.js";
import { type AttentionRows, rowsFromDense } from "../../src/influence/attention-rows.js";
import { contributorsTo } from "../../src/influence/contributors.js";
import {
  DENSE_STATIONARY_LIMIT,
  denseStationaryVector,
} from "../../src/influence/dense-stationary.js";
import { centralInterval, shareAtOrAbove, sortedQuantile } from "../../src/influence/interval.js";
import { drawShares } from "../../src/influence/posterior-draws.js";
import { checkSelfWeight, stationaryVector } from "../../src/influence/stationary-vector.js";
import { countsFromDense } from "./fixtures.js";

const jStat = createRequire(import.meta.url)("jstat") as {
  quantiles(arr: number[], p: number[], alphap: number, betap: number): number[];
};

function codeOf(run: () => unknown): string {
  try {
    run();
  } catch (error) {
    return isPlumblineError(error) ? error.code : `other: ${String(error)}`;
  }
  return "no error";
}

function messageOf(run: () => unknown): string {
  try {
    run();
  } catch (error) {
    return error instanceof Error ? error.message : "";
  }
  return "";
}

function hintOf(run: () => unknown): string {
  try {
    run();
  } catch (error) {
    return isPlumblineError(error) ? error.hint : "";
  }
  return "";
}

describe("sample quantiles (Hyndman & Fan 1996, definition 7)", () => {
  const sample = Float64Array.of(1, 2, 3, 4, 10);

  it("matches jStat at p = 0, 0.05, 0.3, 0.5, 0.95 and 1, both ends included", () => {
    for (const p of [0, 0.05, 0.3, 0.5, 0.95, 1]) {
      const expected = jStat.quantiles([...sample], [p], 1, 1)[0];
      expect(Math.abs(sortedQuantile(sample, p) - expected)).toBeLessThan(1e-12);
    }
    // By the definition: h = (n − 1)p; p = 1 is the largest value itself, p = 0 the smallest.
    expect(sortedQuantile(sample, 1)).toBe(10);
    expect(sortedQuantile(sample, 0)).toBe(1);
  });

  it("an empty sample has no quantile (NaN); one value is every quantile", () => {
    expect(sortedQuantile(new Float64Array(0), 0.5)).toBeNaN();
    expect(sortedQuantile(Float64Array.of(7), 0.05)).toBe(7);
    expect(sortedQuantile(Float64Array.of(7), 1)).toBe(7);
  });

  it("central interval: sorts an unsorted sample, and gives [point, point] with no draws", () => {
    const shuffled = Float64Array.of(10, 3, 1, 4, 2);
    const { low, high } = centralInterval(shuffled, 0.5, 99);
    expect(low).toBeCloseTo(jStat.quantiles([1, 2, 3, 4, 10], [0.25], 1, 1)[0], 12);
    expect(high).toBeCloseTo(jStat.quantiles([1, 2, 3, 4, 10], [0.75], 1, 1)[0], 12);
    // The caller's sample is left as it was.
    expect([...shuffled]).toEqual([10, 3, 1, 4, 2]);
    expect(centralInterval(new Float64Array(0), 0.9, 0.25)).toEqual({ low: 0.25, high: 0.25 });
  });

  it("share at or above the line counts a draw exactly on the line; no draws: the point decides", () => {
    expect(shareAtOrAbove(Float64Array.of(0.1, 0.3, 0.3, 0.5), 0.3, 0)).toBe(0.75);
    expect(shareAtOrAbove(new Float64Array(0), 0.3, 0.3)).toBe(1);
    expect(shareAtOrAbove(new Float64Array(0), 0.3, 0.2999)).toBe(0);
  });
});

const oz3 = [
  [1 / 2, 1 / 4, 1 / 4],
  [1 / 2, 0, 1 / 2],
  [1 / 4, 1 / 4, 1 / 2],
];

describe("guards of the stationary vector", () => {
  const oz = [
    [1 / 2, 1 / 4, 1 / 4],
    [1 / 2, 0, 1 / 2],
    [1 / 4, 1 / 4, 1 / 2],
  ];

  it("self-weight: 0 and 0.999 accepted; 1, −0.1, NaN and ∞ refused with SETTING_BAD_VALUE", () => {
    expect(codeOf(() => checkSelfWeight(0))).toBe("no error");
    expect(codeOf(() => checkSelfWeight(0.999))).toBe("no error");
    for (const bad of [1, -0.1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(codeOf(() => checkSelfWeight(bad))).toBe("SETTING_BAD_VALUE");
    }
    expect(hintOf(() => checkSelfWeight(1))).toContain("[0, 1)");
    expect(messageOf(() => checkSelfWeight(1))).toContain("--self-weight");
  });

  it("the power method's rounds follow its contraction (Stewart 1994, ch. 1; common practice)", () => {
    // Land of Oz: |λ2(A)| = 1/4 (derived in textbook-chains), so from the even start the L1 change
    // falls about 4× a round and reaches 1e−12 after about ln(1e12)/ln 4 ≈ 20 rounds — on A itself,
    // whatever the caller's σ (every σ < 1 has the same s); the lazy chain (5/8 a round) would need
    // about 60, and a dense solve would end the count early.
    const oz = stationaryVector(rowsFromDense(oz3), { selfWeight: 0.5 });
    expect(oz.iterations).toBeGreaterThanOrEqual(15);
    expect(oz.iterations).toBeLessThanOrEqual(25);
    // A warm start at the answer (any positive multiple of it) is a fixed point: one round.
    const warm = stationaryVector(rowsFromDense(oz3), {
      selfWeight: 0,
      start: Float64Array.of(2.8, 1.4, 2.8),
    });
    expect(warm.iterations).toBe(1);
    // n = 2 starts lazy: ½I + ½[[0,1],[1,0]] maps any start to (½, ½) in one round (derived), and the
    // second round sees no change.
    const swap = stationaryVector(
      rowsFromDense([
        [0, 1],
        [1, 0],
      ]),
      {
        selfWeight: 0,
        start: Float64Array.of(1, 0),
      },
    );
    expect(swap.iterations).toBe(2);
    expect([...swap.vector]).toEqual([0.5, 0.5]);
    // The 3-cycle from (1, 0, 0) never settles on A (period 3); after the probe rounds it turns lazy,
    // where |λ2| = |½ + ½·e^{2πi/3}| = ½ (derived), so about 40 more rounds: well under the 64 at
    // which the dense solve would take over.
    const cycle = stationaryVector(
      rowsFromDense([
        [0, 1, 0],
        [0, 0, 1],
        [1, 0, 0],
      ]),
      {
        selfWeight: 0,
        start: Float64Array.of(1, 0, 0),
      },
    );
    expect(cycle.iterations).toBeLessThan(64);
    for (const v of cycle.vector) expect(Math.abs(v - 1 / 3)).toBeLessThan(1e-11);
  });

  it("no members is refused; one member has share 1 with no rounds", () => {
    const empty: AttentionRows = {
      n: 0,
      rowPtr: new Int32Array(1),
      colIdx: new Int32Array(0),
      values: new Float64Array(0),
      rest: new Float64Array(0),
    };
    expect(() => stationaryVector(empty, { selfWeight: 0.5 })).toThrow(RangeError);
    const one = stationaryVector(rowsFromDense([[1]]), { selfWeight: 0.5 });
    expect([...one.vector]).toEqual([1]);
    expect(one.iterations).toBe(0);
  });

  it("a warm start of the wrong length, negative or NaN is refused; an all-zero one starts even", () => {
    const rows = rowsFromDense(oz);
    for (const start of [
      Float64Array.of(1, 1),
      Float64Array.of(1, -1, 1),
      Float64Array.of(1, Number.NaN, 1),
    ]) {
      expect(() => stationaryVector(rows, { selfWeight: 0, start })).toThrow(RangeError);
    }
    // Grinstead & Snell 1997, Introduction to Probability, ch. 11 (the Land of Oz): (2/5, 1/5, 2/5).
    const fromZero = stationaryVector(rows, { selfWeight: 0, start: new Float64Array(3) });
    const even = stationaryVector(rows, { selfWeight: 0 });
    expect(fromZero.iterations).toBe(even.iterations);
    const expected = [0.4, 0.2, 0.4];
    for (let j = 0; j < 3; j++)
      expect(Math.abs(fromZero.vector[j] - expected[j])).toBeLessThan(1e-11);
  });

  it("the dense solve refuses n above its limit before allocating n² doubles", () => {
    const n = DENSE_STATIONARY_LIMIT + 1;
    const big: AttentionRows = {
      n,
      rowPtr: new Int32Array(n + 1),
      colIdx: new Int32Array(0),
      values: new Float64Array(0),
      rest: new Float64Array(n).fill(1 / (n - 1)),
    };
    expect(() => denseStationaryVector(big)).toThrow(RangeError);
  });
});

describe("report helpers", () => {
  it("effective voices: 1/Σs² (Kish 1965), 2 for (½, ½), 0 for an all-zero vector", () => {
    expect(effectiveVoicesOf([0.5, 0.5])).toBe(2);
    expect(effectiveVoicesOf([0.2, 0.3, 0.5])).toBeCloseTo(1 / 0.38, 12);
    expect(effectiveVoicesOf([0, 0])).toBe(0);
  });

  it("contributors to a member whose share is 0 are all 0 (no division by zero)", () => {
    const rows = rowsFromDense([
      [0, 1, 0],
      [1, 0, 0],
      [0.5, 0.5, 0],
    ]);
    expect([...contributorsTo(rows, [0.5, 0.5, 0], 2)]).toEqual([0, 0, 0]);
    // Derived: s = (½, ½, 0); member 0's share comes wholly from member 1 (s_1·A_10/s_0 = 1).
    expect([...contributorsTo(rows, [0.5, 0.5, 0], 0)]).toEqual([0, 1, 0]);
    // A stored self-loop is not a contributor: j's own part is 0 (DESIGN.md §4.7 is over i ≠ j).
    const loop = rowsFromDense([
      [0.5, 0.5],
      [1, 0],
    ]);
    // s = (2/3, 1/3) (derived: s_1 = s_0/2); parts of s_0: member 1 gives s_1·A_10/s_0 = 1/2.
    const parts = contributorsTo(loop, [2 / 3, 1 / 3], 0);
    expect(parts[0]).toBe(0);
    expect(parts[1]).toBeCloseTo(0.5, 14);
  });

  it("progress: about 50 calls, rising, ending at K, and the same draws as without progress", () => {
    const counts = countsFromDense([
      [0, 3, 1, 0],
      [2, 0, 2, 1],
      [1, 1, 0, 4],
      [0, 2, 2, 0],
    ]);
    const options = { background: 1, selfWeight: 0.5, samples: 120, seed: 5 } as const;
    const done: number[] = [];
    const withProgress = analyzeInfluence(counts, { ...options, onDraw: (k) => done.push(k) });
    const without = analyzeInfluence(counts, options);
    // ceil(120/50) = 3 draws a step: 40 calls, 3, 6, …, 120.
    expect(done).toEqual(Array.from({ length: 40 }, (_, k) => 3 * (k + 1)));
    expect(withProgress.draws.length).toBe(120);
    for (let k = 0; k < 120; k++) expect([...withProgress.draws[k]]).toEqual([...without.draws[k]]);
    expect([...withProgress.effectiveVoicesDraws]).toEqual([...without.effectiveVoicesDraws]);
  });

  it("a draw runner gets the plan only without a transform; it may compute |λ2| meanwhile", () => {
    const counts = countsFromDense([
      [0, 3, 1, 0],
      [2, 0, 2, 1],
      [1, 1, 0, 4],
      [0, 2, 2, 0],
    ]);
    const options = { background: 1, selfWeight: 0.5, samples: 30, seed: 8 } as const;
    const here = analyzeInfluence(counts, options);
    const calls: number[] = [];
    const runner: DrawRangeRunner = (plan, samples, meanwhile) => {
      calls.push(samples);
      meanwhile?.();
      return drawShares(plan, 0, samples);
    };
    const elsewhere = analyzeInfluence(counts, { ...options, drawRanges: runner });
    expect(calls).toEqual([30]);
    for (let k = 0; k < 30; k++) expect([...elsewhere.draws[k]]).toEqual([...here.draws[k]]);
    expect(elsewhere.secondEigenvalue).toBe(here.secondEigenvalue);
    // A transform cannot be sent to another thread: the draws are made here.
    calls.length = 0;
    analyzeInfluence(counts, { ...options, drawRanges: runner, transform: (rows) => rows });
    expect(calls).toEqual([]);
    // A runner that cannot (null) leaves the draws to this thread, with the same result.
    const declined = analyzeInfluence(counts, { ...options, drawRanges: () => null });
    expect([...declined.effectiveVoicesDraws]).toEqual([...here.effectiveVoicesDraws]);
  });
});
