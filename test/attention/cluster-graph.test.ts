/**
 * The graph Louvain runs on (src/attention/louvain-clusters.ts `clusterGraph`): by definition
 * (Blondel et al. 2008 on the symmetrised graph; DESIGN.md §4 step 9) one undirected edge per
 * pair {i, j} with weight C_ij + C_ji, no self-loops, here computed densely from the matrix and
 * compared edge by edge, keys and insertion order included (Louvain's result depends on the order
 * it meets the edges in).
 */
import { describe, expect, it } from "vitest";
import { clusterGraph } from "../../src/attention/louvain-clusters.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, randomDenseCounts } from "../influence/fixtures.js";

describe("clusterGraph", () => {
  it("has one edge per pair with weight C_ij + C_ji, in ascending i·n + j order", () => {
    const rng = createSeededRng(3);
    for (const [n, density] of [
      [2, 1],
      [7, 0.5],
      [30, 0.2],
      [60, 0.05],
    ] as const) {
      const dense = randomDenseCounts(n, density, rng);
      const built = clusterGraph(countsFromDense(dense));
      const expected: string[] = [];
      for (let i = 0; i < n; i++) {
        for (let j = i + 1; j < n; j++) {
          if (dense[i][j] > 0 || dense[j][i] > 0) {
            expected.push(`${i * n + j} ${i} ${j} ${dense[i][j] + dense[j][i]}`);
          }
        }
      }
      const got: string[] = [];
      built?.graph.forEachEdge((key, attributes, source, target) => {
        got.push(`${key} ${source} ${target} ${attributes.weight}`);
      });
      expect(got).toEqual(expected);
      expect(built?.graph.order ?? n).toBe(n);
    }
  });

  it("is null when no two members exchanged attention", () => {
    expect(
      clusterGraph(
        countsFromDense([
          [0, 0],
          [0, 0],
        ]),
      ),
    ).toBeNull();
  });
});
