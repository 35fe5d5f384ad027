/**
 * @module second-eigenvalue
 * |λ2| of T = σI + (1−σ)A, the second largest eigenvalue modulus, which sets the speed of
 * consensus (DESIGN.md §4.8). Small chains: the dense eigen-decomposition of ml-matrix (a JAMA
 * port: Hessenberg reduction and shifted QR). Large chains: Arnoldi's method (Arnoldi 1951, Quart.
 * Appl. Math. 9:17–29) with thick restarts that keep the wanted Ritz vectors, in real form, and
 * continue from the residual (Morgan 1996, "On restarting the Arnoldi method for large
 * nonsymmetric eigenvalue problems", Math. Comp. 65:1213–1230; Stewart 2001, "A Krylov–Schur
 * algorithm for large eigenproblems", SIAM J. Matrix Anal. Appl. 23:601–614), applied to the
 * deflated operator x ↦ x(T − 1s). By Brauer's theorem (Brauer 1952, "Limits for the
 * characteristic roots of a matrix IV", Duke Math. J. 19:75–91) its spectrum is
 * {1 − s·1, λ2, …, λn} = {0, λ2, …, λn} for any s with Σs = 1, so the dominant Ritz value is λ2
 * (a second closed class keeps an eigenvalue 1). Only sparse left products touch the matrix; the
 * Rayleigh–Ritz step is a small dense eigenproblem. Plain block power iteration was tried first
 * and rejected: on clustered spectra it stalls (changes of 1e-10 per step with errors near 1e-6).
 */

import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { PlumblineError } from "../domain/errors.js";
import { type AttentionRows, denseTransition, leftMultiply } from "./attention-rows.js";

export interface IterativeEigenOptions {
  /** Ritz vectors kept at each restart (the block); default 8. */
  readonly blockSize?: number;
  /** Largest Krylov basis before a restart; default 40. */
  readonly krylovDimension?: number;
  /** Stop when the estimate changes by less than this from one restart to the next; 1e-10. */
  readonly tolerance?: number;
  /** Default 2 000. */
  readonly maxRestarts?: number;
}

const DEFAULTS = {
  blockSize: 8,
  krylovDimension: 40,
  // Reported to 6 decimals; 1e-7 relative between restarts matched the dense solver to 1e-12
  // at n = 300 and moved the n = 2,000 result by 1e-8.
  tolerance: 1e-7,
  maxRestarts: 2_000,
  denseLimit: 150,
} as const;

/** Eigenvalue moduli of a dense square matrix, largest first. */
function moduli(matrix: number[][]): number[] {
  const evd = new EigenvalueDecomposition(new Matrix(matrix));
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  return re.map((r, k) => Math.hypot(r, im[k])).sort((a, b) => b - a);
}

/** |λ2| of T from the full dense spectrum (O(n³)); 1 when eigenvalue 1 is repeated. */
export function denseSecondEigenvalue(rows: AttentionRows, selfWeight: number): number {
  if (rows.n < 2) return 0;
  return Math.min(1, moduli(denseTransition(rows, selfWeight))[1]);
}

/** y = x(T − 1s) = σx + (1−σ)xA − (Σx)s. */
function deflatedProduct(
  rows: AttentionRows,
  selfWeight: number,
  s: Float64Array,
  x: Float64Array,
  y: Float64Array,
): void {
  leftMultiply(rows, x, y);
  let mass = 0;
  for (let j = 0; j < x.length; j++) mass += x[j];
  for (let j = 0; j < x.length; j++)
    y[j] = selfWeight * x[j] + (1 - selfWeight) * y[j] - mass * s[j];
}

function dot(a: Float64Array, b: Float64Array): number {
  let sum = 0;
  for (let j = 0; j < a.length; j++) sum += a[j] * b[j];
  return sum;
}

/** A deterministic pseudo-random fill in [−1, 1) (a 32-bit LCG; quality is irrelevant here). */
function fillDeterministic(v: Float64Array, seed: number): void {
  let state = (seed * 2654435761) >>> 0;
  for (let j = 0; j < v.length; j++) {
    state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
    v[j] = state / 2147483648 - 1;
  }
}

/** Orthogonalises v against `basis` (two Gram–Schmidt passes) and normalises it; false if v ∈ span. */
function orthogonalise(v: Float64Array, basis: readonly Float64Array[]): boolean {
  const before = Math.sqrt(dot(v, v));
  for (let pass = 0; pass < 2; pass++) {
    for (const q of basis) {
      const proj = dot(q, v);
      for (let j = 0; j < v.length; j++) v[j] -= proj * q[j];
    }
  }
  const norm = Math.sqrt(dot(v, v));
  if (!(norm > 1e-10 * before) || norm < 1e-300) return false;
  for (let j = 0; j < v.length; j++) v[j] /= norm;
  return true;
}

/** A new unit vector orthogonal to `basis`, or null when `basis` already spans the space. */
function freshDirection(
  n: number,
  basis: readonly Float64Array[],
  seed: number,
): Float64Array | null {
  const v = new Float64Array(n);
  for (let attempt = 0; attempt < 4; attempt++) {
    fillDeterministic(v, seed + 7919 * attempt);
    if (orthogonalise(v, basis)) return v;
  }
  return null;
}

