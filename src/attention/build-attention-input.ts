/**
 * @module build-attention-input
 * The attention layer's one entry for analysis: ledger snapshot → signals (collect-signals) →
 * a graphology DirectedGraph with the signal weights summed per ordered pair → the compressed
 * sparse row count matrix C of DESIGN.md §4 step 3 (rows by sorted member id, columns ascending,
 * no diagonal), plus the structure the influence code needs: closed groups of the β = 0 view and,
 * when asked for and no labels exist, seeded Louvain clusters. CSR is the standard sparse layout
 * (common practice); no graph type leaves this folder.
 */
import { DirectedGraph } from "graphology";
import type { AttentionInput, CountMatrix } from "../domain/counts.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisSettings } from "../domain/settings.js";
import { deriveSeed } from "../ports/rng.js";
import { findClosedGroups } from "./closed-groups.js";
import { collectSignals, type Signal } from "./collect-signals.js";
import { louvainClusters } from "./louvain-clusters.js";

type WeightedEdge = { weight: number };

/**
 * Builds the `AttentionInput` of `snapshot` at `settings.until`. The Louvain seed is
 * `options.seed`, else `settings.seed`, else `deriveSeed(channel, until)`.
 */
export function buildAttentionInput(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings & { readonly until: number },
  options: { readonly seed?: number } = {},
): AttentionInput {
  const set = collectSignals(snapshot, {
    until: settings.until,
    windowDays: settings.windowDays,
    halfLifeDays: settings.halfLifeDays,
    replyWeight: settings.replyWeight,
    mentionWeight: settings.mentionWeight,
  });
  const counts = countMatrixFromSignals(set.members, set.signals);
  const wantClusters = settings.clusters && set.labels.every((label) => label === null);
  const seed = options.seed ?? settings.seed ?? deriveSeed(snapshot.channel, settings.until);
  return {
    counts,
    signals: set.count,
    closedGroups: findClosedGroups(counts),
    named: set.named,
    labels: set.labels,
    clusters: wantClusters ? louvainClusters(counts, { seed }) : null,
  };
}

/**
 * Sums `signals` per ordered pair of `members` (sorted ascending, containing every endpoint)
 * into a CSR `CountMatrix`. Self-signals and pairs summing to 0 are left out.
 */
export function countMatrixFromSignals(
  members: readonly string[],
  signals: readonly Signal[],
): CountMatrix {
  const graph = new DirectedGraph<Record<string, never>, WeightedEdge>();
  for (const member of members) graph.addNode(member);
  for (const signal of signals) {
    if (signal.from === signal.to) continue;
    if (!graph.hasNode(signal.from) || !graph.hasNode(signal.to)) {
      throw new Error(`signal ${signal.from} → ${signal.to} names a member outside the list`);
    }
    graph.updateDirectedEdge(signal.from, signal.to, (attributes) => ({
      weight: (attributes.weight ?? 0) + signal.weight,
    }));
  }
  return toCsr(graph, members);
}

function toCsr(
  graph: DirectedGraph<Record<string, never>, WeightedEdge>,
  members: readonly string[],
): CountMatrix {
  const index = new Map<string, number>();
  members.forEach((member, i) => {
    index.set(member, i);
  });
  const n = members.length;
  const rowPtr = new Int32Array(n + 1);
  const colIdx = new Int32Array(graph.size);
  const values = new Float64Array(graph.size);
  let nnz = 0;
  const row: { col: number; weight: number }[] = [];
  for (let i = 0; i < n; i++) {
    row.length = 0;
    graph.forEachOutEdge(members[i], (_edge, attributes, _source, target) => {
      const col = index.get(target);
      if (col !== undefined && attributes.weight > 0) row.push({ col, weight: attributes.weight });
    });
    row.sort((a, b) => a.col - b.col);
    for (const entry of row) {
      colIdx[nnz] = entry.col;
      values[nnz] = entry.weight;
      nnz++;
    }
    rowPtr[i + 1] = nnz;
  }
  return {
    members: Object.freeze([...members]),
    rowPtr,
    colIdx: colIdx.slice(0, nnz),
    values: values.slice(0, nnz),
  };
}
