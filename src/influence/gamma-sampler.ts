/**
 * @module gamma-sampler
 * Gamma(shape, 1) variates for the Dirichlet posterior draws. For shape ≥ 1: Marsaglia & Tsang
 * (2000), "A simple method for generating gamma variables", ACM Transactions on Mathematical
 * Software 26(3):363–372 — a squeeze-accelerated rejection from a transformed normal. For
 * shape < 1 the boost of the same paper, G(a) = G(a+1)·U^(1/a), is taken in log space,
 * log G(a) = log G(a+1) + log(U)/a, so shapes far below 1 (1e-4 and less, which decayed counts
 * produce) neither underflow to 0 nor bias the draw. Normal variates come from the Marsaglia polar
 * method (Marsaglia & Bray 1964, "A convenient method for generating normal variables", SIAM
 * Review 6(3):260–264). `createGammaSampler` keeps the second normal of each pair for the next
 * call (the posterior draws' hot path); the free functions discard it and stay stateless. Either
 * way every variate depends only on the generator's sequence.
 */

import type { Rng } from "../ports/rng.js";

function checkShape(shape: number): void {
  if (!(shape > 0) || !Number.isFinite(shape)) {
    throw new RangeError(`gamma shape must be a positive finite number, got ${shape}`);
  }
}

/** A standard normal variate by the Marsaglia polar method. */
export function sampleNormal(rng: Rng): number {
  for (;;) {
    const u = 2 * rng.next() - 1;
    const v = 2 * rng.next() - 1;
    const q = u * u + v * v;
    if (q > 0 && q < 1) return u * Math.sqrt((-2 * Math.log(q)) / q);
  }
}

/** log of a Gamma(shape, 1) variate for shape ≥ 1 (Marsaglia & Tsang 2000, §4). */
function logGammaAtLeastOne(shape: number, rng: Rng, normal: () => number): number {
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = normal();
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next32();
    const x2 = x * x;
    if (u < 1 - 0.0331 * x2 * x2) return Math.log(d * v);
    if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return Math.log(d * v);
  }
}

function logGamma(shape: number, rng: Rng, normal: () => number): number {
  if (shape >= 1) return logGammaAtLeastOne(shape, rng, normal);
  const boosted = logGammaAtLeastOne(shape + 1, rng, normal);
  const u = 1 - rng.next(); // in (0, 1], so log(u) is finite
  return boosted + Math.log(u) / shape;
}

/** log G with G ~ Gamma(shape, 1); accurate for any shape > 0, including shape ≪ 1. */
export function sampleLogGamma(shape: number, rng: Rng): number {
  checkShape(shape);
  return logGamma(shape, rng, () => sampleNormal(rng));
}

/** A sampler of log Gamma variates that keeps the spare normal of each polar pair. */
export interface GammaSampler {
  logGamma(shape: number): number;
}

export function createGammaSampler(rng: Rng): GammaSampler {
  let spare = 0;
  let hasSpare = false;
  const normal = (): number => {
    if (hasSpare) {
      hasSpare = false;
      return spare;
    }
    for (;;) {
      const u = 2 * rng.next32() - 1;
      const v = 2 * rng.next32() - 1;
      const q = u * u + v * v;
      if (q > 0 && q < 1) {
        const f = Math.sqrt((-2 * Math.log(q)) / q);
        spare = v * f;
        hasSpare = true;
        return u * f;
      }
    }
  };
  return {
    logGamma(shape: number): number {
      checkShape(shape);
      return logGamma(shape, rng, normal);
    },
  };
}

/** G ~ Gamma(shape, 1). For shape ≪ 1 the value may underflow to 0; use `sampleLogGamma`. */
export function sampleGamma(shape: number, rng: Rng): number {
  return Math.exp(sampleLogGamma(shape, rng));
}
