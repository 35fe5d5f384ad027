/**
 * The Louvain move budget (src/attention/louvain-clusters.ts): a graph and seed on which
 * graphology-communities-louvain 2.0.2 moves nodes round a cycle for ever (found by the burst
 * bench on 2026-12-04; without the budget this file's first test never returns) still get a
 * partition, whose Newman–Girvan modularity (Newman & Girvan 2004, "Finding and evaluating
 * community structure in networks", Phys. Rev. E 69, 026113) is computed by graphology-metrics,
 * an implementation apart from the one under test.
 */
import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import { UndirectedGraph } from "graphology";
import modularityModule from "graphology-metrics/graph/modularity.js";
import { describe, expect, it } from "vitest";
import { clusterGraph, louvainClusters } from "../../src/attention/louvain-clusters.js";
import type { CountMatrix } from "../../src/domain/counts.js";

type Modularity = typeof modularityModule.default;
const modularity: Modularity =
  (modularityModule as unknown as { default?: Modularity }).default ??
  (modularityModule as unknown as Modularity);

const fixture = JSON.parse(
  readFileSync(
    fileURLToPath(new URL("../fixtures/louvain/cycle-65.json", import.meta.url)),
    "utf8",
  ),
) as { seed: number; n: number; rowPtr: number[]; colIdx: number[]; values: number[] };

const counts = {
  members: Array.from({ length: fixture.n }, (_, i) => `m${String(i).padStart(2, "0")}`),
  rowPtr: Int32Array.from(fixture.rowPtr),
  colIdx: Int32Array.from(fixture.colIdx),
  values: Float64Array.from(fixture.values),
} as unknown as CountMatrix;

/** C + Cᵀ as an undirected graph built here, apart from the code under test. */
function referenceGraph(): UndirectedGraph {
  const graph = new UndirectedGraph();
  for (let i = 0; i < fixture.n; i++) graph.addNode(String(i));
  for (let i = 0; i < fixture.n; i++) {
    for (let k = fixture.rowPtr[i]; k < fixture.rowPtr[i + 1]; k++) {
      const j = fixture.colIdx[k];
      if (j === i) continue;
      const edge = graph.edge(String(i), String(j));
      if (edge === undefined) {
        graph.addEdge(String(i), String(j), { weight: fixture.values[k] });
      } else {
        graph.updateEdgeAttribute(edge, "weight", (w) => (w as number) + fixture.values[k]);
      }
    }
  }
  return graph;
}

describe("Louvain with a move budget", () => {
  it("returns a partition on the graph and seed where the library cycles for ever", () => {
    const clusters = louvainClusters(counts, { seed: fixture.seed });
    expect(clusters).not.toBeNull();
    const members = clusters?.groups.flat().sort((a, b) => a - b) ?? [];
    expect(members).toEqual(Array.from({ length: fixture.n }, (_, i) => i));
    const community = new Map<string, number>();
    clusters?.groups.forEach((group, c) => {
      for (const i of group) community.set(String(i), c);
    });
    const q = modularity(referenceGraph(), {
      getNodeCommunity: (node) => community.get(node) ?? -1,
    });
    // Not the trivial partition (0): graphology-metrics gives 0.3077 (networkx 3.6.1
    // community.modularity agrees to 1e-12, checked by hand 2026-12-04). The library's own
    // `modularity` for this run is 0.3607: it differs on weighted multi-level runs of this graph
    // at every seed tried (seed 1: 0.3246 against 0.3665), so it is not compared here.
    expect(q).toBeCloseTo(0.3077, 3);
  });

  it("is reproducible for the seed, and leaves other seeds' runs as they were", () => {
    const graph = clusterGraph(counts);
    expect(louvainClusters(counts, { seed: fixture.seed, graph })).toEqual(
      louvainClusters(counts, { seed: fixture.seed }),
    );
    // Seed 1 (the prior's groups) returns at its first try: its result is the library's own.
    const first = louvainClusters(counts, { seed: 1, graph });
    expect(first?.groups.flat()).toHaveLength(fixture.n);
  });
});
