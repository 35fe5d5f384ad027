/**
 * The profile's learnt hyperprior (DESIGN.md §4.4 v2, src/influence/attention-prior.ts
 * `fitPopularity`): the negative binomial marginal against jstat's own pmf, recovery of a known
 * Gamma–Poisson truth by simulation, and the two behaviours the calibration suite asked for — a hub
 * keeps the attention its data give it, and a member nobody answered yet is assumed as popular as a
 * typical member of an even channel.
 */
import { createRequire } from "node:module";
import { describe, expect, it } from "vitest";
import {
  buildAttentionPrior,
  fitPopularity,
  logNegativeBinomial,
  negativeBinomialAt,
} from "../../src/influence/attention-prior.js";
import { sampleGamma } from "../../src/influence/gamma-sampler.js";
import { logGamma } from "../../src/influence/log-gamma.js";
import { createSeededRng, type Rng } from "../../src/ports/rng.js";
import { countsFromDense } from "./fixtures.js";

const jStat = createRequire(import.meta.url)("jstat") as {
  negbin: { pdf(k: number, r: number, p: number): number };
};

/** Poisson variate by Knuth's multiplication method (Knuth 1997, TAOCP vol. 2, 3.4.1 F). */
function poisson(rate: number, rng: Rng): number {
  // Split large rates so e^(−rate) does not underflow: a sum of Poissons is Poisson.
  if (rate > 30) return poisson(rate / 2, rng) + poisson(rate / 2, rng);
  const limit = Math.exp(-rate);
  let k = 0;
  let p = rng.next();
  while (p > limit) {
    k++;
    p *= rng.next();
  }
  return k;
}

describe("popularity hyperprior (Gamma–Poisson with a hub component)", () => {
  it("the negative binomial log-pmf matches jstat's negbin.pdf (r integer, p = r/(r+μ))", () => {
    for (const r of [1, 2, 5, 30]) {
      for (const mean of [0.5, 4, 40]) {
        for (const k of [0, 1, 3, 17, 90]) {
          const reference = jStat.negbin.pdf(k, r, r / (r + mean));
          if (reference < 1e-280) continue;
          expect(logNegativeBinomial(k, r, mean)).toBeCloseTo(Math.log(reference), 8);
        }
      }
    }
  });

  it("the hoisted form fitPopularity uses gives logNegativeBinomial's numbers bit for bit", () => {
    // Same operations in the same order, so equality is exact (Object.is), x = 0 included; the
    // function itself is checked against jstat above. Real x: the fit sees effective counts.
    for (const r of [0.01, 0.37, 1, 12.5, 1000]) {
      for (const mean of [0.02, 3.3, 250]) {
        const at = negativeBinomialAt(r, mean);
        for (const x of [0, 1e-3, 0.5, 1, 2.75, 41, 9000.25]) {
          expect(Object.is(at(x, logGamma(x + 1)), logNegativeBinomial(x, r, mean))).toBe(true);
        }
      }
    }
  });

  it("recovers the shape and mean of 2,000 simulated Gamma–Poisson counts", () => {
    // Truth β = 2, μ = 10; the shape grid steps by a factor 10^(5/60) ≈ 1.21.
    const rng = createSeededRng(20261203);
    const x = Array.from({ length: 2000 }, () => poisson(sampleGamma(2, rng) * 5, rng));
    const fit = fitPopularity(x);
    expect(fit.shape).toBeGreaterThan(2 / 1.45);
    expect(fit.shape).toBeLessThan(2 * 1.45);
    expect(fit.mean).toBeGreaterThan(9.3);
    expect(fit.mean).toBeLessThan(10.7);
    // With no hubs in the truth, few members are called hubs.
    const hubs = Array.from(fit.hubProbability).filter((p) => p > 0.5).length;
    expect(hubs).toBeLessThan(40);
  });

  it("a member everyone attends to keeps its data: profile ≈ its share of received signals", () => {
    // 20 members; m00 receives 10 from each of the others (190), the rest about 18 each.
    const n = 20;
    const dense = Array.from({ length: n }, (_, i) =>
      Array.from({ length: n }, (_, j) => (j === i ? 0 : j === 0 ? 10 : i === 0 ? 1 : 1)),
    );
    const counts = countsFromDense(dense);
    const prior = buildAttentionPrior(counts, 2);
    expect(prior.popularity.hubProbability[0]).toBeGreaterThan(0.99);
    let received = 0;
    let total = 0;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (j === 0) received += dense[i][j];
        total += dense[i][j];
      }
    }
    // Every row has 28 or 19 signals, so the design effect (1+α)/(c+α) is the same order for all.
    expect(prior.profile[0]).toBeGreaterThan(0.9 * (received / total));
  });

  it("a member nobody answered yet gets at least half a typical member's profile in an even channel", () => {
    const n = 30;
    const rng = createSeededRng(7);
    const dense = Array.from({ length: n }, (_, i) =>
      Array.from({ length: n }, (_, j) => (j === i || j === n - 1 ? 0 : poisson(3, rng))),
    );
    const prior = buildAttentionPrior(countsFromDense(dense), "auto");
    const profile = Array.from(prior.profile);
    const typical = [...profile.slice(0, n - 1)].sort((a, b) => a - b)[Math.floor((n - 1) / 2)];
    expect(profile[n - 1]).toBeGreaterThan(0.5 * typical);
    // …and not more than a typical member: no data is no evidence of popularity.
    expect(profile[n - 1]).toBeLessThan(typical);
  });
});
