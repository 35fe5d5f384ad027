/**
 * The version 2 model's parts against outside sources: Kish's effective sample size, the
 * Dirichlet–multinomial likelihood and ln Γ against jstat, SplitMix64's published outputs, and
 * draws that are the same for any split of the draw range.
 */
import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { buildAttentionInput } from "../../src/attention/build-attention-input.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import {
  buildAttentionPrior,
  effectiveCounts,
  logDirichletMultinomial,
  pointRowsFromPrior,
} from "../../src/influence/attention-prior.js";
import { logGamma } from "../../src/influence/log-gamma.js";
import { drawPlan, drawShares } from "../../src/influence/posterior-draws.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createDrawRng, splitMix64Output } from "../../src/ports/rng.js";
import { snapshotOf, T0 } from "../report/log-builders.js";
import { countsFromDense } from "./fixtures.js";

const jStat = createRequire(import.meta.url)("jstat") as { gammaln(x: number): number };

describe("effective counts (Kish 1965)", () => {
  it("three decayed signals of weights 1, ½, ¼ count as (Σw)²/Σw² = 7/3 signals", () => {
    // Kish (1965), "Survey Sampling", Wiley: effective sample size of weighted data (Σw)²/Σw²
    // (from memory). Ages 0, 14 and 28 days at half-life 14 give weights 1, 0.5, 0.25.
    const until = T0 + 30 * DAY_MS;
    const events: ChatEvent[] = [
      { type: "consent", at: T0 - 1000, channel: "c1", member: "a", level: "named" },
      { type: "consent", at: T0 - 999, channel: "c1", member: "b", level: "named" },
      { type: "consent", at: T0 - 998, channel: "c1", member: "c", level: "named" },
    ];
    const ages = [0, 14, 27.999];
    ages.forEach((age, k) => {
      events.push({
        type: "message",
        at: until - age * DAY_MS,
        channel: "c1",
        id: `m${k}`,
        author: "a",
        mentions: [k === 1 ? "c" : "b"],
      });
    });
    events.sort((x, y) => x.at - y.at);
    const input = buildAttentionInput(snapshotOf(events), {
      ...DEFAULT_SETTINGS,
      halfLifeDays: 14,
      until,
    });
    const w = ages.map((age) => 0.5 ** (age / 14));
    const sum = w.reduce((s, x) => s + x, 0);
    const squares = w.reduce((s, x) => s + x * x, 0);
    expect(sum ** 2 / squares).toBeCloseTo(7 / 3, 3);
    const kish = input.counts.kish;
    expect(kish?.[0]).toBeCloseTo(sum / squares, 12);
    const effective = effectiveCounts(input.counts);
    const total = effective[input.counts.rowPtr[0]] + effective[input.counts.rowPtr[0] + 1];
    expect(total).toBeCloseTo(sum ** 2 / squares, 12);
    // Without decay every weight is 1 and k = 1: effective counts are the counts.
    const whole = buildAttentionInput(snapshotOf(events), {
      ...DEFAULT_SETTINGS,
      halfLifeDays: 0,
      until,
    });
    expect(Array.from(effectiveCounts(whole.counts))).toEqual([2, 1]);
  });
});

describe("ln Γ and the Dirichlet–multinomial likelihood", () => {
  it("ln Γ matches jstat's gammaln from 1e-8 to 1e5", () => {
    for (const x of [1e-8, 1e-3, 0.1, 0.5, 1, 1.5, 3, 10.5, 100, 1e5]) {
      const ref = jStat.gammaln(x);
      expect(Math.abs(logGamma(x) - ref)).toBeLessThan(1e-12 * Math.max(1, Math.abs(ref)));
    }
  });

  it("the Pólya likelihood (Minka 2000) matches jstat's gammaln term by term", () => {
    const x = [3, 0, 0.5, 7, 1.25];
    const a = [0.2, 1.1, 0.05, 2, 0.7];
    const A = a.reduce((s, v) => s + v, 0);
    const N = x.reduce((s, v) => s + v, 0);
    let ref = jStat.gammaln(A) - jStat.gammaln(N + A);
    x.forEach((xj, j) => {
      ref += jStat.gammaln(xj + a[j]) - jStat.gammaln(a[j]);
    });
    expect(logDirichletMultinomial(x, a)).toBeCloseTo(ref, 10);
  });

  it("with the multinomial coefficient it sums to 1 over every outcome of N = 6 in 3 cells", () => {
    // A probability distribution over compositions (Mosimann 1962, Biometrika 49:65–82).
    const a = [0.5, 1, 2.5];
    let total = 0;
    const logFactorial = (k: number) => jStat.gammaln(k + 1);
    for (let x0 = 0; x0 <= 6; x0++) {
      for (let x1 = 0; x0 + x1 <= 6; x1++) {
        const x = [x0, x1, 6 - x0 - x1];
        const coefficient = logFactorial(6) - x.reduce((s, v) => s + logFactorial(v), 0);
        total += Math.exp(coefficient + logDirichletMultinomial(x, a));
      }
    }
    expect(total).toBeCloseTo(1, 12);
  });

  it("a row's prior-strength posterior is the Pólya likelihood over the grid (log-uniform prior)", () => {
    const dense = [
      [0, 4, 0, 1, 0],
      [2, 0, 2, 2, 2],
      [0, 6, 0, 0, 0],
      [1, 1, 1, 0, 1],
      [3, 0, 0, 3, 0],
    ];
    const counts = countsFromDense(dense);
    const prior = buildAttentionPrior(counts, "auto");
    const n = 5;
    const G = prior.grid.length;
    for (const i of [0, 2, 3]) {
      const m = Array.from(prior.profile.subarray(0, n));
      const logs = Array.from(prior.grid, (alpha) => {
        const a = m.map((mj, j) => (j === i ? 0 : (alpha * mj) / (1 - m[i])));
        const x = dense[i].filter((_, j) => j !== i);
        return logDirichletMultinomial(
          x,
          a.filter((_, j) => j !== i),
        );
      });
      const max = Math.max(...logs);
      const w = logs.map((l) => Math.exp(l - max));
      const sum = w.reduce((s, v) => s + v, 0);
      let running = 0;
      for (let g = 0; g < G; g++) {
        running += w[g] / sum;
        expect(prior.cumulative[i * G + g]).toBeCloseTo(running, 9);
      }
    }
    // Row 2 sends everything to one member: its posterior favours small strengths (a focused
    // row); row 1 spreads evenly: it favours larger ones.
    expect(prior.strength[2]).toBeLessThan(prior.strength[1]);
  });
});

