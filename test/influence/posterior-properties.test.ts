import fc from "fast-check";
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { describe, expect, it } from "vitest";
import type { CountMatrix } from "../../src/domain/counts.js";
import { denseTransition, pointAttentionRows } from "../../src/influence/attention-rows.js";
import { posteriorShares } from "../../src/influence/posterior-draws.js";
import { denseSecondEigenvalue } from "../../src/influence/second-eigenvalue.js";
import { stationaryVector } from "../../src/influence/stationary-vector.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, quantile, randomDenseCounts } from "./fixtures.js";

const denseCounts = fc.integer({ min: 2, max: 10 }).chain((n) =>
  fc.array(
    fc.array(fc.oneof(fc.constant(0), fc.double({ min: 0.01, max: 9, noNaN: true })), {
      minLength: n,
      maxLength: n,
    }),
    { minLength: n, maxLength: n },
  ),
);

function interval(draws: Float64Array[], i: number, level = 0.9): [number, number] {
  const values = draws.map((d) => d[i]).sort((a, b) => a - b);
  return [quantile(values, (1 - level) / 2), quantile(values, (1 + level) / 2)];
}

function scaled(counts: CountMatrix, factor: number): CountMatrix {
  return { ...counts, values: counts.values.map((v) => v * factor) };
}

describe("influence share properties", () => {
  it("shares are ≥ 0, sum to 1 and solve sT = s", () => {
    // The definition of DESIGN.md §1 (stationary distribution, common practice).
    fc.assert(
      fc.property(
        denseCounts,
        fc.double({ min: 0.05, max: 3, noNaN: true }),
        fc.double({ min: 0, max: 0.9, noNaN: true }),
        (dense, beta, sigma) => {
          const rows = pointAttentionRows(countsFromDense(dense), beta);
          const s = stationaryVector(rows, { selfWeight: sigma }).vector;
          expect(Math.abs(s.reduce((a, b) => a + b, 0) - 1)).toBeLessThan(1e-12);
          for (const v of s) expect(v).toBeGreaterThanOrEqual(0);
          const t = denseTransition(rows, sigma);
          let residual = 0;
          for (let j = 0; j < s.length; j++) {
            residual += Math.abs(t.reduce((acc, row, i) => acc + s[i] * row[j], 0) - s[j]);
          }
          expect(residual).toBeLessThan(1e-10);
        },
      ),
      { seed: 11, numRuns: 60 },
    );
  });

  it("relabelling members permutes s", () => {
    fc.assert(
      fc.property(denseCounts, fc.integer({ min: 0, max: 2 ** 31 - 1 }), (dense, seed) => {
        const n = dense.length;
        const rng = createSeededRng(seed);
        const perm = Array.from({ length: n }, (_, i) => i);
        for (let i = n - 1; i > 0; i--) {
          const j = Math.floor(rng.next() * (i + 1));
          [perm[i], perm[j]] = [perm[j], perm[i]];
        }
        const relabelled = Array.from({ length: n }, () => new Array<number>(n).fill(0));
        dense.forEach((row, i) => {
          row.forEach((v, j) => {
            relabelled[perm[i]][perm[j]] = v;
          });
        });
        const s = stationaryVector(pointAttentionRows(countsFromDense(dense), 1), {
          selfWeight: 0.5,
        });
        const p = stationaryVector(pointAttentionRows(countsFromDense(relabelled), 1), {
          selfWeight: 0.5,
        });
        for (let i = 0; i < n; i++)
          expect(Math.abs(p.vector[perm[i]] - s.vector[i])).toBeLessThan(1e-10);
      }),
      { seed: 12, numRuns: 50 },
    );
  });

  it("σ changes the speed of averaging, never s", () => {
    // DeMarzo, Vayanos & Zwiebel 2003, QJE 118:909–968 (from memory): self-weight changes speed.
    // Speed: T = σI + (1−σ)A has eigenvalues σ + (1−σ)λ for the eigenvalues λ of A (spectral
    // mapping, common practice), so |λ2(T)| = max over λ ≠ 1 of |σ + (1−σ)λ|.
    fc.assert(
      fc.property(denseCounts, fc.double({ min: 0.1, max: 2, noNaN: true }), (dense, beta) => {
        const rows = pointAttentionRows(countsFromDense(dense), beta);
        const runs = [0, 0.3, 0.8].map((sigma) => stationaryVector(rows, { selfWeight: sigma }));
        for (const run of runs) {
          run.vector.forEach((v, i) => {
            expect(Math.abs(v - runs[0].vector[i])).toBeLessThan(1e-10);
          });
        }
        const evd = new EigenvalueDecomposition(new Matrix(denseTransition(rows, 0)));
        const spectrum = evd.realEigenvalues.map((re, k) => ({
          re,
          im: evd.imaginaryEigenvalues[k],
        }));
        const one = spectrum.reduce(
          (best, z, k) =>
            Math.hypot(z.re - 1, z.im) < Math.hypot(spectrum[best].re - 1, spectrum[best].im)
              ? k
              : best,
          0,
        );
        for (const sigma of [0.3, 0.8]) {
          const expected = Math.max(
            0,
            ...spectrum
              .filter((_, k) => k !== one)
              .map((z) => Math.hypot(sigma + (1 - sigma) * z.re, (1 - sigma) * z.im)),
          );
          expect(Math.abs(denseSecondEigenvalue(rows, sigma) - expected)).toBeLessThan(1e-9);
        }
      }),
      { seed: 13, numRuns: 40 },
    );
  });
});

