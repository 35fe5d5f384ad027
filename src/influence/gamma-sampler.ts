/**
 * @module gamma-sampler
 * Gamma(shape, 1) variates for the Dirichlet posterior draws. For shape ≥ 1: Marsaglia & Tsang
 * (2000), "A simple method for generating gamma variables", ACM Transactions on Mathematical
 * Software 26(3):363–372 — a squeeze-accelerated rejection from a transformed normal. For
 * shape < 1 the boost of the same paper, G(a) = G(a+1)·U^(1/a). Normal variates come from the
 * ziggurat (Marsaglia & Tsang 2000, "The Ziggurat Method for Generating Random Variables", Journal
 * of Statistical Software 5(8), 128 strips, tables built as in the paper's listing), fed by the
 * injected generator's 32-bit output instead of the paper's SHR3.
 *
 * The hot path takes per-shape constants computed once (`gammaConstants`: d = a' − 1/3,
 * c = 1/√(9d), the boost exponent 1/a when a < 1), because the K draws of one analysis reuse the
 * same shapes. `gamma` works in linear space; `logGamma` in log space, for shapes far below 1
 * (1e-4 and less, which decayed counts produce), where U^(1/a) underflows: log G(a) =
 * log G(a+1) + log(U)/a neither underflows nor biases the draw. `LINEAR_MIN_SHAPE` is the
 * smallest shape for which linear space is safe: P(G(a) < 1e-300) ≤ P(U^(1/a) < 1e-300) =
 * 1e-300^a ≈ e^(−43) at a = 1/16 (derived). Every variate depends only on the generator's
 * sequence, so a seed fixes the draws.
 */

import type { Rng } from "../ports/rng.js";

/** Below this shape use `logGamma` (see the module header for the bound). */
export const LINEAR_MIN_SHAPE = 1 / 16;

function checkShape(shape: number): void {
  if (!(shape > 0) || !Number.isFinite(shape)) {
    throw new RangeError(`gamma shape must be a positive finite number, got ${shape}`);
  }
}

// Ziggurat tables for the normal, 128 strips (Marsaglia & Tsang 2000, JSS 5(8), zigset).
const KN = new Float64Array(128);
const WN = new Float64Array(128);
const FN = new Float64Array(128);
const ZIG_R = 3.442619855899;
{
  const m1 = 2147483648;
  const vn = 9.91256303526217e-3;
  let dn = ZIG_R;
  let tn = dn;
  const q = vn / Math.exp(-0.5 * dn * dn);
  KN[0] = (dn / q) * m1;
  KN[1] = 0;
  WN[0] = q / m1;
  WN[127] = dn / m1;
  FN[0] = 1;
  FN[127] = Math.exp(-0.5 * dn * dn);
  for (let i = 126; i >= 1; i--) {
    dn = Math.sqrt(-2 * Math.log(vn / dn + Math.exp(-0.5 * dn * dn)));
    KN[i + 1] = (dn / tn) * m1;
    tn = dn;
    FN[i] = Math.exp(-0.5 * dn * dn);
    WN[i] = dn / m1;
  }
}

/** A signed 32-bit integer from the generator's 32-bit uniform. */
function int32(rng: Rng): number {
  return (rng.next32() * 4294967296) | 0;
}

/** A standard normal variate by the ziggurat (Marsaglia & Tsang 2000, JSS 5(8)). */
export function sampleNormal(rng: Rng): number {
  const hz = int32(rng);
  const iz = hz & 127;
  if (Math.abs(hz) < KN[iz]) return hz * WN[iz];
  return normalSlow(hz, iz, rng);
}

/** The ziggurat after its first test failed for the 32-bit draw `hz` (strip `iz`). */
function normalSlow(first: number, strip: number, rng: Rng): number {
  let hz = first;
  let iz = strip;
  for (;;) {
    const x = hz * WN[iz];
    if (iz === 0) {
      // The base strip's tail beyond r (Marsaglia 1964's tail method, as in the paper's nfix).
      let tail: number;
      let y: number;
      do {
        tail = -Math.log(1 - rng.next()) / ZIG_R;
        y = -Math.log(1 - rng.next());
      } while (y + y < tail * tail);
      return hz > 0 ? ZIG_R + tail : -ZIG_R - tail;
    }
    if (FN[iz] + rng.next32() * (FN[iz - 1] - FN[iz]) < Math.exp(-0.5 * x * x)) return x;
    hz = int32(rng);
    iz = hz & 127;
    if (Math.abs(hz) < KN[iz]) return hz * WN[iz];
  }
}

