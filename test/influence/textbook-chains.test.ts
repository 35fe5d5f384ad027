import { UndirectedGraph } from "graphology";
import karateModule from "graphology-generators/social/karate-club.js";
import { describe, expect, it } from "vitest";
import {
  denseTransition,
  pointAttentionRows,
  rowsFromDense,
} from "../../src/influence/attention-rows.js";
import {
  denseSecondEigenvalue,
  iterativeSecondEigenvalue,
  secondEigenvalue,
} from "../../src/influence/second-eigenvalue.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, interop } from "./fixtures.js";

function shares(matrix: number[][], selfWeight = 0): number[] {
  return [...stationaryVector(rowsFromDense(matrix), { selfWeight }).vector];
}

function bothEigen(matrix: number[][], selfWeight = 0): [number, number] {
  const rows = rowsFromDense(matrix);
  const s = stationaryVector(rows, { selfWeight }).vector;
  return [denseSecondEigenvalue(rows, selfWeight), iterativeSecondEigenvalue(rows, selfWeight, s)];
}

function expectClose(actual: readonly number[], expected: readonly number[], tol: number): void {
  expect(actual.length).toBe(expected.length);
  actual.forEach((v, k) => {
    expect(Math.abs(v - expected[k])).toBeLessThan(tol);
  });
}

