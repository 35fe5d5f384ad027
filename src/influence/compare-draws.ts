/**
 * @module compare-draws
 * The posterior probability that period B is more balanced than period A (DESIGN.md §6 compare).
 * Balance is effective voices / active members, so periods with different headcounts compare
 * fairly. Draw k of A is paired with draw k of B (both made from the same seed: common random
 * numbers); since the two periods' posteriors are independent, the share of pairs with
 * balance_B > balance_A estimates P(B more balanced | data).
 */

export function probabilityMoreBalanced(args: {
  readonly voicesA: Float64Array;
  readonly membersA: number;
  readonly voicesB: Float64Array;
  readonly membersB: number;
}): number | null {
  const k = Math.min(args.voicesA.length, args.voicesB.length);
  if (k === 0 || args.membersA === 0 || args.membersB === 0) return null;
  let wins = 0;
  for (let i = 0; i < k; i++) {
    const a = args.voicesA[i] / args.membersA;
    const b = args.voicesB[i] / args.membersB;
    if (b > a) wins++;
    else if (b === a) wins += 0.5;
  }
  return wins / k;
}
