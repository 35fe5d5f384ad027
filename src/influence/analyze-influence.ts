/**
 * @module analyze-influence
 * The numerical core every surface shares (DESIGN.md §4 steps 4–8): point attention rows, the
 * stationary vector, K posterior draws (each solve warm-started from the point estimate) and |λ2|.
 * An optional row transform (the what-if cap) is applied to the point rows and to every drawn row
 * set, so a what-if and its baseline use the same draws and compare pairwise.
 */
import type { CountMatrix } from "../domain/counts.js";
import { createSeededRng } from "../ports/rng.js";
import { type AttentionRows, pointAttentionRows } from "./attention-rows.js";
import { createGammaSampler } from "./gamma-sampler.js";
import { createDrawBuffer, drawIntoBuffer } from "./posterior-draws.js";
import { secondEigenvalue } from "./second-eigenvalue.js";
import { DRAW_TOLERANCE, stationaryVector } from "./stationary-vector.js";

export interface InfluenceOptions {
  readonly background: number;
  readonly selfWeight: number;
  readonly samples: number;
  readonly seed: number;
  /** Applied to every attention row set before solving (e.g. the what-if cap). */
  readonly transform?: (rows: AttentionRows) => AttentionRows;
  /** Called after each posterior draw with the number done so far (progress lines). */
  readonly onDraw?: (done: number) => void;
}

export interface InfluenceResult {
  /** Point attention rows (after any transform). */
  readonly rows: AttentionRows;
  /** Stationary vector s of the point estimate. */
  readonly shares: Float64Array;
  /** One share vector per posterior draw. */
  readonly draws: readonly Float64Array[];
  /** 1/Σs² per draw. */
  readonly effectiveVoicesDraws: Float64Array;
  /** |λ2| of the point T. */
  readonly secondEigenvalue: number;
}

/** 1 / Σ s_i²: Kish's effective sample size of the consensus (DESIGN.md §1, effective voices). */
export function effectiveVoicesOf(shares: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < shares.length; i++) sum += shares[i] * shares[i];
  return sum > 0 ? 1 / sum : 0;
}

export function analyzeInfluence(counts: CountMatrix, options: InfluenceOptions): InfluenceResult {
  const identity = (rows: AttentionRows): AttentionRows => rows;
  const transform = options.transform ?? identity;
  const rows = transform(pointAttentionRows(counts, options.background));
  const point = stationaryVector(rows, { selfWeight: options.selfWeight }).vector;
  const gamma = createGammaSampler(createSeededRng(options.seed));
  const buffer = createDrawBuffer(counts);
  const draws: Float64Array[] = [];
  const effectiveVoicesDraws = new Float64Array(options.samples);
  for (let k = 0; k < options.samples; k++) {
    const drawn = transform(drawIntoBuffer(counts, options.background, gamma, buffer));
    const s = stationaryVector(drawn, {
      selfWeight: options.selfWeight,
      start: point,
      tolerance: DRAW_TOLERANCE,
    }).vector;
    draws.push(s);
    effectiveVoicesDraws[k] = effectiveVoicesOf(s);
    options.onDraw?.(k + 1);
  }
  return {
    rows,
    shares: point,
    draws,
    effectiveVoicesDraws,
    secondEigenvalue: secondEigenvalue(rows, options.selfWeight, point),
  };
}
