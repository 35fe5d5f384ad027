import fc from "fast-check";
import { DirectedGraph } from "graphology";
import { stronglyConnectedComponents } from "graphology-components";
import { describe, expect, it } from "vitest";
import { closedGroupPeriod, findClosedGroups } from "../../src/attention/closed-groups.js";
import { stronglyConnectedIndices } from "../../src/attention/strongly-connected.js";
import type { CountMatrix } from "../../src/domain/counts.js";

/** CSR counts from a dense 0/weight matrix (diagonal ignored). */
function csr(dense: readonly (readonly number[])[]): CountMatrix {
  const n = dense.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const values: number[] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      if (i !== j && dense[i][j] > 0) {
        cols.push(j);
        values.push(dense[i][j]);
      }
    }
    rowPtr[i + 1] = cols.length;
  }
  return {
    members: Array.from({ length: n }, (_, i) => `m${i}`),
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(values),
  };
}

describe("findClosedGroups", () => {
  // A reducible chain with two closed classes and a transient state (Seneta 2006, "Non-negative
  // Matrices and Markov Chains", ch. 1, classification of indices into essential and inessential).
  it("finds two closed classes and leaves the transient member out", () => {
    const counts = csr([
      [0, 2, 0, 0, 0],
      [1, 0, 0, 0, 0],
      [0, 0, 0, 3, 0],
      [0, 0, 1, 0, 0],
      [1, 0, 1, 0, 0],
    ]);
    expect(findClosedGroups(counts)).toEqual([
      [0, 1],
      [2, 3],
    ]);
  });

  it("treats an all-silent channel (even rows only) as one group", () => {
    expect(
      findClosedGroups(
        csr([
          [0, 0, 0],
          [0, 0, 0],
          [0, 0, 0],
        ]),
      ),
    ).toEqual([[0, 1, 2]]);
    expect(findClosedGroups(csr([[0]]))).toEqual([[0]]);
    expect(findClosedGroups(csr([]))).toEqual([]);
  });

  it("a silent member joins everyone when all attention leads to it, else it is transient", () => {
    // m0 and m1 both attend only to silent m2, whose even row returns to both: one class.
    expect(
      findClosedGroups(
        csr([
          [0, 0, 1],
          [0, 0, 1],
          [0, 0, 0],
        ]),
      ),
    ).toEqual([[0, 1, 2]]);
    // m0 ⇄ m1 closed; silent m2 attends to them but nobody attends to m2.
    expect(
      findClosedGroups(
        csr([
          [0, 1, 0],
          [1, 0, 0],
          [0, 0, 0],
        ]),
      ),
    ).toEqual([[0, 1]]);
  });
});

describe("closedGroupPeriod", () => {
  // Denardo 1977 (Math. Oper. Res. 2:20–24): the period is the gcd of the cycle lengths.
  it("a 3-cycle has period 3; adding a chord of length 2 makes it aperiodic", () => {
    const cycle = csr([
      [0, 1, 0],
      [0, 0, 1],
      [1, 0, 0],
    ]);
    expect(findClosedGroups(cycle)).toEqual([[0, 1, 2]]);
    expect(closedGroupPeriod(cycle, [0, 1, 2])).toBe(3);
    const chord = csr([
      [0, 1, 0],
      [1, 0, 1],
      [1, 0, 0],
    ]);
    expect(closedGroupPeriod(chord, [0, 1, 2])).toBe(1);
  });

  it("a two-member exchange has period 2; the implicit even rows count as edges", () => {
    expect(
      closedGroupPeriod(
        csr([
          [0, 1],
          [1, 0],
        ]),
        [0, 1],
      ),
    ).toBe(2);
    expect(
      closedGroupPeriod(
        csr([
          [0, 0],
          [0, 0],
        ]),
        [0, 1],
      ),
    ).toBe(2);
    // Silent m2 ↔ {m0, m1}: every cycle alternates sides, so period 2.
    expect(
      closedGroupPeriod(
        csr([
          [0, 0, 1],
          [0, 0, 1],
          [0, 0, 0],
        ]),
        [0, 1, 2],
      ),
    ).toBe(2);
    expect(
      closedGroupPeriod(
        csr([
          [0, 0, 0],
          [0, 0, 0],
          [0, 0, 0],
        ]),
        [0, 1, 2],
      ),
    ).toBe(1);
    expect(closedGroupPeriod(csr([[0]]), [0])).toBe(1);
  });
});

