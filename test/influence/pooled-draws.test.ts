/**
 * The pooled prior direction of large channels (`settings.posterior` "pooled",
 * src/influence/posterior-draws.ts `drawPooled`) against the exact per-cell draws it replaces, on
 * the same plan: every member's posterior mean and spread of the share, and the 90% interval ends
 * of the largest share. The exact draws are the reference (their Dirichlet moments are checked in
 * gamma-sampler.test.ts). Tolerances are Monte Carlo errors of K = 600 draws (common practice: the
 * standard error of a standard deviation is about sd/√(2K), 3% here). Checked on 2026-12-03 by
 * breaking the code on purpose: pooling the leader's own row too (POOL_HEAVY = 2) fails the mean
 * check; a pooled strength of √(A_g) in place of A_g fails the spread check (ratio 1.63).
 */
import { describe, expect, it } from "vitest";
import { buildAttentionPrior, pointRowsFromPrior } from "../../src/influence/attention-prior.js";
import { drawPlan, drawShares, posteriorMethod } from "../../src/influence/posterior-draws.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense } from "./fixtures.js";

function moments(shares: Float64Array, n: number, K: number, j: number) {
  let mean = 0;
  for (let k = 0; k < K; k++) mean += shares[k * n + j];
  mean /= K;
  let v = 0;
  for (let k = 0; k < K; k++) v += (shares[k * n + j] - mean) ** 2;
  return { mean, sd: Math.sqrt(v / (K - 1)) };
}

function quantile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b);
  const h = (sorted.length - 1) * p; // Hyndman & Fan (1996) type 7
  const lo = Math.floor(h);
  return sorted[lo] + (h - lo) * (sorted[Math.min(lo + 1, sorted.length - 1)] - sorted[lo]);
}

describe("pooled prior direction (n > 64) against exact per-cell draws", () => {
  it("n = 120, sparse rows with a strong prior: means, spreads and the top interval agree", () => {
    const n = 120;
    const rng = createSeededRng(42);
    // Each member writes about 4 signals, a third of them to member 0 (a leader).
    const dense = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let i = 0; i < n; i++) {
      for (let t = 0; t < 4; t++) {
        const j = rng.next() < 0.33 ? 0 : Math.floor(rng.next() * n);
        if (j !== i) dense[i][j] += 1;
      }
    }
    const counts = countsFromDense(dense);
    const prior = buildAttentionPrior(counts, 20); // 20·ln(10⁶) ≈ 276 ≥ n − 1: every row pools
    const point = stationaryVector(pointRowsFromPrior(counts, prior), { selfWeight: 0.5 }).vector;
    const base = drawPlan(counts, prior, { selfWeight: 0.5, seed: 7, start: point });
    expect(posteriorMethod(n)).toBe("pooled");
    const K = 600;
    const pooled = drawShares(base, 0, K).shares;
    const exact = drawShares({ ...base, forceExact: true }, 0, K).shares;
    let ratio = 0;
    for (let j = 0; j < n; j++) {
      const a = moments(pooled, n, K, j);
      const b = moments(exact, n, K, j);
      expect(Math.abs(a.mean - b.mean)).toBeLessThan(4 * Math.sqrt((a.sd ** 2 + b.sd ** 2) / K));
      ratio += a.sd / b.sd / n;
    }
    // Averaged over members the spreads agree to a few percent.
    expect(ratio).toBeGreaterThan(0.93);
    expect(ratio).toBeLessThan(1.07);
    const top = (s: Float64Array) => Array.from({ length: K }, (_, k) => s[k * n]);
    const sdTop = moments(exact, n, K, 0).sd;
    for (const p of [0.05, 0.95]) {
      expect(Math.abs(quantile(top(pooled), p) - quantile(top(exact), p))).toBeLessThan(
        0.25 * sdTop,
      );
    }
  });
});
