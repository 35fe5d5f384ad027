/**
 * @module contributors
 * Who makes the top member's share (DESIGN.md §4.7): member i's part of s_j is s_i·A_ij / s_j for
 * i ≠ j. From s = sT with T = σI + (1−σ)A and A_jj = 0 it follows that Σ_{i≠j} s_i A_ij = s_j, so
 * the parts sum to 1 (derived).
 */
import { type AttentionRows, rowEntry } from "./attention-rows.js";

/** Parts of member j's share contributed by each other member, indexed by member (j's own is 0). */
export function contributorsTo(
  rows: AttentionRows,
  shares: ArrayLike<number>,
  j: number,
): Float64Array {
  const parts = new Float64Array(rows.n);
  if (!(shares[j] > 0)) return parts;
  for (let i = 0; i < rows.n; i++) {
    if (i === j) continue;
    parts[i] = (shares[i] * rowEntry(rows, i, j)) / shares[j];
  }
  return parts;
}
