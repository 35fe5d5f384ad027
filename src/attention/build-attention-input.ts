/**
 * @module build-attention-input
 * The attention layer's one entry for analysis: ledger snapshot → signals (collect-signals) →
 * the compressed sparse row count matrix C of DESIGN.md §4 step 3 (signal weights summed per
 * ordered pair; rows by sorted member id, columns ascending, no diagonal) with each row's Kish
 * factor Σw/Σw² (Kish 1965, "Survey Sampling", Wiley: the effective sample size of
 * weighted data is (Σw)²/Σw², so k_i·c_i signals of weight 1 carry the row's information), plus the structure the
 * influence code needs: closed groups of the β = 0 view and, when asked for and no labels exist,
 * seeded Louvain clusters on a graphology graph. C is summed straight into CSR with a counting
 * pass (common practice): going through graphology's per-signal edge updates was 20× slower at
 * 200,000 signals and gave the same matrix. No graph type leaves this folder.
 */
import type { AttentionInput, CountMatrix } from "../domain/counts.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisSettings } from "../domain/settings.js";
import { deriveSeed } from "../ports/rng.js";
import { findClosedGroups } from "./closed-groups.js";
import { collectSignals, type Signal } from "./collect-signals.js";
import { type Clusters, clusterGraph, louvainClusters } from "./louvain-clusters.js";

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
  // The prior's groups use a fixed Louvain seed, so the seed moves only the intervals. Both runs
  // share one graph.
  const graph = clusterGraph(counts);
  const priorClusters = louvainClusters(counts, { seed: PRIOR_GROUP_SEED, graph });
  return {
    counts,
    signals: set.count,
    broadcasts: set.broadcasts,
    closedGroups: findClosedGroups(counts),
    named: set.named,
    labels: set.labels,
    clusters: wantClusters ? louvainClusters(counts, { seed, graph }) : null,
    priorGroups: priorGroupsOf(counts.members.length, priorClusters),
  };
}

/** Louvain seed of the prior's groups (fixed: the point estimate must not depend on `seed`). */
export const PRIOR_GROUP_SEED = 1;

/** Below this modularity a partition is treated as no group structure (common practice, ~0.3). */
export const PRIOR_GROUP_MODULARITY = 0.3;

/** Member → prior group: the Louvain clusters when their modularity is at least 0.3, else one group. */
export function priorGroupsOf(n: number, clusters: Clusters | null): Int32Array {
  const out = new Int32Array(n);
  if (!clusters || !(clusters.modularity >= PRIOR_GROUP_MODULARITY)) return out;
  clusters.groups.forEach((members, g) => {
    for (const i of members) out[i] = g;
  });
  return out;
}

/**
 * Sums `signals` per ordered pair of `members` (sorted ascending, containing every endpoint)
 * into a CSR `CountMatrix`. Self-signals and pairs summing to 0 are left out.
 */
export function countMatrixFromSignals(
  members: readonly string[],
  signals: readonly Signal[],
): CountMatrix {
  const n = members.length;
  const index = new Map<string, number>();
  members.forEach((member, i) => {
    index.set(member, i);
  });
  // Counting pass: signals per source row, then each signal's (target, weight) in row order.
  const from = new Int32Array(signals.length);
  const to = new Int32Array(signals.length);
  const perRow = new Int32Array(n + 1);
  signals.forEach((signal, k) => {
    const i = index.get(signal.from);
    const j = index.get(signal.to);
    if (i === undefined || j === undefined) {
      throw new Error(`signal ${signal.from} → ${signal.to} names a member outside the list`);
    }
    from[k] = i;
    to[k] = j;
    perRow[i + 1]++;
  });
  for (let i = 0; i < n; i++) perRow[i + 1] += perRow[i];
  const cursor = perRow.slice(0, n);
  const order = new Int32Array(signals.length);
  for (let k = 0; k < signals.length; k++) order[cursor[from[k]]++] = k;
  // Per row: sum into a dense scratch row, remember touched columns, emit them sorted.
  const scratch = new Float64Array(n);
  const seen = new Uint8Array(n);
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  const kish = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const touched: number[] = [];
    let sum = 0;
    let squares = 0;
    for (let p = perRow[i]; p < perRow[i + 1]; p++) {
      const k = order[p];
      const j = to[k];
      if (j === i) continue;
      if (!seen[j]) {
        seen[j] = 1;
        touched.push(j);
      }
      const w = signals[k].weight;
      scratch[j] += w;
      sum += w;
      squares += w * w;
    }
    kish[i] = squares > 0 ? sum / squares : 1;
    touched.sort((a, b) => a - b);
    for (const j of touched) {
      if (scratch[j] > 0) {
        cols.push(j);
        vals.push(scratch[j]);
      }
      scratch[j] = 0;
      seen[j] = 0;
    }
    rowPtr[i + 1] = cols.length;
  }
  return {
    members: Object.freeze([...members]),
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(vals),
    kish,
  };
}
