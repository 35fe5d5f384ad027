/**
 * @module posterior-draws
 * Uncertainty of the influence shares (DESIGN.md §4.6): each attention row gets an independent
 * Dirichlet posterior, Dirichlet(C_ij + b) over the n−1 others, drawn as normalised Gamma variates
 * (Noé 2008, "Probability distributions of molecular observables computed from Markov models",
 * J. Chem. Phys. 128:244103; Noé & Chodera 2014, "Uncertainty Estimation", in Bowman, Pande & Noé
 * (eds.), An Introduction to Markov State Models, Springer). Unobserved cells share one Gamma
 * variate G_0 ~ Gamma(b·(n−1−|J_i|)) whose share is spread evenly over them: by the aggregation
 * property of the Dirichlet this is exact for every figure that depends on the row only through
 * the observed cells and the unobserved total, and it keeps a draw O(nonzeros + n). The Gamma
 * constants of every cell and every G_0 are computed once per count matrix and background (a
 * `DrawPlan`) and reused by all K draws. A row whose largest shape is at least LINEAR_MIN_SHAPE is
 * drawn in linear space (its largest variate cannot underflow, and a smaller one that does is
 * negligible next to it); a row of only tinier shapes is combined in log space (the row's largest
 * log is subtracted before exponentiating). Draw order is fixed — row by row, observed targets in
 * CSR order, then G_0 — so one seed gives identical draws.
 */

import type { CountMatrix } from "../domain/counts.js";
import type { Rng } from "../ports/rng.js";
import { type AttentionRows, checkBackground, pointAttentionRows } from "./attention-rows.js";
import {
  createGammaSampler,
  type GammaConstants,
  type GammaSampler,
  gammaConstants,
  LINEAR_MIN_SHAPE,
} from "./gamma-sampler.js";
import { checkSelfWeight, stationaryVector } from "./stationary-vector.js";

export interface PosteriorOptions {
  /** β of DESIGN.md §4. */
  readonly background: number;
  /** σ of DESIGN.md §4. */
  readonly selfWeight: number;
  /** K, the number of draws. */
  readonly samples: number;
  readonly rng: Rng;
  /** Warm start for every solve; default: the point estimate's stationary vector. */
  readonly start?: Float64Array;
}

/** Reusable storage for posterior draws of one count matrix. */
export interface DrawBuffer {
  readonly rows: AttentionRows;
  readonly values: Float64Array;
  readonly rest: Float64Array;
  readonly logs: Float64Array;
  /** Gamma constants for the background last drawn with (filled on first use). */
  plan?: DrawPlan;
}

/** Per-cell and per-row Gamma constants for one count matrix and background. */
interface DrawPlan {
  readonly background: number;
  /** One entry per stored cell (shape C_ij + b). */
  readonly cells: GammaConstants;
  /** One entry per row (shape b·unobserved; a placeholder 1 where that is 0). */
  readonly rests: GammaConstants;
  /** Per row: 1 when its largest shape allows linear space. */
  readonly linear: Uint8Array;
}

function drawPlan(counts: CountMatrix, background: number): DrawPlan {
  const n = counts.members.length;
  const { rowPtr } = counts;
  const b = n > 1 ? background / (n - 1) : 0;
  const cellShapes = new Float64Array(counts.values.length);
  const restShapes = new Float64Array(n).fill(1);
  const linear = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    const restShape = b * (n - 1 - (rowPtr[i + 1] - rowPtr[i]));
    let largest = restShape;
    if (restShape > 0) restShapes[i] = restShape;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
      cellShapes[k] = counts.values[k] + b;
      if (cellShapes[k] > largest) largest = cellShapes[k];
    }
    linear[i] = largest >= LINEAR_MIN_SHAPE ? 1 : 0;
  }
  return {
    background,
    cells: gammaConstants(cellShapes),
    rests: gammaConstants(restShapes),
    linear,
  };
}

export function createDrawBuffer(counts: CountMatrix): DrawBuffer {
  const n = counts.members.length;
  const nnz = counts.values.length;
  const values = new Float64Array(nnz);
  const rest = new Float64Array(n);
  return {
    rows: { n, rowPtr: counts.rowPtr, colIdx: counts.colIdx, values, rest },
    values,
    rest,
    logs: new Float64Array(nnz),
  };
}

/**
 * Overwrites `buffer.rows` with the next posterior draw of A (the same draw sequence as
 * `drawAttentionRows` and `posteriorShares` for the same sampler).
 */
