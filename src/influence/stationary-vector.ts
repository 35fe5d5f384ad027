/**
 * @module stationary-vector
 * The influence shares s of DESIGN.md §4.5: the stationary vector of T = σI + (1−σ)A (sT = s,
 * Σs = 1), by the power method x ← xT with renormalisation, stopped when successive iterates
 * differ by less than the tolerance in L1 (von Mises & Pollaczek-Geiringer 1929, "Praktische
 * Verfahren der Gleichungsauflösung", ZAMM 9:152–164; for Markov chains see Stewart 1994,
 * "Introduction to the Numerical Solution of Markov Chains", ch. 1). Each step is one sparse left
 * product, O(nonzeros + n). Every σ < 1 has the same stationary vector, so the iteration does not
 * use the caller's σ: it starts on A itself (σ_iter = 0, usually the fastest contraction) and
 * switches for good to the lazy chain ½I + ½A as soon as the L1 change stops shrinking fast
 * (ratio above 0.75 after a few rounds) — the laziness moves every eigenvalue other than 1 into
 * the disc |z − ½| ≤ ½, so periodic or nearly bipartite attention still converges. The caller
 * decides uniqueness: with several closed groups the result depends on the start.
 * When the chain nearly splits (a second eigenvalue within 1e−3 of 1, as a drawn matrix of two
 * cliques can be), the power method would need tens of thousands of rounds; once the observed
 * contraction predicts that finishing costs more than a dense GTH solve (dense-stationary.ts), and
 * n ≤ 3,000, it solves densely instead — exact to rounding, deterministic, and cheaper.
 */

import { PlumblineError } from "../domain/errors.js";
import { type AttentionRows, leftMultiply } from "./attention-rows.js";
import { DENSE_STATIONARY_LIMIT, denseStationaryVector } from "./dense-stationary.js";

export interface StationaryOptions {
  /** σ of DESIGN.md §4.4, in [0, 1). */
  readonly selfWeight: number;
  /** L1 distance between successive iterates at which to stop; default 1e-12. */
  readonly tolerance?: number;
  /** Default scales with size: between 10 000 and 100 000 sparse products. */
  readonly maxIterations?: number;
  /** Warm start (e.g. the point estimate for posterior draws); non-negative, any positive sum. */
  readonly start?: Float64Array;
}

export interface StationaryResult {
  readonly vector: Float64Array;
  readonly iterations: number;
}

const DEFAULTS = {
  tolerance: 1e-12,
  probeRounds: 4,
  slowRatio: 0.75,
  lazySelfWeight: 0.5,
  /** Rounds between checks of whether a dense solve would finish sooner. */
  denseCheckEvery: 32,
} as const;

/** Guards the self-weight setting σ of DESIGN.md §4. */
export function checkSelfWeight(selfWeight: number): void {
  if (!Number.isFinite(selfWeight) || selfWeight < 0 || selfWeight >= 1) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `selfWeight must be at least 0 and below 1, got ${selfWeight}: set --self-weight in [0, 1) (default 0.5)`,
      { hint: "Set --self-weight to a number in [0, 1) (default 0.5)." },
    );
  }
}

function defaultMaxIterations(rows: AttentionRows): number {
  const work = rows.values.length + rows.n;
  return Math.max(10_000, Math.min(100_000, Math.ceil(5e8 / Math.max(1, work))));
}

function initialVector(n: number, start: Float64Array | undefined): Float64Array {
  const x = new Float64Array(n);
  if (start === undefined) return x.fill(1 / n);
  if (start.length !== n) throw new RangeError(`start has length ${start.length}, expected ${n}`);
  let sum = 0;
  for (let i = 0; i < n; i++) {
    const v = start[i];
    if (!(v >= 0) || !Number.isFinite(v)) throw new RangeError(`start[${i}] is ${v}`);
    sum += v;
  }
  if (!(sum > 0)) return x.fill(1 / n);
  for (let i = 0; i < n; i++) x[i] = start[i] / sum;
  return x;
}

/**
 * The stationary vector of T = σI + (1−σ)A by power iteration to `tolerance` in L1.
 * Throws PlumblineError `NO_CONVERGENCE` when `maxIterations` is reached.
 */
export function stationaryVector(
  rows: AttentionRows,
  options: StationaryOptions,
): StationaryResult {
  checkSelfWeight(options.selfWeight);
  const n = rows.n;
  if (n === 0) throw new RangeError("stationaryVector needs at least one member");
  if (n === 1) return { vector: Float64Array.of(1), iterations: 0 };
  const tolerance = options.tolerance ?? DEFAULTS.tolerance;
  const maxIterations = options.maxIterations ?? defaultMaxIterations(rows);
  // n = 2 without laziness is the swap [[0,1],[1,0]]: start lazy there.
  let sigma: number = n > 2 ? 0 : DEFAULTS.lazySelfWeight;
  let previousChange = Number.POSITIVE_INFINITY;
  let x: Float64Array = initialVector(n, options.start);
  let y: Float64Array = new Float64Array(n);
  const roundCost = rows.values.length + 3 * n;
  const denseCost = (n * n * n) / 3;
  let checkpointChange = Number.POSITIVE_INFINITY;
  let denseTried = false;
  for (let iteration = 1; iteration <= maxIterations; iteration++) {
    leftMultiply(rows, x, y);
    let sum = 0;
    for (let j = 0; j < n; j++) {
      const v = sigma * x[j] + (1 - sigma) * y[j];
      y[j] = v;
      sum += v;
    }
    let change = 0;
    for (let j = 0; j < n; j++) {
      const v = y[j] / sum;
      y[j] = v;
      change += Math.abs(v - x[j]);
    }
    const previous = x;
    x = y;
    y = previous;
    if (change < tolerance) return { vector: clampNegatives(x), iterations: iteration };
    if (
      sigma === 0 &&
      iteration > DEFAULTS.probeRounds &&
      change > DEFAULTS.slowRatio * previousChange
    ) {
      sigma = DEFAULTS.lazySelfWeight;
    }
    previousChange = change;
    if (!denseTried && iteration % DEFAULTS.denseCheckEvery === 0) {
      // Contraction per round over the last checkpoint interval, and the rounds still needed.
      const ratio = (change / checkpointChange) ** (1 / DEFAULTS.denseCheckEvery);
      checkpointChange = change;
      const remaining = ratio < 1 ? Math.log(tolerance / change) / Math.log(ratio) : Infinity;
      const budget = Math.min(remaining, maxIterations - iteration);
      if (
        n <= DENSE_STATIONARY_LIMIT &&
        (remaining > maxIterations - iteration || budget * roundCost > denseCost)
      ) {
        denseTried = true;
        const dense = denseStationaryVector(rows);
        if (dense) return { vector: dense, iterations: iteration };
      }
    }
  }
  throw new PlumblineError(
    "NO_CONVERGENCE",
    `influence shares did not settle after ${maxIterations} rounds: the attention matrix is close to splitting into groups that ignore each other; raise --background above 0 (default 1) or collect more signals`,
    { hint: "Raise --background above 0 (default 1) or collect more signals." },
  );
}

/** Rounding can leave −1e−17 where a transient member's share is 0; shares are non-negative. */
function clampNegatives(x: Float64Array): Float64Array {
  let sum = 0;
  for (let j = 0; j < x.length; j++) {
    if (x[j] < 0) x[j] = 0;
    sum += x[j];
  }
  for (let j = 0; j < x.length; j++) x[j] /= sum;
  return x;
}