/** Real basis of the Ritz vectors of the `keep` largest-modulus Ritz values (pairs kept whole). */
function ritzCoefficients(evd: EigenvalueDecomposition, keep: number): number[][] {
  const re = evd.realEigenvalues;
  const im = evd.imaginaryEigenvalues;
  const order = re
    .map((_, k) => k)
    .sort((a, b) => Math.hypot(re[b], im[b]) - Math.hypot(re[a], im[a]));
  const chosen = new Set<number>();
  for (const k of order) {
    if (chosen.size >= keep) break;
    chosen.add(k);
    if (im[k] > 0) chosen.add(k + 1); // JAMA stores a conjugate pair as adjacent columns (re, im)
    if (im[k] < 0) chosen.add(k - 1);
  }
  const vectors = evd.eigenvectorMatrix;
  return [...chosen].sort((a, b) => a - b).map((k) => vectors.getColumn(k));
}

function combine(vectors: readonly Float64Array[], coefficients: readonly number[]): Float64Array {
  const out = new Float64Array(vectors[0].length);
  coefficients.forEach((c, r) => {
    if (c !== 0) for (let j = 0; j < out.length; j++) out[j] += c * vectors[r][j];
  });
  return out;
}

/**
 * |λ2| of T by thick-restarted Arnoldi on x ↦ x(T − 1s) using only sparse left products; `s` is
 * the stationary vector (any vector summing to 1 gives the same spectrum). Converged when the
 * largest Ritz modulus changes by less than `tolerance` (relative) from one restart to the next.
 * Throws PlumblineError `NO_CONVERGENCE` if it does not settle within `maxRestarts`.
 */
export function iterativeSecondEigenvalue(
  rows: AttentionRows,
  selfWeight: number,
  s: Float64Array,
  options: IterativeEigenOptions = {},
): number {
  const n = rows.n;
  if (n < 2) return 0;
  if (s.length !== n) throw new RangeError(`s has length ${s.length}, expected ${n}`);
  const keep = Math.min(options.blockSize ?? DEFAULTS.blockSize, n);
  const dimension = Math.min(
    Math.max(options.krylovDimension ?? DEFAULTS.krylovDimension, 2 * keep),
    n,
  );
  const tolerance = options.tolerance ?? DEFAULTS.tolerance;
  const maxRestarts = options.maxRestarts ?? DEFAULTS.maxRestarts;
  const start = new Float64Array(n);
  fillDeterministic(start, 1);
  orthogonalise(start, []);
  let basis: Float64Array[] = [start];
  let images: Float64Array[] = [];
  let previous = Number.NaN;
  for (let restart = 0; restart <= maxRestarts; restart++) {
    let complete = false;
    while (images.length < dimension) {
      const image = new Float64Array(n);
      deflatedProduct(rows, selfWeight, s, basis[images.length], image);
      images.push(image);
      if (basis.length === n) {
        complete = images.length === n;
        if (complete) break;
        continue;
      }
      const next = Float64Array.from(image);
      const extended = orthogonalise(next, basis)
        ? next
        : freshDirection(n, basis, 31 * basis.length);
      if (extended === null) break;
      basis.push(extended);
    }
    const m = images.length;
    // Rayleigh–Ritz: H = Vᵀ(MᵀV); the operator on column vectors is Mᵀ because M acts on rows.
    const h: number[][] = [];
    for (let r = 0; r < m; r++) {
      const line: number[] = [];
      for (let c = 0; c < m; c++) line.push(dot(basis[r], images[c]));
      h.push(line);
    }
    const evd = new EigenvalueDecomposition(new Matrix(h));
    const estimate = Math.min(
      1,
      Math.max(...evd.realEigenvalues.map((r, k) => Math.hypot(r, evd.imaginaryEigenvalues[k]))),
    );
    if (complete || m === basis.length) return estimate; // the space is invariant: exact
    if (Math.abs(estimate - previous) <= tolerance * Math.max(estimate, 1e-300)) return estimate;
    previous = estimate;
    // Thick restart: keep the wanted Ritz vectors (real form) and their images, then the residual.
    const residual = basis[m];
    const kept: Float64Array[] = [];
    const keptImages: Float64Array[] = [];
    for (const y of ritzCoefficients(evd, keep)) {
      const v = combine(basis.slice(0, m), y);
      const w = combine(images, y);
      for (let p = 0; p < kept.length; p++) {
        const proj = dot(kept[p], v);
        for (let j = 0; j < n; j++) {
          v[j] -= proj * kept[p][j];
          w[j] -= proj * keptImages[p][j];
        }
      }
      const norm = Math.sqrt(dot(v, v));
      if (!(norm > 1e-10)) continue;
      for (let j = 0; j < n; j++) {
        v[j] /= norm;
        w[j] /= norm;
      }
      kept.push(v);
      keptImages.push(w);
    }
    const next = orthogonalise(residual, kept) ? residual : freshDirection(n, kept, 977 * restart);
    basis = next === null ? kept : [...kept, next];
    images = keptImages;
  }
  throw new PlumblineError(
    "NO_CONVERGENCE",
    `the consensus speed (second eigenvalue) did not settle after ${maxRestarts} restarts: several influence patterns decay at almost the same rate; raise --background above 0 or collect more signals`,
    { hint: "Raise --background above 0 (default 1) or collect more signals." },
  );
}

/** |λ2| of T: dense for n ≤ 150, subspace iteration above. */
export function secondEigenvalue(rows: AttentionRows, selfWeight: number, s: Float64Array): number {
  return rows.n <= DEFAULTS.denseLimit
    ? denseSecondEigenvalue(rows, selfWeight)
    : iterativeSecondEigenvalue(rows, selfWeight, s);
}