describe("the prior vanishes where it should (DESIGN.md §4.4)", () => {
  it("Land of Oz (Grinstead & Snell 1997, Example 11.1) as counts: the prior vanishes", () => {
    // T: R = (½, ¼, ¼), N = (½, 0, ½), S = (¼, ¼, ½) (Example 11.1), s = (0.4, 0.2, 0.4) (given
    // in §11.3, "Ergodic Markov Chains"). Counts carry no
    // diagonal, so the model sees the off-diagonal chain Q (rows of T without T_ii, renormalised),
    // whose stationary vector is ∝ s_i(1 − T_ii) = (0.2, 0.2, 0.2) (derived from T = D + (I−D)Q):
    // uniform. With 10⁴ signals per row the learnt prior must leave it there.
    const oz = [
      [0, 0.25, 0.25],
      [0.5, 0, 0.5],
      [0.25, 0.25, 0],
    ];
    const counts = countsFromDense(oz.map((row) => row.map((v) => v * 40_000)));
    const prior = buildAttentionPrior(counts, "auto");
    const s = stationaryVector(pointRowsFromPrior(counts, prior), { selfWeight: 0.5 }).vector;
    for (const v of s) expect(v).toBeCloseTo(1 / 3, 3);
    // Fixed α = 0: exactly the counts' chain.
    const exactPrior = buildAttentionPrior(counts, 0);
    const exactS = stationaryVector(pointRowsFromPrior(counts, exactPrior), {
      selfWeight: 0,
    }).vector;
    for (const v of exactS) expect(v).toBeCloseTo(1 / 3, 12);
  });
});

describe("per-draw random streams (DESIGN.md §4.6, §4.11)", () => {
  it("SplitMix64 with seed 1234567 gives its published first outputs", () => {
    // Steele, Lea & Flood (2014), "Fast splittable pseudorandom number generators", OOPSLA; the
    // outputs for seed 1234567 as printed with the reference splitmix64.c (Vigna), from memory.
    const expected = [
      6457827717110365317n,
      3203168211198807973n,
      9817491932198370423n,
      4593380528125082431n,
      16408922859458223821n,
    ];
    expected.forEach((value, k) => {
      expect(splitMix64Output(1234567n, k)).toBe(value);
    });
  });

  it("draw k's stream depends only on (seed, k)", () => {
    const a = createDrawRng(9, 5);
    const b = createDrawRng(9, 5);
    const c = createDrawRng(9, 6);
    const first = [a.next(), a.next(), a.next()];
    expect([b.next(), b.next(), b.next()]).toEqual(first);
    expect(c.next()).not.toBe(first[0]);
  });

  it("any split of the draw range gives byte-identical draws (1, 2 or 3 parts)", () => {
    const dense = Array.from({ length: 9 }, (_, i) =>
      Array.from({ length: 9 }, (_, j) => (i === j ? 0 : (i * 7 + j * 3) % 5)),
    );
    dense[4] = new Array(9).fill(0); // a silent row, drawn from its prior
    const counts = countsFromDense(dense);
    const prior = buildAttentionPrior(counts, "auto");
    const start = stationaryVector(pointRowsFromPrior(counts, prior), { selfWeight: 0.5 }).vector;
    const plan = drawPlan(counts, prior, { selfWeight: 0.5, seed: 42, start });
    const whole = drawShares(plan, 0, 30);
    const two = [drawShares(plan, 0, 16), drawShares(plan, 16, 30)];
    const three = [drawShares(plan, 0, 7), drawShares(plan, 7, 19), drawShares(plan, 19, 30)];
    const join = (parts: { shares: Float64Array }[]) =>
      Buffer.concat(parts.map((p) => Buffer.from(p.shares.buffer)));
    expect(join(two).equals(Buffer.from(whole.shares.buffer))).toBe(true);
    expect(join(three).equals(Buffer.from(whole.shares.buffer))).toBe(true);
    for (let k = 0; k < 30; k++) {
      let sum = 0;
      for (let j = 0; j < 9; j++) sum += whole.shares[k * 9 + j];
      expect(sum).toBeCloseTo(1, 12);
    }
  });
});
