/**
 * The dense solve's size limit from the inside: n = DENSE_STATIONARY_LIMIT (3,000) is solved, not
 * refused (n + 1 is refused: engine-edges.test.ts). Kept apart from engine-edges because under
 * Stryker's instrumentation its O(n²) loops take minutes: the mutation runs leave this file out
 * (docs/testing.md).
 */
import { describe, expect, it } from "vitest";
import type { AttentionRows } from "../../src/influence/attention-rows.js";
import {
  DENSE_STATIONARY_LIMIT,
  denseStationaryVector,
} from "../../src/influence/dense-stationary.js";

describe("dense stationary vector at its size limit", () => {
  it("the dense solve takes n = 3,000 itself: all attend to 0, 0 to 1 gives s = (½, ½, 0, …)", () => {
    // Derived: s_1 = s_0 (only 0 attends to 1), s_0 = Σ_{i≥1} s_i, s_k = 0 for k ≥ 2 (nobody attends
    // to them). Every other column is empty, so elimination skips them: O(n²), not O(n³).
    const n = DENSE_STATIONARY_LIMIT;
    const rowPtr = new Int32Array(n + 1);
    for (let i = 0; i < n; i++) rowPtr[i + 1] = i + 1;
    const colIdx = new Int32Array(n);
    colIdx[0] = 1;
    const rows: AttentionRows = {
      n,
      rowPtr,
      colIdx,
      values: new Float64Array(n).fill(1),
      rest: new Float64Array(n),
    };
    const x = denseStationaryVector(rows);
    expect(x).not.toBeNull();
    expect(x?.[0]).toBeCloseTo(0.5, 14);
    expect(x?.[1]).toBeCloseTo(0.5, 14);
    let others = 0;
    for (let k = 2; k < n; k++) others += Math.abs(x?.[k] ?? 1);
    expect(others).toBe(0);
  });
});
