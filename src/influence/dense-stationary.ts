/**
 * @module dense-stationary
 * The stationary vector of a row-stochastic matrix by the GTH algorithm (Grassmann, Taksar &
 * Heyman 1985, "Regenerative analysis and steady state distributions for Markov chains",
 * Operations Research 33(5):1107–1116; also Stewart 1994, "Introduction to the Numerical Solution
 * of Markov Chains", §2.7): Gaussian elimination that forms every pivot as a sum of off-diagonal
 * entries, so there are no subtractions and the result is accurate to rounding even when the
 * chain nearly splits into groups that barely attend to each other — exactly where the power
 * method crawls. O(n³/3) operations and n² doubles of memory; the diagonal is never read, so the
 * self-weight σ (which does not change the stationary vector) plays no part.
 */

import { type AttentionRows, profileValue } from "./attention-rows.js";

/** Largest n solved densely (n² doubles: 72 MB at 3,000). */
export const DENSE_STATIONARY_LIMIT = 3000;

/**
 * GTH on A (off-diagonal part of `rows`). Returns null when some state cannot reach the states
 * eliminated before it (the matrix is reducible there): the caller decides what that means.
 */
export function denseStationaryVector(rows: AttentionRows): Float64Array | null {
  const { n, rowPtr, colIdx, values, rest } = rows;
  if (n > DENSE_STATIONARY_LIMIT)
    throw new RangeError(`dense solve limited to n ≤ ${DENSE_STATIONARY_LIMIT}`);
  const a = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    const r = rest[i];
    if (r !== 0) for (let j = 0; j < n; j++) a[base + j] = r * profileValue(rows, i, j);
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) a[base + colIdx[k]] += values[k];
    a[base + i] = 0;
    // Stored corrections can leave −1e−17 where an entry is truly 0.
    for (let j = 0; j < n; j++) if (a[base + j] < 0) a[base + j] = 0;
  }
  // Eliminate states n−1, …, 1: fold state k's transitions into the states before it.
  for (let k = n - 1; k >= 1; k--) {
    const rowK = k * n;
    let s = 0;
    for (let j = 0; j < k; j++) s += a[rowK + j];
    if (!(s > 0)) return null;
    for (let i = 0; i < k; i++) {
      const base = i * n;
      const f = a[base + k] / s;
      a[base + k] = f;
      if (f === 0) continue;
      for (let j = 0; j < k; j++) a[base + j] += f * a[rowK + j];
    }
  }
  const x = new Float64Array(n);
  x[0] = 1;
  let total = 1;
  for (let k = 1; k < n; k++) {
    let v = 0;
    for (let i = 0; i < k; i++) v += x[i] * a[i * n + k];
    x[k] = v;
    total += v;
  }
  for (let j = 0; j < n; j++) x[j] /= total;
  return x;
}