/** Reference by definition: dense β = 0 adjacency, reachability closure, cycle-length gcd. */
function reference(dense: readonly (readonly number[])[]): {
  groups: number[][];
  periods: number[];
} {
  const n = dense.length;
  const edge = dense.map((row, i) => {
    const silent = row.every((w, j) => j === i || w === 0);
    return row.map((w, j) => j !== i && (silent || w > 0));
  });
  const reach = edge.map((row, i) => row.map((e, j) => e || i === j));
  for (let k = 0; k < n; k++)
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) if (reach[i][k] && reach[k][j]) reach[i][j] = true;
  const groups: number[][] = [];
  for (let i = 0; i < n; i++) {
    const cls = [...Array(n).keys()].filter((j) => reach[i][j] && reach[j][i]);
    const closed = [...Array(n).keys()].every((j) => !reach[i][j] || reach[j][i]);
    if (closed && cls[0] === i) groups.push(cls);
  }
  const gcd = (a: number, b: number): number => (b === 0 ? a : gcd(b, a % b));
  const periods = groups.map((cls) => {
    if (cls.length === 1) return 1;
    let power = cls.map((i) => cls.map((j) => edge[i][j]));
    let period = 0;
    // Every simple cycle has length ≤ |class|, and the period is the gcd of their lengths.
    for (let k = 1; k <= cls.length; k++) {
      if (power.some((row, a) => row[a])) period = gcd(period, k);
      power = power.map((row) => cls.map((_, b) => row.some((x, c) => x && edge[cls[c]][cls[b]])));
    }
    return period;
  });
  return { groups, periods };
}

describe("agrees with the definitions on random small graphs", () => {
  it("closed groups and periods", () => {
    const matrix = fc.integer({ min: 1, max: 7 }).chain((n) =>
      fc.array(fc.array(fc.constantFrom(0, 0, 0, 1, 2), { minLength: n, maxLength: n }), {
        minLength: n,
        maxLength: n,
      }),
    );
    fc.assert(
      fc.property(matrix, (dense) => {
        const counts = csr(dense);
        const expected = reference(dense);
        const groups = findClosedGroups(counts);
        expect(groups).toEqual(expected.groups);
        expect(groups.map((g) => closedGroupPeriod(counts, g))).toEqual(expected.periods);
      }),
      { numRuns: 500, seed: 20261102 },
    );
  });
});

describe("deep attention paths", () => {
  it("a 30 000-member cycle is one closed group of period 30 000", () => {
    // Too deep for graphology-components' recursion (it overflows near 10⁴), so this exercises the
    // explicit-stack Tarjan; a directed n-cycle has period n (Denardo 1977).
    const n = 30_000;
    const counts: CountMatrix = {
      members: Array.from({ length: n }, (_, i) => `m${String(i).padStart(5, "0")}`),
      rowPtr: Int32Array.from({ length: n + 1 }, (_, i) => i),
      colIdx: Int32Array.from({ length: n }, (_, i) => (i + 1) % n),
      values: new Float64Array(n).fill(1),
    };
    const groups = findClosedGroups(counts);
    expect(groups).toHaveLength(1);
    expect(groups[0]).toHaveLength(n);
    expect(closedGroupPeriod(counts, groups[0])).toBe(n);
  });

  it("the explicit-stack components agree with graphology-components", () => {
    const matrix = fc.integer({ min: 1, max: 12 }).chain((n) =>
      fc.array(fc.array(fc.constantFrom(0, 0, 0, 1), { minLength: n, maxLength: n }), {
        minLength: n,
        maxLength: n,
      }),
    );
    const canonical = (components: number[][]): number[][] =>
      components.map((c) => [...c].sort((a, b) => a - b)).sort((a, b) => a[0] - b[0]);
    fc.assert(
      fc.property(matrix, (dense) => {
        const counts = csr(dense);
        const graph = new DirectedGraph();
        dense.forEach((_, i) => {
          graph.addNode(String(i));
        });
        dense.forEach((row, i) => {
          row.forEach((w, j) => {
            if (i !== j && w > 0) graph.addDirectedEdge(String(i), String(j));
          });
        });
        const library = stronglyConnectedComponents(graph).map((c) => c.map(Number));
        expect(canonical(stronglyConnectedIndices(counts))).toEqual(canonical(library));
      }),
      { numRuns: 300, seed: 7 },
    );
  });
});
