import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import { rowEntry } from "../../src/influence/attention-rows.js";
import {
  createGammaSampler,
  gammaConstants,
  LINEAR_MIN_SHAPE,
  sampleGamma,
  sampleLogGamma,
  sampleNormal,
} from "../../src/influence/gamma-sampler.js";
import { drawAttentionMatrix } from "../../src/influence/posterior-draws.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { countsFromDense, digamma, loadJStatGamma, meanVariance, polygamma } from "./fixtures.js";

const N = 200_000;

describe("polygamma reference (fixtures)", () => {
  it("matches the tabulated constants", () => {
    // Abramowitz & Stegun 1964, Handbook of Mathematical Functions, 6.3.2, 6.3.3, 6.4.2, 6.4.4.
    const euler = 0.5772156649015329;
    expect(Math.abs(digamma(1) + euler)).toBeLessThan(1e-13);
    expect(Math.abs(digamma(0.5) + euler + 2 * Math.LN2)).toBeLessThan(1e-13);
    expect(Math.abs(polygamma(1, 1) - Math.PI ** 2 / 6)).toBeLessThan(1e-13);
    expect(Math.abs(polygamma(1, 0.5) - Math.PI ** 2 / 2)).toBeLessThan(1e-13);
    expect(Math.abs(polygamma(3, 1) - Math.PI ** 4 / 15)).toBeLessThan(1e-12);
  });
});

