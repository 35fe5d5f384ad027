import { fileURLToPath } from "node:url";
import { UndirectedGraph } from "graphology";
import karateModule from "graphology-generators/social/karate-club.js";
import modularityModule from "graphology-metrics/graph/modularity.js";
import { describe, expect, it } from "vitest";
import { buildAttentionInput } from "../../src/attention/build-attention-input.js";
import { buildLedgers, latestEventTime } from "../../src/attention/channel-ledger.js";
import { louvainClusters } from "../../src/attention/louvain-clusters.js";
import { readEventLogFile } from "../../src/attention/read-event-log.js";
import type { AttentionInput } from "../../src/domain/counts.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { type AnalysisSettings, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { consentAll, day, makeGroup, makeMessage, T0 } from "./ledger-builders.js";

/** CommonJS packages: Node's ESM loader hands over `module.exports`; the typings say `.default`. */
function interop<T>(module: { default: T }): T {
  return (module as unknown as { default?: T }).default ?? (module as unknown as T);
}
const karateClub = interop(karateModule);
const modularity = interop(modularityModule);

function snapshotOf(events: readonly ChatEvent[]): LedgerSnapshot {
  const snapshot = buildLedgers(events).get("c1");
  if (snapshot === undefined) throw new Error("no channel c1 in the test log");
  return snapshot;
}

const settings = (
  until: number,
  overrides: Partial<AnalysisSettings> = {},
): AnalysisSettings & { until: number } => ({
  ...DEFAULT_SETTINGS,
  halfLifeDays: 0,
  ...overrides,
  until,
});