describe("posterior draws", () => {
  it("are byte-identical for one seed and differ for another", () => {
    const counts = countsFromDense(randomDenseCounts(8, 0.4, createSeededRng(5)));
    const run = (seed: number) =>
      posteriorShares(counts, { background: 1, selfWeight: 0.5, samples: 20, seed });
    const a = run(77);
    const b = run(77);
    const c = run(78);
    expect(Buffer.from(new Float64Array(a.flatMap((d) => [...d])).buffer)).toEqual(
      Buffer.from(new Float64Array(b.flatMap((d) => [...d])).buffer),
    );
    expect(c[0]).not.toEqual(a[0]);
    for (const draw of a) {
      expect(Math.abs(draw.reduce((x, y) => x + y, 0) - 1)).toBeLessThan(1e-12);
      for (const v of draw) expect(v).toBeGreaterThanOrEqual(0);
    }
  });

  it("scaling all counts by 100 shrinks every 90% interval and keeps the point estimate inside", () => {
    // Posterior concentration with more data (Noé & Chodera 2014, eq. 5.2: Var ∝ 1/(α_0 + 1)).
    fc.assert(
      fc.property(
        fc.integer({ min: 3, max: 6 }),
        fc.integer({ min: 0, max: 2 ** 31 - 1 }),
        (n, seed) => {
          const rng = createSeededRng(seed);
          const dense = Array.from({ length: n }, (_, i) =>
            Array.from({ length: n }, (_, j) => (j !== i ? 1 + Math.floor(rng.next() * 6) : 0)),
          );
          const small = countsFromDense(dense);
          const large = scaled(small, 100);
          const options = { background: 1, selfWeight: 0.5, samples: 200 };
          const drawsSmall = posteriorShares(small, { ...options, seed: seed + 1 });
          const drawsLarge = posteriorShares(large, { ...options, seed: seed + 2 });
          const point = stationaryVector(pointAttentionRows(large, 1), { selfWeight: 0.5 }).vector;
          for (let i = 0; i < n; i++) {
            const [lo1, hi1] = interval(drawsSmall, i);
            const [lo2, hi2] = interval(drawsLarge, i);
            expect(hi2 - lo2).toBeLessThan(hi1 - lo1);
            expect(point[i]).toBeGreaterThanOrEqual(lo2);
            expect(point[i]).toBeLessThanOrEqual(hi2);
          }
        },
      ),
      { seed: 14, numRuns: 12 },
    );
  });

  it("90% intervals cover the true shares 80–97% of the time", () => {
    // Frequentist calibration of the Dirichlet posterior (Noé 2008, J. Chem. Phys. 128:244103):
    // a known A, multinomial counts per row, posterior 90% interval for each s_i.
    const n = 6;
    const rng = createSeededRng(2008);
    const truth = Array.from({ length: n }, (_, i) => {
      const row = Array.from({ length: n }, (_, j) =>
        j === i ? 0 : Math.log(1 - rng.next()) ** 2,
      );
      const sum = row.reduce((a, b) => a + b, 0);
      return row.map((v) => v / sum);
    });
    const trueRows = pointAttentionRows(
      countsFromDense(truth.map((r) => r.map((v) => v * 1e6))),
      0,
    );
    const s = stationaryVector(trueRows, { selfWeight: 0.5 }).vector;
    let covered = 0;
    let total = 0;
    const replicates = 150;
    for (let r = 0; r < replicates; r++) {
      const counts = truth.map((row) => {
        const cells = new Array<number>(n).fill(0);
        for (let m = 0; m < 300; m++) {
          let u = rng.next();
          let j = 0;
          while (j < n - 1 && u >= row[j]) {
            u -= row[j];
            j++;
          }
          cells[j] += 1;
        }
        return cells;
      });
      const draws = posteriorShares(countsFromDense(counts), {
        background: 1,
        selfWeight: 0.5,
        samples: 200,
        seed: r + 1,
      });
      for (let i = 0; i < n; i++) {
        const [lo, hi] = interval(draws, i);
        if (s[i] >= lo && s[i] <= hi) covered++;
        total++;
      }
    }
    const coverage = covered / total;
    expect(coverage).toBeGreaterThan(0.8);
    expect(coverage).toBeLessThan(0.97);
  });
});
