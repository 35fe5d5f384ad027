/**
 * The calibration suite's truth and simulator: if the truth is wrong, the suite measures nothing.
 * The stationary solver is checked on a textbook chain, each regime's rows and shares against
 * closed forms, and the simulated channels against what the product's own signal collector sees.
 */
import { describe, expect, it } from "vitest";
import { simulateChannel } from "../../bench/calibrate/simulate-channel.js";
import {
  REGIMES,
  type TrueRow,
  trueChannel,
  trueStationary,
} from "../../bench/calibrate/true-matrix.js";
import { collectSignals } from "../../src/attention/collect-signals.js";

function rowsFromDense(matrix: number[][]): TrueRow[] {
  return matrix.map((row) => {
    const targets = row.flatMap((p, j) => (p > 0 ? [j] : []));
    return { targets: Int32Array.from(targets), probs: Float64Array.from(targets, (j) => row[j]) };
  });
}

/** L1 norm of sP − s. */
function residual(rows: readonly TrueRow[], s: Float64Array): number {
  const next = new Float64Array(s.length);
  rows.forEach((row, i) => {
    row.targets.forEach((j, k) => {
      next[j] += s[i] * row.probs[k];
    });
  });
  return next.reduce((acc, x, j) => acc + Math.abs(x - s[j]), 0);
}

describe("true stationary vector", () => {
  it("Land of Oz chain: (2/5, 1/5, 2/5)", () => {
    // Grinstead & Snell, Introduction to Probability (AMS, 2nd rev. ed. 1997): the chain is defined
    // in Example 11.1 (R, N, S); its fixed vector (2/5, 1/5, 2/5) is given in §11.3, "Ergodic
    // Markov Chains" (example number there from memory).
    const oz = rowsFromDense([
      [1 / 2, 1 / 4, 1 / 4],
      [1 / 2, 0, 1 / 2],
      [1 / 4, 1 / 4, 1 / 2],
    ]);
    const s = trueStationary(oz, 3);
    [2 / 5, 1 / 5, 2 / 5].forEach((want, i) => {
      expect(Math.abs(s[i] - want)).toBeLessThan(1e-12);
    });
  });

  it.each(REGIMES.flatMap((regime) => [8, 60].map((n) => [regime, n] as const)))(
    "%s, n = %i: rows are distributions with a zero diagonal and sP = s",
    (regime, n) => {
      const truth = trueChannel({ regime, n, seed: 11, line: 0.3 });
      truth.rows.forEach((row, i) => {
        expect([...row.targets]).not.toContain(i);
        expect(Math.abs(row.probs.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-12);
        if (regime === "sparse") {
          expect(row.targets.length).toBeGreaterThanOrEqual(3);
          expect(row.targets.length).toBeLessThanOrEqual(5);
        } else expect(row.targets.length).toBe(n - 1);
      });
      expect(residual(truth.rows, truth.shares)).toBeLessThan(1e-12);
      expect(Math.min(...truth.shares)).toBeGreaterThan(0);
    },
  );
});

describe("regimes against closed forms", () => {
  it.each([8, 20, 200])("leader at n = %i holds exactly t = line + 0.10 or line − 0.05", (n) => {
    // Derived (shared/notes/calibration.md): everyone else gives the leader f = t/(1−t), so
    // stationarity at the leader reads s_L = f(1 − s_L), whose solution is s_L = t.
    for (const [regime, t] of [
      ["leader", 0.4],
      ["leader-low", 0.25],
    ] as const) {
      const truth = trueChannel({ regime, n, seed: 5, line: 0.3 });
      expect(truth.leader).not.toBeNull();
      expect(Math.abs(truth.shares[truth.leader as number] - t)).toBeLessThan(1e-10);
      expect(Math.max(...truth.shares)).toBe(truth.shares[truth.leader as number]);
    }
  });

  it("two cliques with 0.1 crossing from every member hold half the influence each", () => {
    // Balance of flow across a cut in a stationary chain (Levin, Peres & Wilmer, Markov Chains and
    // Mixing Times, 2nd ed. 2017, ch. 1, from memory): s(A)·0.1 = s(B)·0.1, so s(A) = s(B) = 1/2.
    for (const n of [8, 60]) {
      const truth = trueChannel({ regime: "cliques", n, seed: 9, line: 0.3 });
      const clique = truth.clique as Uint8Array;
      expect(clique.reduce((a, b) => a + b, 0)).toBe(Math.round(n / 3));
      truth.rows.forEach((row, i) => {
        let inside = 0;
        row.targets.forEach((j, k) => {
          if (clique[j] === clique[i]) inside += row.probs[k];
        });
        expect(Math.abs(inside - 0.9)).toBeLessThan(1e-12);
      });
      const mass = truth.shares.reduce((acc, s, i) => acc + (clique[i] === 1 ? s : 0), 0);
      expect(Math.abs(mass - 0.5)).toBeLessThan(1e-10);
    }
  });
});

describe("simulated channel as the product sees it", () => {
  it("n active members, N = ratio·n signals, about half replies, targets following P", () => {
    const n = 20;
    const ratio = 50;
    const truth = trueChannel({ regime: "leader", n, seed: 3, line: 0.3 });
    const sim = simulateChannel({ truth, ratio, seed: 4, channel: "t", windowDays: 28 });
    const set = collectSignals(sim.snapshot, {
      until: sim.until,
      windowDays: 28,
      halfLifeDays: 0,
      replyWeight: 1,
      mentionWeight: 1,
    });
    expect(set.members).toEqual(sim.members);
    expect(set.count).toBe(n * ratio);
    const replies = set.signals.filter((s) => s.kind === "reply").length;
    // Binomial(1000, ½): 3 standard errors are ±47 (common practice).
    expect(Math.abs(replies - 500)).toBeLessThan(3 * Math.sqrt(1000 * 0.25));
    // The leader receives f = t/(1−t) = 2/3 of every other member's signals: over the 19/20 of
    // signals sent by others, expected 1000·(19/20)·(2/3) = 633.3, binomial SE ≈ 15.
    const leader = sim.members[truth.leader as number];
    const toLeader = set.signals.filter((s) => s.to === leader).length;
    const p = (19 / 20) * (2 / 3);
    expect(Math.abs(toLeader - 1000 * p)).toBeLessThan(3 * Math.sqrt(1000 * p * (1 - p)));
  });
});