describe("count matrix", () => {
  it("sums signals per pair into sorted CSR rows without a diagonal", () => {
    const events = [
      ...consentAll(["cy", "ana", "bo", "dee"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo", "cy"], at: day(1) }),
      makeMessage({ id: "m2", author: "ana", mentions: ["bo"], at: day(2) }),
      makeMessage({ id: "m3", author: "bo", parent: "m1", mentions: ["ana"], at: day(2) }),
      makeMessage({ id: "m4", author: "dee", at: day(2) }),
    ];
    const input = buildAttentionInput(snapshotOf(events), settings(day(3), { replyWeight: 2 }));
    expect(input.counts.members).toEqual(["ana", "bo", "cy", "dee"]);
    expect([...input.counts.rowPtr]).toEqual([0, 2, 3, 3, 3]);
    expect([...input.counts.colIdx]).toEqual([1, 2, 0]);
    // ana→bo: two mentions; ana→cy: one; bo→ana: reply (2) + mention (1).
    expect([...input.counts.values]).toEqual([2, 1, 3]);
    expect(input.signals).toBe(5);
    // dee and cy never attend to anyone, so their even rows reach everyone: one closed group.
    expect(input.closedGroups).toEqual([[0, 1, 2, 3]]);
    expect(input.named).toEqual([false, false, false, false]);
    expect(input.labels).toEqual([null, null, null, null]);
  });

  it("computes clusters only when asked for and no active member has a label", () => {
    const events = [
      ...consentAll(["ana", "bo", "cy"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(1) }),
      makeMessage({ id: "m2", author: "bo", mentions: ["cy"], at: day(1) }),
    ];
    const plain = buildAttentionInput(snapshotOf(events), settings(day(2)));
    expect(plain.clusters).not.toBeNull();
    expect(plain.clusters?.groups.flat().sort()).toEqual([0, 1, 2]);
    const off = buildAttentionInput(snapshotOf(events), settings(day(2), { clusters: false }));
    expect(off.clusters).toBeNull();
    const labelled = [...events, makeGroup("cy", "night", T0)];
    const withLabel = buildAttentionInput(snapshotOf(labelled), settings(day(2)));
    expect(withLabel.labels).toEqual([null, null, "night"]);
    expect(withLabel.clusters).toBeNull();
    const silent = buildAttentionInput(
      snapshotOf([...consentAll(["ana"]), makeMessage({ id: "m", author: "ana" })]),
      settings(day(1)),
    );
    expect(silent.clusters).toBeNull(); // no edges, no clusters
    expect(silent.counts.members).toEqual(["ana"]);
  });
});

describe("the DESIGN.md §3 example log, end to end", () => {
  it("counts ana's edited mentions and drops the deleted reply", async () => {
    const path = new URL("../fixtures/logs/design-example.jsonl", import.meta.url);
    const { events } = await readEventLogFile(fileURLToPath(path));
    const until = latestEventTime(events);
    expect(until).toBe(Date.UTC(2026, 10, 2, 9, 10));
    const snapshot = buildLedgers(events, { until: until ?? 0 }).get("c1");
    if (snapshot === undefined || until === null) throw new Error("example log lost channel c1");
    const input = buildAttentionInput(snapshot, { ...DEFAULT_SETTINGS, until });
    expect(input.counts.members).toEqual(["ana", "bo", "cy"]);
    expect(input.signals).toBe(2);
    expect([...input.counts.rowPtr]).toEqual([0, 2, 2, 2]);
    expect([...input.counts.colIdx]).toEqual([1, 2]);
    // Message m1 is 5 minutes old with the default 14-day half-life: weight 0.5^(5 / 20160).
    for (const w of input.counts.values) expect(w).toBeCloseTo(0.5 ** (5 / 20_160), 12);
    expect(input.named).toEqual([true, false, false]);
    expect(input.labels).toEqual([null, null, "night-shift"]);
    expect(input.clusters).toBeNull();
    expect(input.closedGroups).toEqual([[0, 1, 2]]);
  });
});

// Zachary (1977), "An Information Flow Model for Conflict and Fission in Small Groups",
// J. Anthropological Research 33:452–473: 34 members, 78 ties (data as shipped by
// graphology-generators). Each tie becomes mutual equal attention: u mentions v and v mentions u,
// at the same time, without decay.
function karateLedger(): LedgerSnapshot {
  const graph = karateClub(UndirectedGraph);
  const id = (node: string): string => `k${node.padStart(2, "0")}`;
  const events: ChatEvent[] = consentAll(graph.nodes().map(id), "named");
  let k = 0;
  graph.forEachEdge((_edge, _attributes, u, v) => {
    events.push(makeMessage({ id: `e${k++}`, author: id(u), mentions: [id(v)], at: day(1) }));
    events.push(makeMessage({ id: `e${k++}`, author: id(v), mentions: [id(u)], at: day(1) }));
  });
  return snapshotOf(events);
}

describe("Zachary's karate club", () => {
  const snapshot = karateLedger();
  const input: AttentionInput = buildAttentionInput(snapshot, settings(day(1)), { seed: 7 });

  it("has 34 active members, 78 ties and 156 signals", () => {
    const { counts } = input;
    expect(counts.members).toHaveLength(34);
    expect(input.signals).toBe(156);
    expect(counts.colIdx).toHaveLength(156);
    let ties = 0;
    for (let i = 0; i < 34; i++) {
      for (let e = counts.rowPtr[i]; e < counts.rowPtr[i + 1]; e++) {
        if (counts.colIdx[e] > i) ties++;
        expect(counts.values[e]).toBe(1);
      }
    }
    expect(ties).toBe(78);
    expect(input.named.every(Boolean)).toBe(true);
    // A connected undirected network is one strongly connected, closed group.
    expect(input.closedGroups).toEqual([[...Array(34).keys()]]);
  });

  it("seeded Louvain reaches modularity near the proven optimum", () => {
    const clusters = input.clusters;
    expect(clusters).not.toBeNull();
    if (clusters === null) return;
    // Brandes et al. 2008, "On Modularity Clustering", IEEE TKDE 20(2):172–188: the optimum for the
    // karate club is Q = 0.4198 (from memory; 4 communities). Louvain is a greedy heuristic and may
    // stop in a local optimum just below it (Blondel et al. 2008 report 0.42 rounded), so the lower
    // bound 0.40 admits the seed-dependent local optima seen here (0.4156, 0.4188, 0.4198) yet fails
    // a trivial partition or the observed two-faction split (Q ≈ 0.358 by graphology-metrics,
    // asserted below); the upper bound is the optimum itself, plus rounding of its 4 printed digits.
    expect(clusters.modularity).toBeGreaterThanOrEqual(0.4);
    expect(clusters.modularity).toBeLessThanOrEqual(0.4198 + 5e-5);
    expect(clusters.groups.flat().sort((a, b) => a - b)).toEqual([...Array(34).keys()]);
    expect(clusters.groups.map((g) => g[0])).toEqual(
      [...clusters.groups.map((g) => g[0])].sort((a, b) => a - b),
    );

    // Independent check: graphology-metrics' modularity of the same partition on the raw data.
    const graph = karateClub(UndirectedGraph);
    const community = new Map<string, number>();
    clusters.groups.forEach((group, c) => {
      for (const i of group) community.set(String(i), c);
    });
    const q = modularity(graph, { getNodeCommunity: (node) => community.get(node) ?? -1 });
    expect(clusters.modularity).toBeCloseTo(q, 10);
    const factions = modularity(graph, { getNodeCommunity: "club" });
    expect(factions).toBeLessThan(0.4);
  });

  it("is deterministic for a seed", () => {
    const again = buildAttentionInput(snapshot, settings(day(1)), { seed: 7 });
    expect(again.clusters).toEqual(input.clusters);
    const direct = louvainClusters(input.counts, { seed: 7 });
    expect(direct).toEqual(input.clusters);
    for (const seed of [1, 2, 3]) {
      const q = louvainClusters(input.counts, { seed })?.modularity ?? 0;
      expect(q).toBeGreaterThanOrEqual(0.4);
      expect(louvainClusters(input.counts, { seed })).toEqual(
        louvainClusters(input.counts, { seed }),
      );
    }
  });
});
