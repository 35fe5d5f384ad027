/**
 * @module attention-rows
 * The one representation every influence numeric works on: a sparse row-stochastic matrix A held
 * as stored entries plus a "rest" per row along a profile p (all ones unless given),
 * A_ij = values_ij + rest_i·p_j for j ≠ i and A_ii = values_ii. The prior part of DESIGN.md §4.4
 * (the channel's attention profile, m^(i) = m without entry i) is a rank-one term minus its
 * diagonal, so it never has
 * to be materialised: a left product x·A costs O(nonzeros + n), which is what makes power
 * iteration on the attention matrix cheap (the same device as the rank-one teleportation term of
 * PageRank; Brin & Page 1998, "The anatomy of a large-scale hypertextual Web search engine",
 * Computer Networks and ISDN Systems 30:107–117). T = σI + (1−σ)A is never stored either.
 */

import type { CountMatrix } from "../domain/counts.js";
import { PlumblineError } from "../domain/errors.js";

/**
 * A row-stochastic n×n matrix: A_ij = values_ij + rest_i·p_j for every j ≠ i (p = `profile`, or 1),
 * A_ii = values_ii.
 * Stored entries may include the diagonal and may be negative (a correction); rows sum to 1.
 * `rowPtr` and `colIdx` may be shared with the `CountMatrix` they came from: treat them as
 * read-only.
 */
export interface AttentionRows {
  readonly n: number;
  /** Length n + 1; row i occupies [rowPtr[i], rowPtr[i+1]). */
  readonly rowPtr: Int32Array;
  readonly colIdx: Int32Array;
  readonly values: Float64Array;
  /** Length n: the weight row i puts on every other member j (times p_j) on top of its stored entries. */
  readonly rest: Float64Array;
  /**
   * Non-negative profiles the rest follows, `profiles` × n values (profile q occupies
   * [q·n, (q+1)·n)); absent = 1 for every member.
   */
  readonly profile?: Float64Array;
  /** Per row, the index of its profile (length n); absent = profile 0 for every row. */
  readonly profileOf?: Int32Array;
}

/** p_j of row i's profile (1 when the rows have no profile). */
export function profileValue(rows: AttentionRows, i: number, j: number): number {
  const { profile, profileOf } = rows;
  if (!profile) return 1;
  return profile[(profileOf ? profileOf[i] : 0) * rows.n + j];
}

/** Guards the background setting β of DESIGN.md §4. */
export function checkBackground(background: number): void {
  if (!Number.isFinite(background) || background < 0) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `background must be a finite number of at least 0, got ${background}: set --background to 0 or more (default 1)`,
      { hint: "Set --background to 0 or more (default 1)." },
    );
  }
}

/**
 * The point estimate of DESIGN.md §4.4: values_ij = C_ij/(c_i+β), rest_i = b/(c_i+β) with
 * b = β/(n−1); a row with c_i = 0 is even (rest_i = 1/(n−1)), also when β = 0.
 * The structure arrays are shared with `counts`.
 */
export function pointAttentionRows(counts: CountMatrix, background: number): AttentionRows {
  checkBackground(background);
  const n = counts.members.length;
  const { rowPtr, colIdx } = counts;
  const values = new Float64Array(counts.values.length);
  const rest = new Float64Array(n);
  if (n < 2) return { n, rowPtr, colIdx, values, rest };
  const b = background / (n - 1);
  for (let i = 0; i < n; i++) {
    const lo = rowPtr[i];
    const hi = rowPtr[i + 1];
    let total = 0;
    for (let k = lo; k < hi; k++) total += counts.values[k];
    if (total <= 0) {
      rest[i] = 1 / (n - 1);
      continue;
    }
    const denominator = total + background;
    for (let k = lo; k < hi; k++) values[k] = counts.values[k] / denominator;
    rest[i] = b / denominator;
  }
  return { n, rowPtr, colIdx, values, rest };
}

/**
 * Any square row-stochastic matrix (diagonal included) as `AttentionRows` with rest 0, so that
 * with selfWeight 0 the transition matrix is the matrix itself. For tests and textbook cases.
 */
export function rowsFromDense(matrix: readonly (readonly number[])[]): AttentionRows {
  const n = matrix.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  for (let i = 0; i < n; i++) {
    const row = matrix[i];
    if (row.length !== n) throw new RangeError(`row ${i} has ${row.length} entries, expected ${n}`);
    let sum = 0;
    for (let j = 0; j < n; j++) {
      const v = row[j];
      if (!Number.isFinite(v) || v < 0) throw new RangeError(`entry (${i},${j}) is ${v}`);
      sum += v;
      if (v !== 0) {
        cols.push(j);
        vals.push(v);
      }
    }
    if (Math.abs(sum - 1) > 1e-9) throw new RangeError(`row ${i} sums to ${sum}, not 1`);
    rowPtr[i + 1] = cols.length;
  }
  return {
    n,
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(vals),
    rest: new Float64Array(n),
  };
}

