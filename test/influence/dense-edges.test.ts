/**
 * The dense GTH solve (Grassmann, Taksar & Heyman 1985) on inputs the random rooms never make:
 * a row's rest next to a row without one, a stored correction that leaves −1e−17 in a column
 * nobody truly attends to, an absorbing member, and its size guard's message. Each expected vector
 * is derived in place from sA = s. Written for the mutation run of issue 18 (docs/testing.md).
 */
import { describe, expect, it } from "vitest";
import { type AttentionRows, rowsFromDense } from "../../src/influence/attention-rows.js";
import {
  DENSE_STATIONARY_LIMIT,
  denseStationaryVector,
} from "../../src/influence/dense-stationary.js";

/** Rows from stored entries per row ([column, value] pairs) and a rest per row. */
function rowsOf(entries: readonly (readonly [number, number])[][], rest: number[]): AttentionRows {
  const n = entries.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  entries.forEach((row, i) => {
    for (const [j, v] of row) {
      cols.push(j);
      vals.push(v);
    }
    rowPtr[i + 1] = cols.length;
  });
  return {
    n,
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(vals),
    rest: Float64Array.from(rest),
  };
}

describe("dense GTH edges", () => {
  it("a rest on row 0 and none on row 1: 0 → {1, 2} evenly, 1 → 2, 2 → 0 gives (0.4, 0.2, 0.4)", () => {
    // Row 0 is all rest (½ to each other member); rows 1 and 2 are stored entries only.
    // Derived: s_0 = s_2, s_1 = s_0/2, s_2 = s_0/2 + s_1 = s_0, so s = (1, ½, 1)/2.5.
    const x = denseStationaryVector(rowsOf([[], [[2, 1]], [[0, 1]]], [0.5, 0, 0]));
    expect(x).not.toBeNull();
    const expected = [0.4, 0.2, 0.4];
    for (let j = 0; j < 3; j++) expect(Math.abs((x?.[j] ?? 0) - expected[j])).toBeLessThan(1e-15);
  });

  it("a −1e−17 correction in a column nobody attends to leaves that member's share exactly 0", () => {
    // 0 → 1 → 3 → 0 is a cycle, s = (⅓, ⅓, 0, ⅓); member 2 only gives (to 0) and receives nothing,
    // except a stored correction of −1e−17 on 3 → 2, which the solve clamps to 0.
    const x = denseStationaryVector(
      rowsOf(
        [
          [[1, 1]],
          [[3, 1]],
          [[0, 1]],
          [
            [0, 1],
            [2, -1e-17],
          ],
        ],
        [0, 0, 0, 0],
      ),
    );
    expect(x).not.toBeNull();
    expect(Object.is(x?.[2], 0)).toBe(true);
    for (const j of [0, 1, 3]) expect(Math.abs((x?.[j] ?? 0) - 1 / 3)).toBeLessThan(1e-15);
  });

  it("an absorbing member (attends only to themself) cannot reach the others: null", () => {
    expect(
      denseStationaryVector(
        rowsFromDense([
          [0, 1],
          [0, 1],
        ]),
      ),
    ).toBeNull();
  });

  it("the size guard names the limit", () => {
    const n = DENSE_STATIONARY_LIMIT + 1;
    const big = rowsOf(
      Array.from({ length: n }, () => []),
      new Array<number>(n).fill(1 / (n - 1)),
    );
    expect(() => denseStationaryVector(big)).toThrow(`n ≤ ${DENSE_STATIONARY_LIMIT}`);
  });
});