describe("gamma sampler (Marsaglia & Tsang 2000)", () => {
  for (const shape of [1e-3, 0.05, 0.3, 1, 2.5, 40]) {
    it(`Gamma(${shape}, 1) has mean and variance ${shape}`, () => {
      // Johnson, Kotz & Balakrishnan 1994, Continuous Univariate Distributions vol. 1, ch. 17:
      // E G = Var G = a; central fourth moment 3a² + 6a gives the variance's standard error.
      const rng = createSeededRng(Math.round(shape * 1e4) + 1);
      const xs = new Float64Array(N);
      for (let k = 0; k < N; k++) xs[k] = sampleGamma(shape, rng);
      const { mean, variance } = meanVariance(xs);
      expect(Math.abs(mean - shape)).toBeLessThan(5 * Math.sqrt(shape / N));
      const seVariance = Math.sqrt((3 * shape ** 2 + 6 * shape - shape ** 2) / N);
      expect(Math.abs(variance - shape)).toBeLessThan(5 * seVariance);
    });
  }

  for (const shape of [1e-4, 1e-3, 0.05, 0.3]) {
    it(`log Gamma(${shape}) has mean ψ(a) and variance ψ'(a), without underflow`, () => {
      // Johnson, Kotz & Balakrishnan 1994, ch. 17: log G has cumulants ψ(a), ψ'(a), ψ''(a), ψ'''(a).
      const rng = createSeededRng(Math.round(shape * 1e5) + 11);
      const xs = new Float64Array(N);
      for (let k = 0; k < N; k++) xs[k] = sampleLogGamma(shape, rng);
      expect(xs.every((v) => Number.isFinite(v))).toBe(true);
      const { mean, variance } = meanVariance(xs);
      const trigamma = polygamma(1, shape);
      expect(Math.abs(mean - digamma(shape))).toBeLessThan(5 * Math.sqrt(trigamma / N));
      const fourth = polygamma(3, shape) + 3 * trigamma ** 2; // central fourth moment
      const seVariance = Math.sqrt((fourth - trigamma ** 2) / N);
      expect(Math.abs(variance - trigamma)).toBeLessThan(5 * seVariance);
    });
  }

  for (const shape of [0.3, 1, 2.5, 40]) {
    it(`passes a Kolmogorov–Smirnov test against jstat's Gamma(${shape}) CDF`, () => {
      // Reference: jstat 1.9 gamma.cdf; KS critical value 1.95/√n at α = 0.001 (Massey 1951,
      // "The Kolmogorov–Smirnov test for goodness of fit", JASA 46:68–78, from memory).
      const gamma = loadJStatGamma();
      const rng = createSeededRng(Math.round(shape * 100) + 5);
      const count = 20_000;
      const xs = Array.from({ length: count }, () => sampleGamma(shape, rng)).sort((a, b) => a - b);
      let d = 0;
      xs.forEach((x, k) => {
        const f = gamma.cdf(x, shape, 1);
        d = Math.max(d, Math.abs(f - k / count), Math.abs((k + 1) / count - f));
      });
      expect(d).toBeLessThan(1.95 / Math.sqrt(count));
    });
  }

  for (const shape of [0.07, 0.3, 0.9, 2.5, 40]) {
    it(`the precomputed-constant path (linear space) passes KS against jstat's Gamma(${shape})`, () => {
      // Same reference and critical value as above; this is the path the posterior draws use,
      // with one constant set reused for every variate as in the K draws.
      expect(shape).toBeGreaterThanOrEqual(LINEAR_MIN_SHAPE);
      const gamma = loadJStatGamma();
      const sampler = createGammaSampler(createSeededRng(Math.round(shape * 100) + 9));
      const constants = gammaConstants([1, shape]);
      const count = 20_000;
      const xs = Array.from({ length: count }, () => sampler.gammaAt(constants, 1)).sort(
        (a, b) => a - b,
      );
      let d = 0;
      xs.forEach((x, k) => {
        const f = gamma.cdf(x, shape, 1);
        d = Math.max(d, Math.abs(f - k / count), Math.abs((k + 1) / count - f));
      });
      expect(d).toBeLessThan(1.95 / Math.sqrt(count));
    });
  }

  for (const shape of [1e-4, 0.02]) {
    it(`the precomputed-constant log path keeps log Gamma(${shape}) at mean ψ(a), variance ψ'(a)`, () => {
      // Johnson, Kotz & Balakrishnan 1994, ch. 17 (cumulants of log G), as above.
      const sampler = createGammaSampler(createSeededRng(77));
      const constants = gammaConstants([shape]);
      const xs = new Float64Array(N);
      for (let k = 0; k < N; k++) xs[k] = sampler.logGammaAt(constants, 0);
      const { mean, variance } = meanVariance(xs);
      const trigamma = polygamma(1, shape);
      expect(Math.abs(mean - digamma(shape))).toBeLessThan(5 * Math.sqrt(trigamma / N));
      const seVariance = Math.sqrt((polygamma(3, shape) + 2 * trigamma ** 2) / N);
      expect(Math.abs(variance - trigamma)).toBeLessThan(5 * seVariance);
    });
  }

  it("rejects a non-positive shape", () => {
    const rng = createSeededRng(1);
    expect(() => sampleLogGamma(0, rng)).toThrow(RangeError);
    expect(() => sampleLogGamma(Number.NaN, rng)).toThrow(RangeError);
  });
});

describe("ziggurat normal (Marsaglia & Tsang 2000, JSS 5(8))", () => {
  it("passes KS against jstat's standard normal CDF, in the body and both tails", () => {
    // Reference: jstat 1.9 normal.cdf; KS critical value 1.95/√n at α = 0.001 (Massey 1951, from
    // memory). 200,000 variates reach the base strip's tail (|x| > 3.44, p ≈ 5.8e-4) about 115
    // times: its count is checked against the binomial expectation too.
    const jstat = createRequire(import.meta.url)("jstat") as {
      normal: { cdf(x: number, mean: number, sd: number): number };
    };
    const rng = createSeededRng(2000);
    const xs = Array.from({ length: N }, () => sampleNormal(rng)).sort((a, b) => a - b);
    let d = 0;
    xs.forEach((x, k) => {
      const f = jstat.normal.cdf(x, 0, 1);
      d = Math.max(d, Math.abs(f - k / N), Math.abs((k + 1) / N - f));
    });
    expect(d).toBeLessThan(1.95 / Math.sqrt(N));
    const tailP = 2 * jstat.normal.cdf(-3.442619855899, 0, 1);
    const tail = xs.filter((x) => Math.abs(x) > 3.442619855899).length;
    expect(Math.abs(tail - N * tailP)).toBeLessThan(5 * Math.sqrt(N * tailP));
    const { mean, variance } = meanVariance(Float64Array.from(xs));
    expect(Math.abs(mean)).toBeLessThan(5 / Math.sqrt(N));
    expect(Math.abs(variance - 1)).toBeLessThan(5 * Math.sqrt(2 / N));
  });
});