/** T = σI + (1−σ)A as a dense array, for small cases and the dense eigen-solver. */
export function denseTransition(rows: AttentionRows, selfWeight: number): number[][] {
  const { n, rowPtr, colIdx, values, rest } = rows;
  const out: number[][] = [];
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    for (let j = 0; j < n; j++) row[j] = (1 - selfWeight) * rest[i] * profileValue(rows, i, j);
    row[i] = selfWeight;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) row[colIdx[k]] += (1 - selfWeight) * values[k];
    out.push(row);
  }
  return out;
}

/**
 * out = x·A in O(nonzeros + q·n) for q profiles: (xA)_j = Σ_i x_i values_ij
 * + Σ_c p^c_j R_c − x_j rest_j p^{c(j)}_j, R_c = Σ_{i in profile c} x_i rest_i.
 * `out` must not be `x`. Returns `out`.
 */
export function leftMultiply(
  rows: AttentionRows,
  x: Float64Array,
  out: Float64Array,
): Float64Array {
  const { n, rowPtr, colIdx, values, rest, profile, profileOf } = rows;
  if (!profile) {
    let restTotal = 0;
    for (let i = 0; i < n; i++) restTotal += x[i] * rest[i];
    for (let j = 0; j < n; j++) out[j] = restTotal - x[j] * rest[j];
  } else if (!profileOf) {
    let restTotal = 0;
    for (let i = 0; i < n; i++) restTotal += x[i] * rest[i];
    for (let j = 0; j < n; j++) out[j] = profile[j] * (restTotal - x[j] * rest[j]);
  } else if (profile.length === n) {
    // One profile (every row's profileOf is 0): the branch below without its per-call array and
    // index lookups, the same operations in the same order (so the same numbers).
    let r = 0;
    for (let i = 0; i < n; i++) r += x[i] * rest[i];
    for (let j = 0; j < n; j++) out[j] = -x[j] * rest[j] * profile[j];
    if (r !== 0) for (let j = 0; j < n; j++) out[j] += r * profile[j];
  } else {
    const q = profile.length / n;
    const totals = new Float64Array(q);
    for (let i = 0; i < n; i++) totals[profileOf[i]] += x[i] * rest[i];
    for (let j = 0; j < n; j++) out[j] = -x[j] * rest[j] * profile[profileOf[j] * n + j];
    for (let c = 0; c < q; c++) {
      const r = totals[c];
      if (r === 0) continue;
      const base = c * n;
      for (let j = 0; j < n; j++) out[j] += r * profile[base + j];
    }
  }
  for (let i = 0; i < n; i++) {
    const xi = x[i];
    if (xi === 0) continue;
    const hi = rowPtr[i + 1];
    for (let k = rowPtr[i]; k < hi; k++) out[colIdx[k]] += xi * values[k];
  }
  return out;
}

/** A_ij for j ≠ i, the stored entry (if any) plus the rest part. */
export function rowEntry(rows: AttentionRows, i: number, j: number): number {
  let a = i === j ? 0 : rows.rest[i] * profileValue(rows, i, j);
  for (let k = rows.rowPtr[i]; k < rows.rowPtr[i + 1]; k++)
    if (rows.colIdx[k] === j) a += rows.values[k];
  return a;
}

/**
 * The same matrix with a uniform rest (profile all ones): rows whose rest follows a profile are
 * written out in full (n − 1 stored entries, rest 0). For transforms that treat a row's
 * unobserved targets as one block of equal parts (the what-if cap).
 */
export function withUniformRest(rows: AttentionRows): AttentionRows {
  const { n, rowPtr, colIdx, values, rest } = rows;
  if (!rows.profile) return rows;
  const ptr = new Int32Array(n + 1);
  const cols = new Int32Array(n * Math.max(0, n - 1));
  const vals = new Float64Array(n * Math.max(0, n - 1));
  const dense = new Float64Array(n);
  let p = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) dense[j] = rest[i] * profileValue(rows, i, j);
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) dense[colIdx[k]] += values[k];
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      cols[p] = j;
      vals[p] = dense[j];
      p++;
    }
    ptr[i + 1] = p;
  }
  return { n, rowPtr: ptr, colIdx: cols, values: vals, rest: new Float64Array(n) };
}

/** Attention received: the column sums of A (1 = receives as much as it gives). */
export function columnSums(rows: AttentionRows): Float64Array {
  const ones = new Float64Array(rows.n).fill(1);
  return leftMultiply(rows, ones, new Float64Array(rows.n));
}
