import { DirectedGraph } from "graphology";
import pagerankModule from "graphology-metrics/centrality/pagerank.js";
import { describe, expect, it } from "vitest";
import { isPlumblineError } from "../../src/domain/errors.js";
import {
  columnSums,
  denseTransition,
  leftMultiply,
  pointAttentionRows,
} from "../../src/influence/attention-rows.js";
import {
  denseSecondEigenvalue,
  iterativeSecondEigenvalue,
  secondEigenvalue,
} from "../../src/influence/second-eigenvalue.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createSeededRng } from "../../src/ports/rng.js";
import {
  countsFromDense,
  denseFromCounts,
  interop,
  mlMatrixStationary,
  randomDenseCounts,
} from "./fixtures.js";

const pagerank = interop(pagerankModule);

describe("attention rows (DESIGN.md §4.4)", () => {
  it("point estimate: A_ij = (C_ij + b)/(c_i + β), even rows, and sparse products match dense", () => {
    const rng = createSeededRng(4);
    const dense = randomDenseCounts(7, 0.4, rng);
    dense[3] = new Array<number>(7).fill(0); // a member with no outgoing signals
    for (const beta of [0, 0.7]) {
      const counts = countsFromDense(dense);
      const rows = pointAttentionRows(counts, beta);
      const a = denseTransition(rows, 0);
      const c = denseFromCounts(counts);
      for (let i = 0; i < 7; i++) {
        const ci = c[i].reduce((x, y) => x + y, 0);
        for (let j = 0; j < 7; j++) {
          const expected = j === i ? 0 : ci === 0 ? 1 / 6 : (c[i][j] + beta / 6) / (ci + beta);
          expect(Math.abs(a[i][j] - expected)).toBeLessThan(1e-15);
        }
      }
      const x = Float64Array.from({ length: 7 }, () => rng.next() - 0.3);
      const product = leftMultiply(rows, x, new Float64Array(7));
      const received = columnSums(rows);
      for (let j = 0; j < 7; j++) {
        const expected = a.reduce((acc, row, i) => acc + x[i] * row[j], 0);
        expect(Math.abs(product[j] - expected)).toBeLessThan(1e-14);
        expect(Math.abs(received[j] - a.reduce((acc, row) => acc + row[j], 0))).toBeLessThan(1e-14);
      }
    }
  });

  it("rejects a negative background with SETTING_BAD_VALUE", () => {
    const counts = countsFromDense([
      [0, 1],
      [1, 0],
    ]);
    let code = "";
    try {
      pointAttentionRows(counts, -1);
    } catch (error) {
      if (isPlumblineError(error)) code = error.code;
    }
    expect(code).toBe("SETTING_BAD_VALUE");
  });
});