describe("textbook chains", () => {
  // Grinstead & Snell, Introduction to Probability (AMS, 2nd rev. ed. 1997), ch. 11: Example 11.1
  // defines the Land of Oz chain (R, N, S); its fixed vector (2/5, 1/5, 2/5) is found later in the
  // chapter, §11.3 "Ergodic Markov Chains", where Example 11.1 is continued (example number there
  // from memory). The eigenvalues are derived here, not quoted: trace 1 = 1 + λ2 + λ3 gives
  // λ3 = −λ2, and det P = −1/16 = λ2·λ3 gives λ2 = 1/4, λ3 = −1/4.
  const oz = [
    [1 / 2, 1 / 4, 1 / 4],
    [1 / 2, 0, 1 / 2],
    [1 / 4, 1 / 4, 1 / 2],
  ];

  it("Land of Oz: s = (2/5, 1/5, 2/5), eigenvalues 1, 1/4, −1/4", () => {
    expectClose(shares(oz), [2 / 5, 1 / 5, 2 / 5], 1e-11); // Grinstead & Snell, §11.3
    const [dense, iterative] = bothEigen(oz);
    expect(Math.abs(dense - 1 / 4)).toBeLessThan(1e-12); // derived above (trace and determinant)
    expect(Math.abs(iterative - 1 / 4)).toBeLessThan(1e-12);
    // σ moves every eigenvalue λ to σ + (1−σ)λ (common practice): 1/2 + 1/2·(−1/4), 1/2 + 1/8.
    expect(Math.abs(denseSecondEigenvalue(rowsFromDense(oz), 0.5) - 5 / 8)).toBeLessThan(1e-12);
  });

  it("two-state chain: s = (b, a)/(a+b) = (1/4, 3/4), λ2 = 1 − a − b = 3/5", () => {
    // Levin, Peres & Wilmer, Markov Chains and Mixing Times, §1.1 (from memory).
    const a = 3 / 10;
    const b = 1 / 10;
    const chain = [
      [1 - a, a],
      [b, 1 - b],
    ];
    expectClose(shares(chain), [1 / 4, 3 / 4], 1e-11);
    const [dense, iterative] = bothEigen(chain);
    expect(Math.abs(dense - 3 / 5)).toBeLessThan(1e-12);
    expect(Math.abs(iterative - 3 / 5)).toBeLessThan(1e-12);
  });

  it("doubly stochastic circulant: uniform s, complex λ2 with |λ2| = √0.07", () => {
    // Eigenvalues of a circulant are c0 + c1ω + c2ω² over the cube roots ω (common practice).
    const circulant = [
      [0.5, 0.3, 0.2],
      [0.2, 0.5, 0.3],
      [0.3, 0.2, 0.5],
    ];
    expectClose(shares(circulant), [1 / 3, 1 / 3, 1 / 3], 1e-11);
    const [dense, iterative] = bothEigen(circulant);
    expect(Math.abs(dense - Math.sqrt(0.07))).toBeLessThan(1e-12);
    expect(Math.abs(iterative - Math.sqrt(0.07))).toBeLessThan(1e-12);
  });

  it("3-cycle permutation: period 3, T^t p has no limit, |λ2| = 1, yet s is uniform", () => {
    // Perron–Frobenius for periodic chains; Seneta 2006, Non-negative Matrices and Markov
    // Chains, ch. 1 (from memory): the unit-modulus eigenvalues are the cube roots of unity.
    const cycle = [
      [0, 1, 0],
      [0, 0, 1],
      [1, 0, 0],
    ];
    let p = [1, 0, 0];
    const seen: number[][] = [];
    for (let t = 0; t < 300; t++) {
      p = cycle.map((row) => row.reduce((acc, v, j) => acc + v * p[j], 0));
      seen.push(p);
    }
    // Successive rounds never settle: the belief keeps rotating with period 3.
    expect(Math.abs(seen[299][0] - seen[298][0])).toBe(1);
    expect(seen[299]).toEqual(seen[296]);
    const [dense, iterative] = bothEigen(cycle);
    expect(Math.abs(dense - 1)).toBeLessThan(1e-12);
    expect(Math.abs(iterative - 1)).toBeLessThan(1e-12);
    // With σ = 0 the power method still converges (it iterates lazily, same s).
    expectClose(shares(cycle, 0), [1 / 3, 1 / 3, 1 / 3], 1e-11);
  });

  it("two closed classes: eigenvalue 1 twice, so |λ2| = 1", () => {
    // Perron–Frobenius; Seneta 2006, ch. 1 (from memory): one eigenvalue 1 per closed class.
    const split = [
      [1, 0, 0],
      [1 / 4, 1 / 2, 1 / 4],
      [0, 0, 1],
    ];
    const [dense, iterative] = bothEigen(split);
    expect(Math.abs(dense - 1)).toBeLessThan(1e-12);
    expect(Math.abs(iterative - 1)).toBeLessThan(1e-10);
  });

  it("reversible chains: symmetric weights give degree shares", () => {
    // Levin, Peres & Wilmer, 2nd ed. 2017, §1.6 (detailed balance implies stationarity; from
    // memory): a walk on symmetric weights W satisfies detailed balance with s_i = Σ_j W_ij / Σ W.
    const rng = createSeededRng(20240611);
    for (let trial = 0; trial < 5; trial++) {
      const n = 5 + trial * 3;
      const w = Array.from({ length: n }, () => new Array<number>(n).fill(0));
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) {
          const v = rng.next() < 0.6 ? rng.next() * 4 : 0;
          w[i][j] = v;
          w[j][i] = v;
        }
        w[i][(i + 1) % n] += 0.5; // a ring keeps the walk irreducible
        w[(i + 1) % n][i] += 0.5;
      }
      const degrees = w.map((row) => row.reduce((a, b) => a + b, 0));
      const total = degrees.reduce((a, b) => a + b, 0);
      const rows = pointAttentionRows(countsFromDense(w), 0);
      const s = stationaryVector(rows, { selfWeight: 0.3 }).vector;
      expectClose(
        [...s],
        degrees.map((d) => d / total),
        1e-10,
      );
    }
  });

  it("Zachary's karate club as mutual equal attention: s = degree share", () => {
    // Zachary 1977, "An information flow model for conflict and fission in small groups",
    // J. Anthropological Research 33:452–473, via graphology-generators' social/karate-club.
    const graph = interop(karateModule)(UndirectedGraph);
    expect(graph.order).toBe(34);
    expect(graph.size).toBe(78);
    const ties = Array.from({ length: 34 }, () => new Array<number>(34).fill(0));
    graph.forEachEdge((_edge: string, _attributes: unknown, source: string, target: string) => {
      ties[Number(source)][Number(target)] = 1;
      ties[Number(target)][Number(source)] = 1;
    });
    const rows = pointAttentionRows(countsFromDense(ties), 0);
    const s = [...stationaryVector(rows, { selfWeight: 0.5 }).vector];
    const degrees = ties.map((row) => row.reduce((a, b) => a + b, 0));
    expectClose(
      s,
      degrees.map((d) => d / 156),
      1e-10,
    ); // 2 × 78 ties
    const sorted = [...s].sort((a, b) => b - a);
    expect(Math.abs(sorted[0] - 17 / 156)).toBeLessThan(1e-10); // Zachary 1977: member 34
    expect(Math.abs(sorted[1] - 16 / 156)).toBeLessThan(1e-10); // Zachary 1977: member 1
    expect(s.indexOf(sorted[0])).toBe(33);
    expect(s.indexOf(sorted[1])).toBe(0);
    // The selector's dense branch (n ≤ 150) agrees with the iterative one on this chain.
    const dense = secondEigenvalue(rows, 0.5, Float64Array.from(s));
    const iterative = iterativeSecondEigenvalue(rows, 0.5, Float64Array.from(s));
    expect(Math.abs(dense - iterative)).toBeLessThan(1e-10);
    expect(denseTransition(rows, 0.5)[33][33]).toBe(0.5);
  });
});