/** Per-shape constants of the Marsaglia–Tsang sampler, one entry per shape. */
export interface GammaConstants {
  /** d = a' − 1/3 with a' = shape (shape ≥ 1) or shape + 1 (the boost). */
  readonly d: Float64Array;
  /** c = 1/√(9d). */
  readonly c: Float64Array;
  /** 1/shape when shape < 1 (boost by U^(1/shape)), else 0. */
  readonly boost: Float64Array;
}

/** Constants for each shape in `shapes`, computed once and reused across the K draws. */
export function gammaConstants(shapes: ArrayLike<number>): GammaConstants {
  const m = shapes.length;
  const d = new Float64Array(m);
  const c = new Float64Array(m);
  const boost = new Float64Array(m);
  for (let k = 0; k < m; k++) {
    const shape = shapes[k];
    checkShape(shape);
    const lifted = shape >= 1 ? shape : shape + 1;
    d[k] = lifted - 1 / 3;
    c[k] = 1 / Math.sqrt(9 * d[k]);
    boost[k] = shape >= 1 ? 0 : 1 / shape;
  }
  return { d, c, boost };
}

/** d·v of Marsaglia & Tsang (2000) §4, a Gamma(d + 1/3) variate. */
function marsagliaTsang(d: number, c: number, rng: Rng): number {
  for (;;) {
    let x: number;
    let v: number;
    do {
      x = sampleNormal(rng);
      v = 1 + c * x;
    } while (v <= 0);
    v = v * v * v;
    const u = rng.next32();
    const x2 = x * x;
    if (u < 1 - 0.0331 * x2 * x2) return d * v;
    if (Math.log(u) < 0.5 * x2 + d * (1 - v + Math.log(v))) return d * v;
  }
}

/** Gamma variates from precomputed constants (the posterior draws' hot path). */
export interface GammaSampler {
  /** A Gamma variate from the constants at `k`; use only for shapes ≥ LINEAR_MIN_SHAPE. */
  gammaAt(constants: GammaConstants, k: number): number;
  /**
   * `gammaAt(constants, k)` for k = lo … hi − 1 into out[at …], returning their sum (added in
   * that order): the same numbers from the same generator calls, with the generator inlined when
   * it exposes its state (xoshiro128**), which measured 2–3× faster per variate here.
   */
  fillGammaAt(
    constants: GammaConstants,
    lo: number,
    hi: number,
    out: Float64Array,
    at: number,
  ): number;
  /** log of a Gamma variate from the constants at `k`; any shape > 0. */
  logGammaAt(constants: GammaConstants, k: number): number;
  /** log G with G ~ Gamma(shape, 1), constants computed on the spot (any shape > 0). */
  logGamma(shape: number): number;
}

function gammaFrom(d: number, c: number, boost: number, rng: Rng): number {
  const g = marsagliaTsang(d, c, rng);
  // exp(log U · 1/a) rather than U ** (1/a): the same number to rounding, measured 2–3× faster
  // than V8's Math.pow here.
  return boost === 0 ? g : g * Math.exp(Math.log(1 - rng.next()) * boost);
}

function logGammaFrom(d: number, c: number, boost: number, rng: Rng): number {
  const log = Math.log(marsagliaTsang(d, c, rng));
  return boost === 0 ? log : log + Math.log(1 - rng.next()) * boost; // 1 − U in (0, 1]
}

/**
 * `gammaFrom` for constants lo … hi − 1 with xoshiro128** stepped in local variables (its state
 * loaded from and stored back to `rng.state`): the same calls in the same order as
 * `gammaFrom`'s `int32`, `next32` and `next`, so the same numbers. The ziggurat's rare slow
 * path stores the state and runs `normalSlow` on `rng` itself.
 */