describe("stationary vector against reference libraries", () => {
  it("agrees with graphology-metrics pagerank (alpha 1) and ml-matrix eigenvectors of Tᵀ", () => {
    // Reference libraries: graphology-metrics 2.4 pagerank (bare power method at alpha 1, edges
    // listener → speaker, weights = T including self-loops) and ml-matrix 6.15 EVD.
    const rng = createSeededRng(31337);
    for (let trial = 0; trial < 6; trial++) {
      const n = 5 + trial * 5;
      const sigma = [0.2, 0.5, 0.8][trial % 3];
      const rows = pointAttentionRows(countsFromDense(randomDenseCounts(n, 0.3, rng)), 0.4 * trial);
      const t = denseTransition(rows, sigma);
      const s = stationaryVector(rows, { selfWeight: sigma }).vector;

      const graph = new DirectedGraph({ allowSelfLoops: true });
      for (let i = 0; i < n; i++) graph.addNode(String(i));
      t.forEach((row, i) => {
        row.forEach((w, j) => {
          if (w > 0) graph.addEdge(String(i), String(j), { weight: w });
        });
      });
      const reference = pagerank(graph, {
        alpha: 1,
        tolerance: 1e-15,
        maxIterations: 200_000,
        getEdgeWeight: "weight",
      });
      for (let i = 0; i < n; i++) expect(Math.abs(reference[String(i)] - s[i])).toBeLessThan(1e-9);

      const eigen = mlMatrixStationary(t);
      for (let i = 0; i < n; i++) expect(Math.abs(eigen[i] - s[i])).toBeLessThan(1e-9);
    }
  });

  it("solves a nearly split room exactly, where the power method would crawl (GTH)", () => {
    // Two pairs joined by links of weight ε: |λ2| of the lazy chain is 1 − O(ε), so power
    // iteration from (1,0,0,0) would need ~1e10 rounds. The balance equations, solved by hand,
    // give π0 = π2 = π3 and π1 = (1 − ε')π0 with ε' = ε/(5 + ε) the weak links' row share.
    // The dense GTH solve is Grassmann, Taksar & Heyman 1985 (Operations Research 33:1107–1116).
    const weak = 1e-9;
    const dense = [
      [0, 5, weak, 0],
      [5, 0, 0, 0],
      [0, 0, 0, 5],
      [weak, 0, 5, 0],
    ];
    const rows = pointAttentionRows(countsFromDense(dense), 0);
    const { vector, iterations } = stationaryVector(rows, {
      selfWeight: 0.5,
      maxIterations: 2000,
      start: Float64Array.of(1, 0, 0, 0),
    });
    const e = weak / (5 + weak);
    const total = 4 - e;
    const expected = [1 / total, (1 - e) / total, 1 / total, 1 / total];
    for (let j = 0; j < 4; j++) expect(Math.abs(vector[j] - expected[j])).toBeLessThan(1e-12);
    expect(iterations).toBeLessThan(2000);
  });

  it("throws NO_CONVERGENCE when the room also has a closed group and the budget runs out", () => {
    // The same nearly split pair of pairs plus members 4 and 5 who only attend to each other:
    // the chain is reducible, GTH finds no pivot, and from (1,0,…) the power method cannot
    // settle within 2,000 rounds.
    const weak = 1e-9;
    const dense = [
      [0, 5, weak, 0, 0, 0],
      [5, 0, 0, 0, 0, 0],
      [0, 0, 0, 5, 0, 0],
      [weak, 0, 5, 0, 0, 0],
      [0, 0, 0, 0, 0, 3],
      [0, 0, 0, 0, 3, 0],
    ];
    const rows = pointAttentionRows(countsFromDense(dense), 0);
    let code = "";
    try {
      stationaryVector(rows, {
        selfWeight: 0.5,
        maxIterations: 2000,
        start: Float64Array.of(1, 0, 0, 0, 0, 0),
      });
    } catch (error) {
      if (isPlumblineError(error)) code = error.code;
    }
    expect(code).toBe("NO_CONVERGENCE");
  });
});

describe("second eigenvalue: iterative against dense", () => {
  it("agrees with the dense spectrum of ml-matrix on random chains, n = 50–300", () => {
    // Reference: ml-matrix EigenvalueDecomposition (JAMA port). Achieved agreement is ~1e-14;
    // the assertion allows 1e-9.
    const rng = createSeededRng(2003);
    const cases: [number, number, number, number][] = [
      [50, 0.1, 0, 0],
      [50, 0.05, 0.2, 0.5],
      [80, 0.3, 1, 0],
      [160, 0.05, 0.5, 0.5],
      [300, 0.03, 1, 0.3],
    ];
    for (const [n, density, beta, sigma] of cases) {
      const rows = pointAttentionRows(countsFromDense(randomDenseCounts(n, density, rng)), beta);
      const s = stationaryVector(rows, { selfWeight: sigma }).vector;
      const dense = denseSecondEigenvalue(rows, sigma);
      const iterative = iterativeSecondEigenvalue(rows, sigma, s);
      expect(Math.abs(dense - iterative)).toBeLessThan(1e-9);
      expect(Math.abs(secondEigenvalue(rows, sigma, s) - dense)).toBeLessThan(1e-9);
    }
  });
});
