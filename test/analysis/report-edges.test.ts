/**
 * Report fields at their edges, through `analyzeSnapshot`, against closed forms derived here:
 *
 * - Even attention among n members (everyone mentions everyone else equally) is A = (J − I)/(n − 1),
 *   whose eigenvalues are 1 (once) and −1/(n − 1) (on every vector summing to 0) — common practice
 *   for the complete graph's averaging matrix. With self-weight σ, T = σI + (1 − σ)A has the
 *   eigenvalue σ − (1 − σ)/(n − 1), which is 0 at n = 3, σ = 1/3 (derived): one round of averaging
 *   already agrees, so the rounds to halve are 0. The shares are 1/n by symmetry.
 * - The 3-cycle a → b → c → a with σ = 0 is a permutation matrix: its eigenvalues are the cube
 *   roots of unity, all of modulus 1, so |λ2| = 1 and repeated averaging never settles (Seneta 2006,
 *   Non-negative Matrices and Markov Chains, ch. 1, periodic chains; from memory); s = (⅓, ⅓, ⅓)
 *   because the matrix is doubly stochastic.
 * Written for the mutation run of issue 18 (docs/testing.md).
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { round6 } from "../../src/analysis/assemble-report.js";
import { type AnalysisSettings, DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { mentionEvents, snapshotOf, T0 } from "../report/log-builders.js";

const exact: AnalysisSettings = {
  ...DEFAULT_SETTINGS,
  halfLifeDays: 0,
  samples: 0,
  minSignals: 1,
  minMembers: 3,
  seed: 11,
  clusters: false,
  background: 0,
};

const even3: [string, string, number][] = [
  ["a", "b", 4],
  ["a", "c", 4],
  ["b", "a", 4],
  ["b", "c", 4],
  ["c", "a", 4],
  ["c", "b", 4],
];

describe("report edges against closed forms", () => {
  it("even attention, n = 3, σ = 1/3: λ2 = 0, so consensus in 0 rounds; ties go to the member id", () => {
    const report = analyzeSnapshot(snapshotOf(mentionEvents(even3)), {
      ...exact,
      selfWeight: 1 / 3,
    });
    expect(report.status).toBe("ok");
    expect(report.consensus?.secondEigenvalue).toBeCloseTo(0, 6);
    expect(report.consensus?.roundsToHalve).toBe(0);
    expect(report.consensus?.reached).toBe(true);
    expect(report.consensus?.closedGroups).toBe(1);
    // Shares 1/3 each: every share rounds to the same 6 decimals, so the order is by member id.
    expect(report.influence?.map((e) => e.member)).toEqual(["a", "b", "c"]);
    for (const e of report.influence ?? []) {
      expect(e.share).toBeCloseTo(1 / 3, 6);
      // No draws: the interval is the point and P(share ≥ line) is 1 or 0 by the point.
      expect(e.low).toBe(e.share);
      expect(e.high).toBe(e.share);
      expect(e.pAbove).toBe(0); // the line is max(0.30, 2/3) = 2/3 > 1/3 (DESIGN.md §4)
    }
    expect(report.line).toEqual({
      threshold: round6(2 / 3),
      crossed: false,
      member: null,
      probability: 0,
    });
    // Contributors to a: s_b·A_ba/s_a = (1/3)(1/2)/(1/3) = 1/2 each, tied, so by member id.
    expect(report.contributors?.map((c) => c.member)).toEqual(["b", "c"]);
    for (const c of report.contributors ?? []) expect(c.share).toBeCloseTo(0.5, 6);
    expect(report.effectiveVoices?.value).toBeCloseTo(3, 6);
    expect(report.balance).toBeCloseTo(1, 6);
    // n < 7: no HHI and no band (the 2023 Merger Guidelines analogy is for n ≥ 7 only).
    expect(report.hhi).toBeNull();
    expect(report.concentration).toBeNull();
  });

  it("a fixed line at or below the point is crossed with no draws (P = 1 by the point)", () => {
    const report = analyzeSnapshot(snapshotOf(mentionEvents(even3)), {
      ...exact,
      threshold: 0.3,
      confidence: 0.8,
    });
    for (const e of report.influence ?? []) expect(e.pAbove).toBe(1);
    // Every member has P = 1 and the same rounded share: the crossing member is the first by id.
    expect(report.line).toEqual({ threshold: 0.3, crossed: true, member: "a", probability: 1 });
  });

  it("the 3-cycle with σ = 0: |λ2| = 1, no consensus and no rounds to halve, s = (⅓, ⅓, ⅓)", () => {
    const cycle: [string, string, number][] = [
      ["a", "b", 6],
      ["b", "c", 6],
      ["c", "a", 6],
    ];
    const report = analyzeSnapshot(snapshotOf(mentionEvents(cycle)), { ...exact, selfWeight: 0 });
    expect(report.status).toBe("ok");
    expect(report.consensus?.closedGroups).toBe(1);
    expect(report.consensus?.secondEigenvalue).toBeCloseTo(1, 6);
    expect(report.consensus?.reached).toBe(false);
    expect(report.consensus?.roundsToHalve).toBeNull();
    for (const e of report.influence ?? []) expect(e.share).toBeCloseTo(1 / 3, 6);
  });
});

describe("report frame", () => {
  it("window from = until − days, the line's mode, no broadcasts = 0 (DESIGN.md §5)", () => {
    const snapshot = snapshotOf(mentionEvents(even3));
    const until = T0 + 3_600_000;
    const auto = analyzeSnapshot(snapshot, { ...exact, windowDays: 10 }, { until });
    expect(auto.window.until).toBe(new Date(until).toISOString());
    expect(auto.window.from).toBe(new Date(until - 10 * DAY_MS).toISOString());
    expect(auto.window.days).toBe(10);
    expect(auto.settings.thresholdMode).toBe("auto");
    expect(auto.broadcasts).toBe(0);
    const fixed = analyzeSnapshot(snapshot, { ...exact, threshold: 0.5 }, { until });
    expect(fixed.settings.thresholdMode).toBe("fixed");
    expect(fixed.settings.threshold).toBe(0.5);
  });

  it("round6: 6 decimals, never −0, non-finite values kept", () => {
    expect(round6(0.1234564)).toBe(0.123456);
    expect(Object.is(round6(-1e-9), 0)).toBe(true);
    expect(round6(Number.NaN)).toBeNaN();
    expect(round6(Number.POSITIVE_INFINITY)).toBe(Number.POSITIVE_INFINITY);
  });

  it("equal P(share ≥ line): the line names the largest share; P = confidence counts as crossed", () => {
    // Two blocks (report-closed-forms.test.ts: s = 0.2 for a, b, c and 0.1 for d–g, derived there).
    const pairs: [string, string, number][] = [];
    const X = ["a", "b", "c"];
    const Y = ["d", "e", "f", "g"];
    for (const u of X) {
      for (const v of X) if (u !== v) pairs.push([u, v, 8]);
      for (const v of Y) pairs.push([u, v, 1]);
    }
    for (const u of Y) {
      for (const v of Y) if (u !== v) pairs.push([u, v, 7]);
      for (const v of X) pairs.push([u, v, 3]);
    }
    // Line 0.05: every member is above it with P = 1 (no draws), so the tie goes to the share.
    const report = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), {
      ...exact,
      threshold: 0.05,
      confidence: 1,
    });
    expect(report.sufficient).toBe(true);
    expect(report.needed).toBeNull();
    expect(report.line).toEqual({ threshold: 0.05, crossed: true, member: "a", probability: 1 });
  });

  it("two closed groups kept together by the prior: figures, but no consensus in the data", () => {
    // Two triangles that never attend to each other; background 1 joins them (DESIGN.md §4.4).
    const tri = (m: string[]): [string, string, number][] =>
      m.flatMap((u) => m.filter((v) => v !== u).map((v) => [u, v, 5] as [string, string, number]));
    const report = analyzeSnapshot(
      snapshotOf(mentionEvents([...tri(["a", "b", "c"]), ...tri(["d", "e", "f"])])),
      { ...exact, background: 1 },
    );
    expect(report.status).toBe("ok");
    expect(report.consensus?.closedGroups).toBe(2);
    expect(report.consensus?.secondEigenvalue).toBeLessThan(1 - 1e-6);
    expect(report.consensus?.reached).toBe(false);
  });

  it("labels take the place of clusters: with groups labelled, no clusters even when asked for", () => {
    const events = mentionEvents(even3);
    ["a", "b", "c"].forEach((m, k) => {
      events.push({ type: "group", at: T0 - 1000 + k, channel: "c1", member: m, group: "all" });
    });
    const report = analyzeSnapshot(snapshotOf(events.sort((x, y) => x.at - y.at)), {
      ...exact,
      clusters: true,
    });
    expect(report.groups?.map((g) => [g.group, g.members])).toEqual([["all", 3]]);
    expect(report.groups?.[0].share).toBeCloseTo(1, 6);
    expect(report.clusters).toBeNull();
  });

  it("the line's member when the first ids are below it: highest P, then largest share, then id", () => {
    // The two blocks of report-closed-forms.test.ts with the names moved: X = {d, e, f} (s = 0.2
    // each), Y = {a, b, c, g} (0.1 each), derived there. No draws: P is 1 above the line, else 0.
    const X = ["d", "e", "f"];
    const Y = ["a", "b", "c", "g"];
    const pairs: [string, string, number][] = [];
    for (const u of X) {
      for (const v of X) if (u !== v) pairs.push([u, v, 8]);
      for (const v of Y) pairs.push([u, v, 1]);
    }
    for (const u of Y) {
      for (const v of Y) if (u !== v) pairs.push([u, v, 7]);
      for (const v of X) pairs.push([u, v, 3]);
    }
    const snapshot = snapshotOf(mentionEvents(pairs));
    // Line 0.15: only X is above it (P = 1), the rest P = 0.
    const mid = analyzeSnapshot(snapshot, { ...exact, threshold: 0.15 });
    expect(mid.line).toEqual({ threshold: 0.15, crossed: true, member: "d", probability: 1 });
    expect(mid.top?.member).toBe("d");
    // Line 0.05: everyone has P = 1; the largest share (X) wins, then the id.
    const low = analyzeSnapshot(snapshot, { ...exact, threshold: 0.05 });
    expect(low.line?.member).toBe("d");
    // Line 0.5: nobody; the line reports the highest P (0) of the largest share, not crossed.
    const high = analyzeSnapshot(snapshot, { ...exact, threshold: 0.5 });
    expect(high.line).toEqual({ threshold: 0.5, crossed: false, member: null, probability: 0 });
  });

  it("contributors are sorted by their part, not by their own share, ties by id", () => {
    // a → z; z → a and c evenly; c → a (background 0). Derived from sA = s: s_z = s_a,
    // s_c = s_z/2, s_a = s_z/2 + s_c, so s = (a 0.4, z 0.4, c 0.2); the top is a (tie with z, by
    // id). Parts of s_a: z gives 0.4·½/0.4 = ½, c gives 0.2·1/0.4 = ½ — a tie, so by id: c, z,
    // although z's own share is larger.
    const tie = analyzeSnapshot(
      snapshotOf(
        mentionEvents([
          ["a", "z", 2],
          ["z", "a", 1],
          ["z", "c", 1],
          ["c", "a", 2],
        ]),
      ),
      exact,
    );
    expect(tie.top?.member).toBe("a");
    expect(tie.contributors?.map((c) => c.member)).toEqual(["c", "z"]);
    for (const c of tie.contributors ?? []) expect(c.share).toBeCloseTo(0.5, 6);
    // z → a ¼ and c ¾: s_c = ¾ s_z, s_a = s_z/4 + s_c = s_z, so s = (1, 1, ¾)/2.75 (a, z, c).
    // Parts of s_a: c gives (¾)·1 = ¾, z gives ¼: c first although z has the larger share.
    const apart = analyzeSnapshot(
      snapshotOf(
        mentionEvents([
          ["a", "z", 4],
          ["z", "a", 1],
          ["z", "c", 3],
          ["c", "a", 4],
        ]),
      ),
      exact,
    );
    expect(apart.top?.member).toBe("a");
    expect(apart.contributors?.map((c) => [c.member, c.share])).toEqual([
      ["c", 0.75],
      ["z", 0.25],
    ]);
  });

  it("labels take the place of clusters also when clusters were found", () => {
    const left = ["a", "b", "c", "d", "e"];
    const right = ["f", "g", "h", "i", "j"];
    const pairs: [string, string, number][] = [];
    for (const clique of [left, right]) {
      for (const u of clique) for (const v of clique) if (u !== v) pairs.push([u, v, 3]);
    }
    pairs.push(["a", "f", 1], ["f", "a", 1]);
    const unlabelled = analyzeSnapshot(snapshotOf(mentionEvents(pairs)), {
      ...exact,
      clusters: true,
    });
    expect(unlabelled.clusters?.groups.length).toBe(2);
    const events = mentionEvents(pairs);
    [...left, ...right].forEach((m, k) => {
      events.push({ type: "group", at: T0 - 1000 + k, channel: "c1", member: m, group: "all" });
    });
    const labelled = analyzeSnapshot(snapshotOf(events.sort((x, y) => x.at - y.at)), {
      ...exact,
      clusters: true,
    });
    expect(labelled.groups?.length).toBe(1);
    expect(labelled.clusters).toBeNull();
  });
});
