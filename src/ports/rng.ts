/**
 * @module rng
 * Randomness is injected: every draw in plumbline comes from an `Rng` made from a seed.
 */

export interface Rng {
  /** A uniform double in [0, 1) with 53 random bits. */
  next(): number;
}