describe("Dirichlet rows of the posterior draw (every cell drawn)", () => {
  // Dirichlet moments E = a_j/a_0 and Var = E(1−E)/(a_0+1): Noé & Chodera 2014, "Uncertainty
  // Estimation", eqs. 5.1–5.2, in Bowman, Pande & Noé (eds.), An Introduction to Markov State
  // Models, Springer. Row 0's posterior is Dirichlet(Ĉ_0j + α·m_j/(1−m_0)); the profile m is held
  // fixed by a huge concentration so the row's own law is checked.
  function planFor(n: number, profile: number[], alpha: number, row: Map<number, number>) {
    const dense = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (const [j, c] of row) dense[0][j] = c;
    const counts = countsFromDense(dense);
    return {
      counts,
      plan: {
        n,
        rowPtr: counts.rowPtr,
        colIdx: counts.colIdx,
        effective: counts.values,
        concentration: Float64Array.from(profile, (m) => m * 1e12),
        profileOf: new Int32Array(n),
        // Grid (0, α): row 0 takes α, the other rows 0 (no prior, nothing to draw), for speed.
        grid: Float64Array.of(0, alpha),
        cumulative: Float64Array.from({ length: 2 * n }, (_, q) => (q === 0 ? 0 : 1)),
        selfWeight: 0.5,
        seed: 2014,
        start: new Float64Array(n).fill(1 / n),
      },
    };
  }

  function checkRow(n: number, profile: number[], alpha: number, draws: number): void {
    const row = new Map([
      [1, 3],
      [2, 0.5],
      [4, 7],
    ]);
    const { plan } = planFor(n, profile, alpha, row);
    const shape = profile.map((m, j) =>
      j === 0 ? 0 : (alpha * m) / (1 - profile[0]) + (row.get(j) ?? 0),
    );
    const a0 = shape.reduce((x, y) => x + y, 0);
    // Cells 1–4 one by one, cells 5… in aggregate (Dirichlet aggregation property): tiny single
    // shapes have variances too heavy-tailed to estimate well from a few thousand draws.
    const watched = [1, 2, 3, 4, -1];
    const cells = watched.map(() => new Float64Array(draws));
    const restShape = shape.slice(5).reduce((x, y) => x + y, 0);
    for (let k = 0; k < draws; k++) {
      const rows = drawAttentionMatrix(plan, k);
      watched.forEach((j, w) => {
        if (j >= 0) cells[w][k] = rowEntry(rows, 0, j);
        else for (let q = 5; q < n; q++) cells[w][k] += rowEntry(rows, 0, q);
      });
    }
    watched.forEach((j, w) => {
      const e = (j >= 0 ? shape[j] : restShape) / a0;
      const v = (e * (1 - e)) / (a0 + 1);
      const { mean, variance } = meanVariance(cells[w]);
      expect(Math.abs(mean - e)).toBeLessThan(5 * Math.sqrt(v / draws) + 1e-6);
      expect(Math.abs(variance - v) / v).toBeLessThan(0.08);
    });
  }

  it("per cell (n ≤ 64): observed and unobserved cells have the Dirichlet mean and variance", () => {
    checkRow(6, [0.1, 0.3, 0.1, 0.2, 0.2, 0.1], 2, 30_000);
  });

  it("stick-breaking (n = 120, Sethuraman 1994): the same moments, prior part from sticks", () => {
    const n = 120;
    const profile = Array.from({ length: n }, (_, j) => (j < 6 ? 0.05 : 0.7 / (n - 6)));
    checkRow(n, profile, 3, 20_000);
  });
});
