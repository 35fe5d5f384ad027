import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { effectiveVoicesOf } from "../../src/influence/analyze-influence.js";
import {
  denseTransition,
  pointAttentionRows,
  rowsFromDense,
} from "../../src/influence/attention-rows.js";
import { sampleNormal } from "../../src/influence/gamma-sampler.js";
import {
  denseSecondEigenvalue,
  iterativeSecondEigenvalue,
} from "../../src/influence/second-eigenvalue.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, meanVariance, randomDenseCounts, randomStochastic } from "./fixtures.js";

/** cP + (1−c)·(1/n)J, the damped ("Google") matrix. */
function damped(p: number[][], c: number): number[][] {
  const n = p.length;
  return p.map((row) => row.map((v) => c * v + (1 - c) / n));
}

describe("damping and the second eigenvalue", () => {
  it("|λ2(cP + (1−c)J/n)| ≤ c, with equality when P has two closed subsets", () => {
    // Haveliwala & Kamvar 2003, "The Second Eigenvalue of the Google Matrix", Stanford InfoLab
    // technical report 2003-20, Theorems 1 and 2.
    const rng = createSeededRng(7);
    for (const c of [0.5, 0.85, 0.95]) {
      const g = rowsFromDense(damped(randomStochastic(12, rng), c));
      expect(denseSecondEigenvalue(g, 0)).toBeLessThanOrEqual(c + 1e-12);
      // Two closed subsets {0,1,2} and {3,4}; member 5 is transient.
      const p = [
        [0.2, 0.5, 0.3, 0, 0, 0],
        [0.6, 0.1, 0.3, 0, 0, 0],
        [0.3, 0.3, 0.4, 0, 0, 0],
        [0, 0, 0, 0.5, 0.5, 0],
        [0, 0, 0, 0.9, 0.1, 0],
        [0.1, 0.2, 0.1, 0.2, 0.2, 0.2],
      ];
      const rows = rowsFromDense(damped(p, c));
      const s = stationaryVector(rows, { selfWeight: 0 }).vector;
      expect(Math.abs(denseSecondEigenvalue(rows, 0) - c)).toBeLessThan(1e-10);
      expect(Math.abs(iterativeSecondEigenvalue(rows, 0, s) - c)).toBeLessThan(1e-10);
    }
  });

  it("background as row-dependent damping: |λ2(A)| ≤ d + (1 − d)/(n − 1), d = max c_i/(c_i+β)", () => {
    // Derived here (not from a text): A_i = d_i P_i + (1 − d_i) E_i with E_i even over the
    // others; Dobrushin's coefficient τ(A) = ½ max_{i,k} ‖A_i − A_k‖₁ bounds every |λ| ≠ 1
    // (Seneta 2006, Non-negative Matrices and Markov Chains, ch. 3, from memory), and
    // ‖A_i − A_k‖₁ ≤ d_i + d_k + ((n−2)|d_i − d_k| + 2 − d_i − d_k)/(n−1) gives the bound.
    // The bound max d alone fails: all-even rows have d = 0 but |λ2| = 1/(n − 1).
    const rng = createSeededRng(99);
    for (let trial = 0; trial < 12; trial++) {
      const n = 4 + (trial % 5) * 4;
      const beta = [0.1, 0.5, 1, 3][trial % 4];
      const counts = countsFromDense(randomDenseCounts(n, 0.3, rng));
      const rows = pointAttentionRows(counts, beta);
      let d = 0;
      for (let i = 0; i < n; i++) {
        let c = 0;
        for (let k = counts.rowPtr[i]; k < counts.rowPtr[i + 1]; k++) c += counts.values[k];
        d = Math.max(d, c / (c + beta));
      }
      expect(denseSecondEigenvalue(rows, 0)).toBeLessThanOrEqual(d + (1 - d) / (n - 1) + 1e-12);
    }
    const even = pointAttentionRows(
      countsFromDense([
        [0, 0, 0, 0],
        [0, 0, 0, 0],
        [0, 0, 0, 0],
        [0, 0, 0, 0],
      ]),
      1,
    );
    expect(Math.abs(denseSecondEigenvalue(even, 0) - 1 / 3)).toBeLessThan(1e-12);
  });
});

describe("DeGroot consensus", () => {
  it("repeated averaging p(t) = T p(t−1) reaches s·p(0) in every entry", () => {
    // DeGroot 1974, "Reaching a Consensus", JASA 69:118–121: the consensus is π·p(0), πT = π.
    const rng = createSeededRng(1974);
    const rows = pointAttentionRows(countsFromDense(randomDenseCounts(9, 0.4, rng)), 0.5);
    const t = denseTransition(rows, 0.4);
    const s = stationaryVector(rows, { selfWeight: 0.4 }).vector;
    let p = Array.from({ length: 9 }, () => rng.next() * 10);
    const consensus = s.reduce((acc, v, i) => acc + v * p[i], 0);
    for (let round = 0; round < 3000; round++) {
      p = t.map((row) => row.reduce((acc, v, j) => acc + v * p[j], 0));
    }
    for (const value of p) expect(Math.abs(value - consensus)).toBeLessThan(1e-9);
  });

  it("the consensus error has variance σ²·Σs² = σ²/N_eff", () => {
    // Bienaymé (variance of a weighted sum of independent errors); Kish 1965, Survey Sampling,
    // effective sample size N_eff = 1/Σw² for normalised weights.
    const rng = createSeededRng(1965);
    const rows = pointAttentionRows(countsFromDense(randomDenseCounts(8, 0.5, rng)), 1);
    const s = stationaryVector(rows, { selfWeight: 0.5 }).vector;
    const sigma = 2;
    const draws = 40_000;
    const errors = new Float64Array(draws);
    for (let k = 0; k < draws; k++) {
      let e = 0;
      for (let i = 0; i < s.length; i++) e += s[i] * sigma * sampleNormal(rng);
      errors[k] = e;
    }
    // The product's effective voices, checked against the closed form and the simulated variance.
    const effective = effectiveVoicesOf(s);
    expect(effective).toBeCloseTo(1 / s.reduce((acc, v) => acc + v * v, 0), 12);
    const expected = sigma ** 2 / effective;
    const { variance } = meanVariance(errors);
    // Standard error of a normal sample variance: σ_e²·√(2/(N−1)); allow 5 of them.
    expect(Math.abs(variance - expected)).toBeLessThan(5 * expected * Math.sqrt(2 / (draws - 1)));
  });

  it("a member who receives at least a from every member has s ≥ a", () => {
    // Derived here from s = sT: s_j = Σ_i s_i T_ij ≥ a Σ_i s_i = a.
    fc.assert(
      fc.property(
        fc.integer({ min: 2, max: 9 }),
        fc.double({ min: 0.01, max: 0.9, noNaN: true }),
        fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        (n, a, seed) => {
          const rng = createSeededRng(seed);
          const j = seed % n;
          const base = randomStochastic(n, rng);
          const matrix = base.map((row) => row.map((v, col) => (1 - a) * v + (col === j ? a : 0)));
          const s = stationaryVector(rowsFromDense(matrix), { selfWeight: 0 }).vector;
          expect(s[j]).toBeGreaterThanOrEqual(a - 1e-12);
        },
      ),
      { seed: 42, numRuns: 100 },
    );
  });
});