function fillGammaInline(
  constants: GammaConstants,
  lo: number,
  hi: number,
  out: Float64Array,
  at: number,
  rng: Rng,
  state: Int32Array,
): number {
  const { d: dd, c: cc, boost: bb } = constants;
  let a = state[0];
  let b = state[1];
  let c = state[2];
  let d = state[3];
  let total = 0;
  for (let k = lo; k < hi; k++) {
    const dk = dd[k];
    const ck = cc[k];
    let g: number;
    for (;;) {
      let x: number;
      let v: number;
      do {
        // int32(rng): one xoshiro128** step, the output as a signed 32-bit integer.
        const r = Math.imul(rotl(Math.imul(b, 5), 7), 9);
        const t = b << 9;
        c ^= a;
        d ^= b;
        b ^= c;
        a ^= d;
        c ^= t;
        d = rotl(d, 11);
        const hz = r | 0;
        const iz = hz & 127;
        if (Math.abs(hz) < KN[iz]) x = hz * WN[iz];
        else {
          state[0] = a;
          state[1] = b;
          state[2] = c;
          state[3] = d;
          x = normalSlow(hz, iz, rng);
          a = state[0];
          b = state[1];
          c = state[2];
          d = state[3];
        }
        v = 1 + ck * x;
      } while (v <= 0);
      v = v * v * v;
      // next32(): one step, the output over 2^32.
      const r = Math.imul(rotl(Math.imul(b, 5), 7), 9);
      const t = b << 9;
      c ^= a;
      d ^= b;
      b ^= c;
      a ^= d;
      c ^= t;
      d = rotl(d, 11);
      const u = (r >>> 0) / 4294967296;
      const x2 = x * x;
      if (u < 1 - 0.0331 * x2 * x2 || Math.log(u) < 0.5 * x2 + dk * (1 - v + Math.log(v))) {
        g = dk * v;
        break;
      }
    }
    const boost = bb[k];
    if (boost !== 0) {
      // next(): two steps, 27 + 26 bits.
      const r1 = Math.imul(rotl(Math.imul(b, 5), 7), 9);
      let t = b << 9;
      c ^= a;
      d ^= b;
      b ^= c;
      a ^= d;
      c ^= t;
      d = rotl(d, 11);
      const r2 = Math.imul(rotl(Math.imul(b, 5), 7), 9);
      t = b << 9;
      c ^= a;
      d ^= b;
      b ^= c;
      a ^= d;
      c ^= t;
      d = rotl(d, 11);
      const uniform = ((r1 >>> 5) * 67108864 + (r2 >>> 6)) / 9007199254740992;
      g = g * Math.exp(Math.log(1 - uniform) * boost);
    }
    out[at + k - lo] = g;
    total += g;
  }
  state[0] = a;
  state[1] = b;
  state[2] = c;
  state[3] = d;
  return total;
}

/** Rotate a 32-bit integer left by k (as in rng.ts). */
function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

export function createGammaSampler(rng: Rng): GammaSampler {
  const state = rng.state;
  return {
    gammaAt: (constants, k) => gammaFrom(constants.d[k], constants.c[k], constants.boost[k], rng),
    fillGammaAt(constants, lo, hi, out, at) {
      if (state !== undefined && state.length === 4) {
        return fillGammaInline(constants, lo, hi, out, at, rng, state);
      }
      let total = 0;
      for (let k = lo; k < hi; k++) {
        const g = gammaFrom(constants.d[k], constants.c[k], constants.boost[k], rng);
        out[at + k - lo] = g;
        total += g;
      }
      return total;
    },
    logGammaAt: (constants, k) =>
      logGammaFrom(constants.d[k], constants.c[k], constants.boost[k], rng),
    logGamma(shape: number): number {
      checkShape(shape); // constants on the spot, no allocation (shapes that change per draw)
      const lifted = shape >= 1 ? shape : shape + 1;
      const d = lifted - 1 / 3;
      return logGammaFrom(d, 1 / Math.sqrt(9 * d), shape >= 1 ? 0 : 1 / shape, rng);
    },
  };
}

/** log G with G ~ Gamma(shape, 1); accurate for any shape > 0, including shape ≪ 1. */
export function sampleLogGamma(shape: number, rng: Rng): number {
  return createGammaSampler(rng).logGamma(shape);
}

/** G ~ Gamma(shape, 1). For shape ≪ 1 the value may underflow to 0; use `sampleLogGamma`. */
export function sampleGamma(shape: number, rng: Rng): number {
  const { d, c, boost } = gammaConstants([shape]);
  return gammaFrom(d[0], c[0], boost[0], rng);
}
