/**
 * @module louvain-clusters
 * Unnamed clusters for channels without group labels (DESIGN.md §4 step 9): the Louvain method
 * (Blondel, Guillaume, Lambiotte & Lefebvre 2008, "Fast unfolding of communities in large
 * networks", J. Stat. Mech. P10008; graphology-communities-louvain) on the undirected graph with
 * weight C_ij + C_ji between i and j and no self-loops (self-weight would count as internal weight
 * and split clusters). Randomness comes from the seeded generator, so a seed fixes the partition;
 * clusters are relabelled canonically, ordered by their smallest member index.
 *
 * A move budget: graphology-communities-louvain 2.0.2 can move nodes round a cycle for ever on
 * the aggregated graph of a later level, whose nodes carry self-loops (its own note on moving a
 * node back to a singleton says that delta is only right without self-loops; the burst bench
 * found a 65-member channel and seed where it never returned). Each run may move or isolate a
 * node at most `MOVE_BUDGET_PER_NODE` times per node (plus a floor); past that the run is given up
 * and tried again with the next seeds of the same generator, then in fixed order, and when
 * every try is given up the channel has no clusters (null), as if it had no group structure.
 */
import { UndirectedGraph } from "graphology";
import louvainModule from "graphology-communities-louvain";
import louvainIndices from "graphology-indices/louvain.js";
import type { CountMatrix, IndexGroups } from "../domain/counts.js";
import { createSeededRng } from "../ports/rng.js";

type Louvain = typeof louvainModule.default;
// The package is CommonJS: under Node's ESM loader the default import is `module.exports` (the
// function itself), while its typings describe `module.exports.default`. Accept either shape.
const louvain: Louvain =
  (louvainModule as unknown as { default?: Louvain }).default ??
  (louvainModule as unknown as Louvain);

/** Moves or isolations allowed per node in one Louvain run, and the floor for small graphs. */
export const MOVE_BUDGET_PER_NODE = 200;
export const MOVE_BUDGET_FLOOR = 20_000;
/** Runs tried after the first when a run is given up: more seeds, then one in fixed order. */
const RETRY_SEEDS = 2;

class MoveBudgetSpent extends Error {}

/** Moves left in the run in progress (the library is synchronous: one run at a time per thread). */
let movesLeft = Number.POSITIVE_INFINITY;
{
  // The index class is the one graphology-communities-louvain requires (one install, flat).
  const proto = louvainIndices.UndirectedLouvainIndex.prototype as unknown as Record<
    "move" | "isolate",
    (...args: unknown[]) => unknown
  >;
  for (const name of ["move", "isolate"] as const) {
    const original = proto[name];
    proto[name] = function budgeted(this: unknown, ...args: unknown[]) {
      if (--movesLeft < 0) throw new MoveBudgetSpent("Louvain move budget spent");
      return original.apply(this, args);
    };
  }
}

export interface Clusters {
  /** A partition of all member indices; each group ascending, groups by smallest index. */
  readonly groups: IndexGroups;
  /** Newman–Girvan modularity of the partition on C + Cᵀ (resolution 1). */
  readonly modularity: number;
}

/** The undirected graph of C + Cᵀ that Louvain runs on (null: no attention between members). */
export interface ClusterGraph {
  readonly n: number;
  readonly graph: UndirectedGraph<Record<string, never>, { weight: number }>;
}

/**
 * Builds the graph once, so several seeded runs on the same counts (the prior's groups and the
 * report's clusters) do not rebuild it: building took as long as one Louvain run at 2,000 members.
 */
export function clusterGraph(counts: CountMatrix): ClusterGraph | null {
  const n = counts.members.length;
  const { rowPtr, colIdx, values } = counts;
  // Cᵀ by a counting pass: for each column j, the rows i that attend to j, in row order.
  const columnPtr = new Int32Array(n + 1);
  for (let k = 0; k < rowPtr[n]; k++) columnPtr[colIdx[k] + 1]++;
  for (let j = 0; j < n; j++) columnPtr[j + 1] += columnPtr[j];
  const cursor = columnPtr.slice(0, n);
  const transposedRow = new Int32Array(rowPtr[n]);
  const transposedValue = new Float64Array(rowPtr[n]);
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const t = cursor[colIdx[k]]++;
      transposedRow[t] = i;
      transposedValue[t] = values[k];
    }
  }
  const graph = new UndirectedGraph<Record<string, never>, { weight: number }>();
  for (let i = 0; i < n; i++) graph.addNode(String(i));
  // C + Cᵀ per unordered pair {i < j}: C_ij (row i) then C_ji (row j) summed from 0 in that order,
  // the edges added by ascending i·n + j. The same sums in the same order as the map of pair keys
  // it replaced, without the map and the sort of its keys (a third of building the graph).
  const sum = new Float64Array(n);
  const touched = new Uint8Array(n);
  const partners: number[] = [];
  for (let i = 0; i < n; i++) {
    partners.length = 0;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      const j = colIdx[k];
      if (j <= i || !(values[k] > 0)) continue;
      if (touched[j] === 0) {
        touched[j] = 1;
        sum[j] = 0;
        partners.push(j);
      }
      sum[j] += values[k];
    }
    for (let t = columnPtr[i]; t < columnPtr[i + 1]; t++) {
      const j = transposedRow[t];
      if (j <= i || !(transposedValue[t] > 0)) continue;
      if (touched[j] === 0) {
        touched[j] = 1;
        sum[j] = 0;
        partners.push(j);
      }
      sum[j] += transposedValue[t];
    }
    partners.sort((a, b) => a - b);
    for (const j of partners) {
      touched[j] = 0;
      const key = i * n + j;
      // An explicit key: graphology's generated keys cost as much as the rest of the build.
      graph.addUndirectedEdgeWithKey(String(key), String(i), String(j), { weight: sum[j] });
    }
  }
  if (graph.size === 0) return null;
  return { n, graph };
}

/** Seeded Louvain clusters of C + Cᵀ; null when no two members exchanged any attention. */
export function louvainClusters(
  counts: CountMatrix,
  options: { seed: number; graph?: ClusterGraph | null },
): Clusters | null {
  const built = options.graph === undefined ? clusterGraph(counts) : options.graph;
  if (built === null) return null;
  const { n, graph } = built;
  const rng = createSeededRng(options.seed);
  const tries = [...Array.from({ length: 1 + RETRY_SEEDS }, () => true), false];
  let result: ReturnType<Louvain["detailed"]> | null = null;
  for (const randomWalk of tries) {
    movesLeft = Math.max(MOVE_BUDGET_FLOOR, MOVE_BUDGET_PER_NODE * n);
    try {
      // Each try draws on from the same generator, so a retry is seeded and reproducible.
      result = louvain.detailed(graph, {
        getEdgeWeight: "weight",
        rng: () => rng.next(),
        randomWalk,
      });
      break;
    } catch (error) {
      if (!(error instanceof MoveBudgetSpent)) throw error;
    } finally {
      movesLeft = Number.POSITIVE_INFINITY;
    }
  }
  if (result === null) return null;

  const byLabel = new Map<number, number[]>();
  for (let i = 0; i < n; i++) {
    const label = result.communities[String(i)];
    const members = byLabel.get(label);
    if (members === undefined) byLabel.set(label, [i]);
    else members.push(i);
  }
  // Members were visited in ascending order, so each list is sorted and starts at its minimum.
  const groups = [...byLabel.values()].sort((a, b) => a[0] - b[0]);
  return { groups, modularity: result.modularity };
}
