/**
 * The what-if cap and the period compare: invariants that follow from their definitions
 * (DESIGN.md §6), plus property tests with fast-check.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { comparePeriods } from "../../src/analysis/compare-periods.js";
import { whatIfCap } from "../../src/analysis/what-if.js";
import type { CountMatrix } from "../../src/domain/counts.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { pointAttentionRows } from "../../src/influence/attention-rows.js";
import { capAttentionRows } from "../../src/influence/cap-attention.js";
import { mentionEvents, snapshotOf, T0 } from "./log-builders.js";

function denseRow(rows: ReturnType<typeof pointAttentionRows>, i: number): number[] {
  const out = Array.from({ length: rows.n }, (_, j) => (j === i ? 0 : rows.rest[i]));
  for (let k = rows.rowPtr[i]; k < rows.rowPtr[i + 1]; k++) out[rows.colIdx[k]] += rows.values[k];
  return out;
}

function countsFrom(matrix: number[][]): CountMatrix {
  const n = matrix.length;
  const rowPtr = new Int32Array(n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  matrix.forEach((row, i) => {
    row.forEach((v, j) => {
      if (i !== j && v > 0) {
        cols.push(j);
        vals.push(v);
      }
    });
    rowPtr[i + 1] = cols.length;
  });
  return {
    members: matrix.map((_, i) => `m${i}`),
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(vals),
  };
}

describe("what-if cap", () => {
  it("caps every part at the cap, keeps rows stochastic, spreads the excess in proportion", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 8 }).chain((n) =>
          fc.tuple(
            fc.constant(n),
            fc.array(fc.array(fc.integer({ min: 0, max: 30 }), { minLength: n, maxLength: n }), {
              minLength: n,
              maxLength: n,
            }),
            fc.double({ min: 1 / (n - 1), max: 0.9, noNaN: true }),
            fc.constantFrom(0, 0.5, 1, 3),
          ),
        ),
        ([n, matrix, cap, background]) => {
          const rows = pointAttentionRows(countsFrom(matrix), background);
          const capped = capAttentionRows(rows, cap);
          for (let i = 0; i < n; i++) {
            const before = denseRow(rows, i);
            const after = denseRow(capped, i);
            const sum = after.reduce((a, b) => a + b, 0);
            expect(sum).toBeCloseTo(1, 10);
            for (let j = 0; j < n; j++) expect(after[j]).toBeLessThanOrEqual(cap + 1e-12);
            // Parts under the cap after capping keep their proportions to each other.
            const free = after
              .map((v, j) => (j !== i && v < cap - 1e-9 ? j : -1))
              .filter((j) => j >= 0);
            if (free.length >= 2 && before[free[0]] > 0) {
              const ratioBefore = before[free[1]] / before[free[0]];
              const ratioAfter = after[free[1]] / after[free[0]];
              expect(ratioAfter).toBeCloseTo(ratioBefore, 8);
            }
          }
        },
      ),
      { numRuns: 120, seed: 2026 },
    );
  });

  it("a cap of 1 changes nothing; a cap below an even split is refused with the fix", () => {
    const rows = pointAttentionRows(
      countsFrom([
        [0, 5, 1],
        [2, 0, 2],
        [9, 1, 0],
      ]),
      1,
    );
    const same = capAttentionRows(rows, 1);
    for (let i = 0; i < 3; i++) expect(denseRow(same, i)).toEqual(denseRow(rows, i));
    expect(() => capAttentionRows(rows, 0.4)).toThrowError(
      expect.objectContaining({ code: "CAP_INFEASIBLE" }),
    );
  });

  it("capping attention to a hub lowers its share and raises effective voices", () => {
    const leaves = ["b", "c", "d", "e", "f", "g"];
    const pairs = leaves.flatMap((l, k) => [
      [l, "a", 20] as [string, string, number],
      [l, leaves[(k + 1) % leaves.length], 2] as [string, string, number],
      ["a", l, 2] as [string, string, number],
    ]);
    const result = whatIfCap(
      snapshotOf(mentionEvents(pairs)),
      { ...DEFAULT_SETTINGS, halfLifeDays: 0, seed: 5, samples: 50 },
      { cap: 0.3 },
    );
    expect(result.before.top?.member).toBe("a");
    expect(result.change.topShare).toBeLessThan(0);
    expect(result.change.effectiveVoices).toBeGreaterThan(0);
  });
});

describe("compare periods", () => {
  const day = 86_400_000;
  const weekOne = mentionEvents(
    ["b", "c", "d", "e", "f"]
      .map((l) => [l, "a", 8] as [string, string, number])
      .concat([["a", "b", 3]]),
  );
  const later = ["a", "b", "c", "d", "e", "f"].flatMap((u, k, all) => [
    { from: u, to: all[(k + 1) % 6] },
    { from: u, to: all[(k + 2) % 6] },
  ]);
  const events = [...weekOne];
  let id = 0;
  for (let rep = 0; rep < 4; rep++) {
    for (const { from, to } of later) {
      events.push({
        type: "message",
        at: T0 + 10 * day + id++ * 60_000,
        channel: "c1",
        id: `late${id}`,
        author: from,
        mentions: [to],
      });
    }
  }
  const snapshot = snapshotOf(events);
  const settings = { ...DEFAULT_SETTINGS, halfLifeDays: 0, seed: 9, samples: 200 };
  const a = parseDateRange("2026-11-01..2026-11-07");
  const b = parseDateRange("2026-11-10..2026-11-16");

  it("a hub-dominated week against an even ring: B is very likely more balanced", () => {
    const result = comparePeriods(snapshot, settings, { a, b });
    expect(result.a.report.top?.member).toBe("a");
    expect(result.change.balance).toBeGreaterThan(0.2);
    expect(result.pBMoreBalanced).toBeGreaterThan(0.95);
  });

  it("a period against itself: probability exactly one half (paired draws are identical)", () => {
    const result = comparePeriods(snapshot, settings, { a: b, b });
    expect(result.pBMoreBalanced).toBe(0.5);
    expect(result.change.balance).toBe(0);
  });

  it("ranges: both days included, bad ranges named", () => {
    expect(parseDateRange("2026-11-01..2026-11-07").days).toBe(7);
    expect(() => parseDateRange("2026-11-07..2026-11-01")).toThrowError(
      expect.objectContaining({ code: "RANGE_BAD" }),
    );
    expect(() => parseDateRange("2026-02-30..2026-03-01")).toThrowError(
      expect.objectContaining({ code: "RANGE_BAD" }),
    );
    expect(() => parseDateRange("last week")).toThrowError(
      expect.objectContaining({ code: "RANGE_BAD" }),
    );
  });
});
