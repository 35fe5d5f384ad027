/**
 * @module rng
 * Randomness is injected: every draw in plumbline comes from an `Rng` made from a seed.
 * The default generator is xoshiro128** (Blackman & Vigna 2018, "Scrambled linear pseudorandom
 * number generators"), seeded through splitmix32, giving doubles with 53 random bits.
 * Posterior draw k has its own stream (DESIGN.md §4.6, §4.11): `createDrawRng(seed, k)` seeds
 * xoshiro128** from SplitMix64 (Steele, Lea & Flood 2014, "Fast splittable pseudorandom number
 * generators", OOPSLA '14): the k-th output of SplitMix64(seed) — computable directly as
 * mix64(seed + (k+1)·γ), a counter-based derivation — seeds a second SplitMix64 whose first two
 * outputs are the 128-bit state. Any range of draws can thus be computed on its own, in any order
 * or thread, with the same result.
 */

export interface Rng {
  /** A uniform double in [0, 1) with 53 random bits. */
  next(): number;
  /** A uniform double in [0, 1) with 32 random bits: half the cost, for rejection samplers. */
  next32(): number;
  /**
   * The xoshiro128** state (four int32) that `next` and `next32` advance, for kernels that run
   * the same generator inline (gamma-sampler's `fillGammaAt`): load it, step it with the same
   * arithmetic as `xoshiro128` below, store it back. Absent for other generators.
   */
  readonly state?: Int32Array;
}

function splitmix32(state: number): () => number {
  let s = state >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    return (z ^ (z >>> 16)) >>> 0;
  };
}

/**
 * A seeded xoshiro128** generator; the same seed gives the same sequence on every platform.
 * The state stays in signed 32-bit integers so V8 keeps it unboxed (a hot path: every posterior
 * draw takes tens of thousands of numbers).
 */
export function createSeededRng(seed: number): Rng {
  const init = splitmix32(Math.trunc(seed) >>> 0);
  return xoshiro128(init(), init(), init(), init());
}

const MASK64 = (1n << 64n) - 1n;
const GOLDEN_GAMMA = 0x9e3779b97f4a7c15n;

/** The SplitMix64 output function (Steele, Lea & Flood 2014, "mix64"). */
function mix64(state: bigint): bigint {
  let z = state & MASK64;
  z = ((z ^ (z >> 30n)) * 0xbf58476d1ce4e5b9n) & MASK64;
  z = ((z ^ (z >> 27n)) * 0x94d049bb133111ebn) & MASK64;
  return z ^ (z >> 31n);
}

/** The k-th output (k ≥ 0) of SplitMix64 seeded with `seed` (a 64-bit integer as bigint). */
export function splitMix64Output(seed: bigint, k: number): bigint {
  return mix64((seed & MASK64) + BigInt(k + 1) * GOLDEN_GAMMA);
}

/**
 * The generator of posterior draw k (k ≥ 0) for `seed`: independent of every other draw's, and
 * the same whichever thread computes it.
 */
export function createDrawRng(seed: number, k: number): Rng {
  if (!Number.isInteger(k) || k < 0)
    throw new RangeError(`draw index must be an integer ≥ 0, got ${k}`);
  const streamSeed = splitMix64Output(BigInt(Math.trunc(seed) >>> 0), k);
  const first = splitMix64Output(streamSeed, 0);
  const second = splitMix64Output(streamSeed, 1);
  return xoshiro128(
    Number(first & 0xffffffffn),
    Number(first >> 32n),
    Number(second & 0xffffffffn),
    Number(second >> 32n),
  );
}

function xoshiro128(s0: number, s1: number, s2: number, s3: number): Rng {
  // The state lives in an Int32Array so that inline kernels can share it (Rng.state); V8 keeps
  // its elements unboxed as the closure variables were.
  const state = Int32Array.of(s0 | 0, s1 | 0, s2 | 0, s3 | 0);
  if ((state[0] | state[1] | state[2] | state[3]) === 0) state[0] = 1;
  const next32 = (): number => {
    let a = state[0];
    let b = state[1];
    let c = state[2];
    let d = state[3];
    const result = Math.imul(rotl(Math.imul(b, 5), 7), 9);
    const t = b << 9;
    c ^= a;
    d ^= b;
    b ^= c;
    a ^= d;
    c ^= t;
    d = rotl(d, 11);
    state[0] = a;
    state[1] = b;
    state[2] = c;
    state[3] = d;
    return result >>> 0;
  };
  return {
    state,
    next(): number {
      const hi = next32() >>> 5; // 27 bits
      const lo = next32() >>> 6; // 26 bits
      return (hi * 67108864 + lo) / 9007199254740992;
    },
    next32(): number {
      return next32() / 4294967296;
    },
  };
}

/** Rotate a 32-bit integer left by k (result as a signed 32-bit integer). */
function rotl(x: number, k: number): number {
  return (x << k) | (x >>> (32 - k));
}

/** FNV-1a (32-bit) of a string: used to derive default seeds from channel and time. */
export function hashString32(text: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h >>> 0;
}

/** The default seed of DESIGN.md §4: derived from the channel and `until` (epoch ms). */
export function deriveSeed(channel: string, untilMs: number): number {
  return hashString32(`${channel}|${new Date(untilMs).toISOString()}`);
}
