/**
 * @module true-matrix
 * The known truth of the calibration suite: a seeded attention matrix P (zero diagonal, rows sum
 * to 1) in one of five regimes, and its stationary vector s (sP = s), computed here by its own
 * power iteration on the lazy chain ½(I + P) so the truth never comes from the product's solver.
 * Regimes (shared/notes/calibration.md): balanced (each row Dirichlet(1) over the others), leader
 * (everyone else gives one member f = t/(1−t) of their attention, so s_leader = f(1 − s_leader)
 * gives exactly t; the leader's own row and the rest of each row are Dirichlet(1)), two cliques
 * (about n/3 and 2n/3 members, 0.9 of each row inside the own clique), sparse (each member attends
 * to 3–5 others, one of them the member's successor on a random cycle, so every member is attended
 * to and the chain is irreducible: every true share is positive). Dirichlet(1) rows are normalised
 * standard exponentials (the Gamma construction of the Dirichlet, common practice).
 */
import { createSeededRng, type Rng } from "../../src/ports/rng.js";

export type Regime = "balanced" | "leader" | "leader-low" | "cliques" | "sparse";

export const REGIMES: readonly Regime[] = ["balanced", "leader", "leader-low", "cliques", "sparse"];

/** One row of P in sparse form: targets ascending, probabilities summing to 1. */
export interface TrueRow {
  readonly targets: Int32Array;
  readonly probs: Float64Array;
}

export interface TrueChannel {
  readonly regime: Regime;
  readonly n: number;
  readonly rows: readonly TrueRow[];
  /** Stationary vector of P. */
  readonly shares: Float64Array;
  /** The leader's index in leader regimes, else null. */
  readonly leader: number | null;
  /** The leader's designed share t in leader regimes, else null. */
  readonly leaderShare: number | null;
  /** Cliques regime: 1 for members of the smaller clique, 0 for the others; else null. */
  readonly clique: Uint8Array | null;
}

export interface TrueChannelOptions {
  readonly regime: Regime;
  readonly n: number;
  readonly seed: number;
  /** The line the leader regimes are placed against: t = line + 0.10 or line − 0.05. */
  readonly line: number;
}

/** Standard exponential variate. */
function exponential(rng: Rng): number {
  return -Math.log(1 - rng.next());
}

/** Fisher–Yates shuffle of 0..n−1. */
function permutation(n: number, rng: Rng): Int32Array {
  const order = Int32Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rng.next() * (i + 1));
    const t = order[i];
    order[i] = order[j];
    order[j] = t;
  }
  return order;
}

/** A row putting `mass` Dirichlet(1)-spread over `targets` into `into` (dense scratch). */
function spread(targets: readonly number[], mass: number, rng: Rng, into: Float64Array): void {
  const weights = targets.map(() => exponential(rng));
  const total = weights.reduce((a, b) => a + b, 0);
  targets.forEach((j, k) => {
    into[j] += (mass * weights[k]) / total;
  });
}

function toRow(dense: Float64Array): TrueRow {
  const targets: number[] = [];
  const probs: number[] = [];
  let total = 0;
  for (let j = 0; j < dense.length; j++) {
    if (dense[j] > 0) {
      targets.push(j);
      probs.push(dense[j]);
      total += dense[j];
    }
  }
  return {
    targets: Int32Array.from(targets),
    probs: Float64Array.from(probs, (p) => p / total),
  };
}

/** Others of `i` among `pool`. */
function others(pool: readonly number[], i: number): number[] {
  return pool.filter((j) => j !== i);
}

/** The leader's designed share for a regime and line. */
export function leaderShareFor(regime: Regime, line: number): number | null {
  if (regime === "leader") return line + 0.1;
  if (regime === "leader-low") return line - 0.05;
  return null;
}

/** Draws a true channel of the given regime (see the module header). */
export function trueChannel(options: TrueChannelOptions): TrueChannel {
  const { regime, n } = options;
  if (!Number.isInteger(n) || n < 4) throw new RangeError(`n must be an integer ≥ 4, got ${n}`);
  const rng = createSeededRng(options.seed);
  const everyone = Array.from({ length: n }, (_, i) => i);
  const rows: TrueRow[] = [];
  const dense = new Float64Array(n);
  let leader: number | null = null;
  const t = leaderShareFor(regime, options.line);
  if (t !== null) {
    if (!(t > 0 && t < 0.5)) throw new RangeError(`leader share must be in (0, 0.5), got ${t}`);
    leader = Math.floor(rng.next() * n);
  }
  const order = permutation(n, rng);
  const position = new Int32Array(n);
  order.forEach((member, p) => {
    position[member] = p;
  });
  const cliqueSize = Math.round(n / 3);
  const inFirst = (i: number) => position[i] < cliqueSize;
  const first = everyone.filter(inFirst);
  const second = everyone.filter((i) => !inFirst(i));
  for (let i = 0; i < n; i++) {
    dense.fill(0);
    switch (regime) {
      case "balanced":
        spread(others(everyone, i), 1, rng, dense);
        break;
      case "leader":
      case "leader-low": {
        const f = (t as number) / (1 - (t as number));
        if (i === leader) spread(others(everyone, i), 1, rng, dense);
        else {
          dense[leader as number] += f;
          spread(
            everyone.filter((j) => j !== i && j !== leader),
            1 - f,
            rng,
            dense,
          );
        }
        break;
      }
      case "cliques": {
        const own = inFirst(i) ? first : second;
        const other = inFirst(i) ? second : first;
        spread(others(own, i), 0.9, rng, dense);
        spread(other, 0.1, rng, dense);
        break;
      }
      case "sparse": {
        const successor = order[(position[i] + 1) % n];
        const degree = Math.min(n - 1, 3 + Math.floor(rng.next() * 3));
        const chosen = new Set<number>([successor]);
        while (chosen.size < degree) {
          const j = Math.floor(rng.next() * n);
          if (j !== i) chosen.add(j);
        }
        spread([...chosen], 1, rng, dense);
        break;
      }
    }
    rows.push(toRow(dense));
  }
  return {
    regime,
    n,
    rows,
    shares: trueStationary(rows, n),
    leader,
    leaderShare: t,
    clique: regime === "cliques" ? Uint8Array.from(everyone, (i) => (inFirst(i) ? 1 : 0)) : null,
  };
}

/**
 * Stationary vector of P by power iteration on ½(I + P) (same vector, aperiodic), from the even
 * vector, until the L1 change is below 1e-13 (at most 200,000 steps).
 */
export function trueStationary(rows: readonly TrueRow[], n: number): Float64Array {
  let s = new Float64Array(n).fill(1 / n);
  let next = new Float64Array(n);
  for (let step = 0; step < 200_000; step++) {
    for (let j = 0; j < n; j++) next[j] = 0.5 * s[j];
    for (let i = 0; i < n; i++) {
      const { targets, probs } = rows[i];
      const half = 0.5 * s[i];
      for (let k = 0; k < targets.length; k++) next[targets[k]] += half * probs[k];
    }
    let total = 0;
    for (let j = 0; j < n; j++) total += next[j];
    let change = 0;
    for (let j = 0; j < n; j++) {
      next[j] /= total;
      change += Math.abs(next[j] - s[j]);
    }
    [s, next] = [next, s];
    if (change < 1e-13) return s;
  }
  throw new Error("true stationary vector did not converge");
}
