/**
 * End-to-end checks of the analysis report (log events → ledger → signals → AnalysisReport)
 * against closed forms from outside the project.
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { type AnalysisSettings, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { mentionEvents, mutualPairs, snapshotOf, T0 } from "../report/log-builders.js";
import { karateTies } from "../support/karate-club.js";

const exact: AnalysisSettings = {
  ...DEFAULT_SETTINGS,
  halfLifeDays: 0,
  samples: 0,
  minSignals: 1,
  seed: 7,
  clusters: false,
};

describe("analysis report against closed forms", () => {
  // Reversibility (Levin, Peres & Wilmer, Markov Chains and Mixing Times, 2nd ed. 2017, §1.6,
  // detailed balance; from memory): for A = D⁻¹W with W symmetric, the stationary vector is s_i = Σ_j W_ij / Σ W.
  // With background β the weights are W_ij = C_ij + β/(n−1) off the diagonal, still symmetric,
  // so s_i = (c_i + β) / (Σ C + nβ) (derived from the same fact).
  it("Zachary's karate club as mutual equal attention: shares are degree shares (β = 0)", () => {
    // Zachary (1977), "An information flow model for conflict and fission in small groups",
    // J. Anthropological Research 33:452–473; the 78 ties as shipped by graphology-generators.
    const ties = karateTies();
    expect(ties).toHaveLength(78);
    const report = analyzeSnapshot(snapshotOf(mentionEvents(mutualPairs(ties))), {
      ...exact,
      background: 0,
    });
    expect(report.members).toBe(34);
    expect(report.signals).toBe(156);
    const influence = report.influence ?? [];
    // Degrees as published in the dataset: 17 and 16 for the two leaders.
    expect(influence[0].share).toBeCloseTo(17 / 156, 6);
    expect(influence[1].share).toBeCloseTo(16 / 156, 6);
    const sumSq = influence.reduce((s, e) => s + e.share * e.share, 0);
    expect(report.effectiveVoices?.value).toBeCloseTo(1 / sumSq, 3);
    expect(report.consensus?.closedGroups).toBe(1);
    expect(report.consensus?.reached).toBe(true);
  });

  it("the prior vanishes with many signals: karate club ×50 gives the degree shares (auto)", () => {
    // The model's limit is the truth (DESIGN.md §4.4): as counts grow, Ĉ_ij/(ĉ_i + α_i) → C_ij/c_i
    // and the shares tend to the β = 0 degree shares (reversibility, as above).
    const report = analyzeSnapshot(snapshotOf(mentionEvents(mutualPairs(karateTies(), 50))), exact);
    expect(report.settings.background).toBe("auto");
    const influence = report.influence ?? [];
    expect(Math.abs(influence[0].share - 17 / 156)).toBeLessThan(0.004);
    expect(Math.abs(influence[1].share - 16 / 156)).toBeLessThan(0.004);
    const total = influence.reduce((s, e) => s + e.share, 0);
    expect(total).toBeCloseTo(1, 5);
  });

  it("a symmetric weighted ring (β = 0): s_i = c_i / Σ C, effective voices and HHI by definition", () => {
    // Five members on a ring with unequal tie strengths.
    const ties: [string, string, number][] = [
      ["a", "b", 4],
      ["b", "c", 1],
      ["c", "d", 2],
      ["d", "e", 3],
      ["e", "a", 5],
    ];
    const pairs = ties.flatMap(([u, v, w]) => [
      [u, v, w] as [string, string, number],
      [v, u, w] as [string, string, number],
    ]);
    const report = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), { ...exact, background: 0 });
    const degree: Record<string, number> = { a: 9, b: 5, c: 3, d: 5, e: 8 };
    const total = 30; // Σ C
    for (const entry of report.influence ?? []) {
      expect(entry.share).toBeCloseTo(degree[entry.member] / total, 6);
    }
    const s = Object.values(degree).map((d) => d / total);
    const sumSq = s.reduce((acc, x) => acc + x * x, 0);
    expect(report.effectiveVoices?.value).toBeCloseTo(1 / sumSq, 5);
    expect(report.balance).toBeCloseTo(1 / sumSq / 5, 5);
    // HHI is shown only for n ≥ 7 (DESIGN.md §4.7).
    expect(report.hhi).toBeNull();
    expect(report.concentration).toBeNull();
    // Ties by member id; sorted by share descending.
    expect(report.influence?.map((e) => e.member)).toEqual(["a", "e", "b", "d", "c"]);
    // Contributors to the top member's share sum to 1 (derived from s = sT with A_jj = 0).
    const parts = (report.contributors ?? []).reduce((acc, c) => acc + c.share, 0);
    expect(parts).toBeCloseTo(1, 5);
    expect(report.settings.priorStrength).toBe(0);
  });

  it("HHI against the 2023 Merger Guidelines, Guideline 1, for n ≥ 7", () => {
    // A star: everyone attends to the hub, the hub to everyone (U.S. DOJ & FTC 2023 Merger
    // Guidelines, §2.1 Guideline 1: an HHI above 1,800 is highly concentrated; from memory,
    // corroborated in notes/methods.md §5).
    const leaves = ["b", "c", "d", "e", "f", "g", "h"];
    const pairs = leaves.flatMap((l) => [
      [l, "a", 10] as [string, string, number],
      ["a", l, 1] as [string, string, number],
    ]);
    const report = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), exact);
    const hhi = report.hhi ?? 0;
    const sumSq = (report.influence ?? []).reduce((acc, e) => acc + e.share * e.share, 0);
    expect(hhi).toBe(Math.round(10000 * sumSq));
    expect(hhi).toBeGreaterThan(1800);
    expect(report.concentration).toBe("high");
    // Seven members mutually and evenly attentive: HHI = 10000/7 ≈ 1429, below the line.
    const even = analyzeSnapshot(
      snapshotOf(
        mentionEvents(
          mutualPairs(
            ["a", "b", "c", "d", "e", "f", "g"].flatMap((u, k, all) =>
              all.slice(k + 1).map((v) => [u, v] as [string, string]),
            ),
            5,
          ),
        ),
      ),
      exact,
    );
    expect(even.hhi).toBe(1429);
    expect(even.concentration).toBe("below-high");
    expect(report.top?.member).toBe("a");
  });

  it("too little data: no figures, and it says how much more is needed", () => {
    const report = analyzeSnapshot(
      snapshotOf(
        mentionEvents([
          ["a", "b", 2],
          ["b", "c", 1],
          ["c", "a", 1],
        ]),
      ),
      { ...DEFAULT_SETTINGS, seed: 1 },
    );
    expect(report.sufficient).toBe(false);
    expect(report.status).toBe("insufficient");
    expect(report.needed).toEqual({ members: 2, signals: 16 });
    expect(report.influence).toBeNull();
    expect(report.effectiveVoices).toBeNull();
  });

  it("β = 0 with two closed groups gives no shares (Seneta 2006, ch. 1: no unique stationary vector)", () => {
    const pairs = mutualPairs(
      [
        ["a", "b"],
        ["b", "c"],
        ["c", "a"],
        ["d", "e"],
        ["e", "f"],
        ["f", "d"],
      ],
      3,
    );
    const report = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), { ...exact, background: 0 });
    expect(report.status).toBe("no-unique-shares");
    expect(report.influence).toBeNull();
    expect(report.consensus).toEqual({
      closedGroups: 2,
      reached: false,
      secondEigenvalue: 1,
      roundsToHalve: null,
    });
    // With background attention the shares are unique, but the observed attention (the β = 0
    // view of DESIGN.md §4.8) still splits into two closed groups: no consensus is reported.
    const withBackground = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), exact);
    expect(withBackground.status).toBe("ok");
    expect(withBackground.influence?.[0].share).toBeCloseTo(1 / 6, 6);
    expect(withBackground.consensus?.closedGroups).toBe(2);
    expect(withBackground.consensus?.reached).toBe(false);
  });

  it("same input, settings and seed give byte-identical JSON; another seed moves only the intervals", () => {
    const pairs = mutualPairs(karateTies());
    const settings = { ...DEFAULT_SETTINGS, seed: 11, samples: 100 };
    const one = JSON.stringify(analyzeSnapshot(snapshotOf(mentionEvents(pairs)), settings));
    const two = JSON.stringify(analyzeSnapshot(snapshotOf(mentionEvents(pairs)), settings));
    expect(one).toBe(two);
    const other = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), { ...settings, seed: 12 });
    const first = JSON.parse(one);
    expect(other.influence?.map((e) => e.share)).toEqual(
      first.influence.map((e: { share: number }) => e.share),
    );
    expect(JSON.stringify(other.influence?.map((e) => e.low))).not.toBe(
      JSON.stringify(first.influence.map((e: { low: number }) => e.low)),
    );
  });

  it("the line: crossed when P(share ≥ line) ≥ confidence, with the member and probability", () => {
    const leaves = ["b", "c", "d", "e", "f"];
    const pairs = leaves.flatMap((l) => [[l, "a", 30] as [string, string, number]]);
    const report = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), {
      ...DEFAULT_SETTINGS,
      halfLifeDays: 0,
      seed: 3,
    });
    // 5 members of 6 attend only to "a": its share is far above max(0.30, 2/6).
    expect(report.line?.threshold).toBeCloseTo(1 / 3, 6);
    expect(report.line?.crossed).toBe(true);
    expect(report.line?.member).toBe("a");
    expect(report.line?.probability).toBeGreaterThanOrEqual(0.8);
    expect(report.top?.pAbove).toBe(report.line?.probability);
  });

  it("window and decay: a signal older than the window is not counted", () => {
    const events = mentionEvents(
      mutualPairs(
        [
          ["a", "b"],
          ["b", "c"],
          ["c", "d"],
          ["d", "e"],
          ["e", "a"],
        ],
        3,
      ),
    );
    const late = T0 + 40 * 86_400_000;
    events.push({
      type: "message",
      at: late,
      channel: "c1",
      id: "late",
      author: "a",
      mentions: ["c"],
    });
    const report = analyzeSnapshot(snapshotOf(events), { ...exact, windowDays: 28 });
    expect(report.signals).toBe(1);
    expect(report.members).toBe(2);
  });
});
