import { describe, expect, it } from "vitest";
import { pointAttentionRows, rowsFromDense } from "../../src/influence/attention-rows.js";
import { denseStationaryVector } from "../../src/influence/dense-stationary.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, mlMatrixStationary, randomDenseCounts } from "./fixtures.js";

// The dense GTH solve (Grassmann, Taksar & Heyman 1985, Operations Research 33(5):1107–1116)
// that stationaryVector falls back to when the power method would crawl.
describe("dense GTH stationary vector", () => {
  it("Land of Oz: (2/5, 1/5, 2/5) (Grinstead & Snell 1997, Introduction to Probability, §11.3)", () => {
    // GTH never reads the diagonal, so the chain's self-loops (1/2, 0, 1/2) play no part.
    const oz = [
      [1 / 2, 1 / 4, 1 / 4],
      [1 / 2, 0, 1 / 2],
      [1 / 4, 1 / 4, 1 / 2],
    ];
    const s = denseStationaryVector(rowsFromDense(oz));
    expect(s).not.toBeNull();
    [2 / 5, 1 / 5, 2 / 5].forEach((v, j) => {
      expect(Math.abs((s as Float64Array)[j] - v)).toBeLessThan(1e-14);
    });
  });

  it("agrees with ml-matrix's left eigenvector for eigenvalue 1 on random sparse rooms", () => {
    const rng = createSeededRng(41);
    for (const n of [5, 30, 120]) {
      const counts = countsFromDense(randomDenseCounts(n, 0.2, rng));
      const rows = pointAttentionRows(counts, 1);
      const s = denseStationaryVector(rows) as Float64Array;
      const t: number[][] = [];
      for (let i = 0; i < n; i++) {
        const row = new Array<number>(n).fill(rows.rest[i]);
        row[i] = 0;
        for (let k = rows.rowPtr[i]; k < rows.rowPtr[i + 1]; k++)
          row[rows.colIdx[k]] += rows.values[k];
        t.push(row);
      }
      const eigen = mlMatrixStationary(t);
      for (let j = 0; j < n; j++) expect(Math.abs(eigen[j] - s[j])).toBeLessThan(1e-10);
    }
  });

  it("returns null for a room with two closed groups (no unique answer)", () => {
    const rows = pointAttentionRows(
      countsFromDense([
        [0, 2, 0, 0],
        [2, 0, 0, 0],
        [0, 0, 0, 1],
        [0, 0, 1, 0],
      ]),
      0,
    );
    expect(denseStationaryVector(rows)).toBeNull();
  });
});