export function drawIntoBuffer(
  counts: CountMatrix,
  background: number,
  gamma: GammaSampler,
  buffer: DrawBuffer,
): AttentionRows {
  drawInto(counts, background, gamma, buffer);
  return buffer.rows;
}

/** Fills `values` and `rest` with one posterior draw of A; `logs` is scratch of nnz length. */
function drawInto(
  counts: CountMatrix,
  background: number,
  gamma: GammaSampler,
  target: { values: Float64Array; rest: Float64Array; logs: Float64Array; plan?: DrawPlan },
): void {
  const n = counts.members.length;
  const { rowPtr } = counts;
  const { values, rest, logs } = target;
  if (target.plan?.background !== background) target.plan = drawPlan(counts, background);
  const { cells, rests, linear } = target.plan;
  const b = n > 1 ? background / (n - 1) : 0;
  for (let i = 0; i < n; i++) {
    const lo = rowPtr[i];
    const hi = rowPtr[i + 1];
    const unobserved = n - 1 - (hi - lo);
    if (hi === lo) {
      rest[i] = n > 1 ? 1 / (n - 1) : 0;
      continue;
    }
    const restShape = b * unobserved;
    let total = 0;
    let restWeight = 0;
    if (linear[i] === 1) {
      for (let k = lo; k < hi; k++) {
        const w = gamma.gammaAt(cells, k);
        values[k] = w;
        total += w;
      }
      restWeight = restShape > 0 ? gamma.gammaAt(rests, i) : 0;
      total += restWeight;
    } else {
      let max = Number.NEGATIVE_INFINITY;
      for (let k = lo; k < hi; k++) {
        const log = gamma.logGammaAt(cells, k);
        logs[k] = log;
        if (log > max) max = log;
      }
      const logRest = restShape > 0 ? gamma.logGammaAt(rests, i) : Number.NEGATIVE_INFINITY;
      if (logRest > max) max = logRest;
      if (max !== Number.NEGATIVE_INFINITY) {
        for (let k = lo; k < hi; k++) {
          const w = Math.exp(logs[k] - max);
          values[k] = w;
          total += w;
        }
        restWeight = Math.exp(logRest - max);
        total += restWeight;
      }
    }
    if (!(total > 0)) {
      // Every variate underflowed even in log space (shapes near the smallest double): even row.
      for (let k = lo; k < hi; k++) values[k] = 0;
      rest[i] = 1 / (n - 1);
      continue;
    }
    // rest_i applies to every j ≠ i, so observed cells carry it as a negative correction.
    const spread = unobserved > 0 ? restWeight / total / unobserved : 0;
    for (let k = lo; k < hi; k++) values[k] = values[k] / total - spread;
    rest[i] = spread;
  }
}

/** One draw of A from the row-wise Dirichlet posterior of DESIGN.md §4.6 (structure shared). */
export function drawAttentionRows(
  counts: CountMatrix,
  background: number,
  rng: Rng,
): AttentionRows {
  checkBackground(background);
  const n = counts.members.length;
  const nnz = counts.values.length;
  const values = new Float64Array(nnz);
  const rest = new Float64Array(n);
  drawInto(counts, background, createGammaSampler(rng), {
    values,
    rest,
    logs: new Float64Array(nnz),
  });
  return { n, rowPtr: counts.rowPtr, colIdx: counts.colIdx, values, rest };
}

/**
 * K posterior draws of the influence shares: draw A, solve sT = s warm-started from `start`.
 * Draws are made in a fixed order, so the same seed gives byte-identical vectors.
 */
export function posteriorShares(counts: CountMatrix, options: PosteriorOptions): Float64Array[] {
  const { background, selfWeight, samples, rng } = options;
  checkBackground(background);
  checkSelfWeight(selfWeight);
  if (!Number.isInteger(samples) || samples < 0) {
    throw new RangeError(`samples must be a non-negative integer, got ${samples}`);
  }
  const n = counts.members.length;
  const nnz = counts.values.length;
  const start =
    options.start ??
    stationaryVector(pointAttentionRows(counts, background), { selfWeight }).vector;
  const buffer = {
    values: new Float64Array(nnz),
    rest: new Float64Array(n),
    logs: new Float64Array(nnz),
  };
  const rows: AttentionRows = {
    n,
    rowPtr: counts.rowPtr,
    colIdx: counts.colIdx,
    values: buffer.values,
    rest: buffer.rest,
  };
  const draws: Float64Array[] = [];
  const gamma = createGammaSampler(rng);
  for (let k = 0; k < samples; k++) {
    drawInto(counts, background, gamma, buffer);
    draws.push(stationaryVector(rows, { selfWeight, start }).vector);
  }
  return draws;
}
