import { EigenvalueDecomposition, Matrix } from "ml-matrix";
/**
 * @module fixtures
 * Shared builders for the influence tests: seeded random count matrices and dense chains, a
 * typed loader for jstat (which ships no types), and polygamma functions for the gamma checks.
 */

import { createRequire } from "node:module";
import type { CountMatrix } from "../../src/domain/counts.js";
import type { Rng } from "../../src/ports/rng.js";

/** Count matrix from a dense array (diagonal and zeros dropped), members "m00", "m01", …. */
export function countsFromDense(dense: readonly (readonly number[])[]): CountMatrix {
  const n = dense.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (j !== i && dense[i][j] > 0) {
        cols.push(j);
        vals.push(dense[i][j]);
      }
    }
    rowPtr[i + 1] = cols.length;
  }
  const members = Array.from({ length: n }, (_, i) => `m${String(i).padStart(2, "0")}`);
  return { members, rowPtr, colIdx: Int32Array.from(cols), values: Float64Array.from(vals) };
}

/** Random dense counts: each off-diagonal cell is present with `density`, weight in (0, 6). */
export function randomDenseCounts(n: number, density: number, rng: Rng): number[][] {
  return Array.from({ length: n }, (_, i) =>
    Array.from({ length: n }, (_, j) => (j !== i && rng.next() < density ? 6 * rng.next() : 0)),
  );
}

/** A random row-stochastic dense matrix with a positive diagonal (irreducible, aperiodic). */
export function randomStochastic(n: number, rng: Rng): number[][] {
  return Array.from({ length: n }, () => {
    const row = Array.from({ length: n }, () => rng.next() ** 2 + 1e-3);
    const sum = row.reduce((a, b) => a + b, 0);
    return row.map((v) => v / sum);
  });
}

/** Dense matrix from a count matrix (zeros elsewhere). */
export function denseFromCounts(counts: CountMatrix): number[][] {
  const n = counts.members.length;
  const out = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let k = counts.rowPtr[i]; k < counts.rowPtr[i + 1]; k++) {
      out[i][counts.colIdx[k]] = counts.values[k];
    }
  }
  return out;
}

interface JStatGamma {
  cdf(x: number, shape: number, scale: number): number;
}

function hasGamma(value: unknown): value is { gamma: JStatGamma } {
  if ((typeof value !== "object" && typeof value !== "function") || value === null) return false;
  if (!("gamma" in value)) return false;
  const gamma: unknown = value.gamma;
  return (
    (typeof gamma === "function" || typeof gamma === "object") && gamma !== null && "cdf" in gamma
  );
}

/** jStat's gamma distribution, loaded through require and narrowed (jstat has no types). */
export function loadJStatGamma(): JStatGamma {
  const loaded: unknown = createRequire(import.meta.url)("jstat");
  if (!hasGamma(loaded)) throw new Error("jstat did not load as expected");
  return loaded.gamma;
}

// Polygamma by upward recurrence to x ≥ 12 and the asymptotic series of Abramowitz & Stegun
// (1964), Handbook of Mathematical Functions, 6.3.18 (ψ) and 6.4.11 (ψ⁽ⁿ⁾), with Bernoulli
// numbers B2…B12; the recurrences are 6.3.5 and 6.4.6.
const BERNOULLI = [1 / 6, -1 / 30, 1 / 42, -1 / 30, 5 / 66, -691 / 2730];

/** Digamma ψ(x) for x > 0. */
export function digamma(x: number): number {
  let shift = 0;
  let z = x;
  while (z < 12) {
    shift -= 1 / z;
    z += 1;
  }
  let series = Math.log(z) - 1 / (2 * z);
  BERNOULLI.forEach((b, k) => {
    const twoK = 2 * (k + 1);
    series -= b / (twoK * z ** twoK);
  });
  return series + shift;
}

function factorial(m: number): number {
  let f = 1;
  for (let k = 2; k <= m; k++) f *= k;
  return f;
}

/** Polygamma ψ⁽ᵐ⁾(x) for m ≥ 1, x > 0 (ψ' is the trigamma function). */
export function polygamma(m: number, x: number): number {
  const sign = m % 2 === 1 ? 1 : -1; // (−1)^(m+1)
  let shift = 0;
  let z = x;
  while (z < 12) {
    shift += (sign * factorial(m)) / z ** (m + 1);
    z += 1;
  }
  let series = factorial(m - 1) / z ** m + factorial(m) / (2 * z ** (m + 1));
  BERNOULLI.forEach((b, k) => {
    const twoK = 2 * (k + 1);
    series += (b * factorial(twoK + m - 1)) / (factorial(twoK) * z ** (twoK + m));
  });
  return sign * series + shift;
}

/** Sample mean and (unbiased) variance. */
export function meanVariance(xs: ArrayLike<number>): { mean: number; variance: number } {
  let mean = 0;
  for (let k = 0; k < xs.length; k++) mean += xs[k];
  mean /= xs.length;
  let ss = 0;
  for (let k = 0; k < xs.length; k++) ss += (xs[k] - mean) ** 2;
  return { mean, variance: ss / (xs.length - 1) };
}

/** Empirical quantile (linear interpolation between order statistics) of sorted data. */
export function quantile(sorted: readonly number[], p: number): number {
  const h = (sorted.length - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, sorted.length - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/**
 * CommonJS packages (graphology-generators, graphology-metrics): Node's ESM loader hands over
 * `module.exports`, while their typings describe it as `.default`; accept both.
 */
export function interop<T>(module: { default: T }): T {
  const loose = module as unknown as { default?: T };
  return loose.default ?? (module as unknown as T);
}

/**
 * Reference stationary vector of a row-stochastic dense matrix: ml-matrix's eigenvector of Tᵀ for
 * the eigenvalue nearest 1 (EigenvalueDecomposition, a port of JAMA), scaled to sum 1.
 */
export function mlMatrixStationary(t: readonly (readonly number[])[]): number[] {
  const evd = new EigenvalueDecomposition(new Matrix(t.map((row) => [...row])).transpose());
  const re = evd.realEigenvalues;
  let top = 0;
  re.forEach((v, k) => {
    if (Math.abs(v - 1) < Math.abs(re[top] - 1)) top = k;
  });
  const column = evd.eigenvectorMatrix.getColumn(top);
  const total = column.reduce((a, b) => a + b, 0);
  return column.map((v) => v / total);
}
