/**
 * @module timeline
 * Time lookups over consent and group-label histories (docs/event-semantics.md rules 1 and 5):
 * the value of member m at time t is the value of the latest change of m with `at` ≤ t, where a
 * tie in `at` goes to the change applied later. The pure functions scan a list once and suit
 * one-off questions; `MemberTimeline` keeps one sorted array per member and answers each question
 * by binary search, for loops that ask many times (the ledger, signal collection, the stores).
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, GroupChange } from "../domain/ledger.js";

interface TimedChange {
  readonly member: string;
  readonly at: number;
}

/** Index of the change that decides `member` at `at` in a list in applied order, or -1. */
function decidingIndex(changes: readonly TimedChange[], member: string, at: number): number {
  let best = -1;
  let bestAt = Number.NEGATIVE_INFINITY;
  for (let k = 0; k < changes.length; k++) {
    const change = changes[k];
    // `>=` so that, among changes with the same time, the one applied later wins.
    if (change.member === member && change.at <= at && change.at >= bestAt) {
      best = k;
      bestAt = change.at;
    }
  }
  return best;
}

/**
 * Consent of `member` at `at` (epoch ms) from consent changes in applied order (rule 1);
 * `"off"` when no change applies. The list may hold every member's changes or one member's.
 */
export function consentLevelAt(
  changes: readonly ConsentChange[],
  member: string,
  at: number,
): ConsentLevel {
  const k = decidingIndex(changes, member, at);
  return k < 0 ? "off" : changes[k].level;
}

/** Group label of `member` at `at` from group changes in applied order (rule 5); null if none. */
export function groupLabelAt(
  changes: readonly GroupChange[],
  member: string,
  at: number,
): string | null {
  const k = decidingIndex(changes, member, at);
  return k < 0 ? null : changes[k].group;
}

/** True for the levels that count a member: `counted` and `named`. */
export function isConsenting(level: ConsentLevel): boolean {
  return level !== "off";
}

/**
 * Per-member change arrays sorted by `at` (stable: equal times keep applied order), so a lookup
 * costs O(log k) for a member with k changes and adding a change costs O(k) at worst.
 */
export class MemberTimeline<C extends TimedChange> {
  private readonly byMember = new Map<string, C[]>();

  /** Builds the index from changes in applied order. */
  constructor(changes: Iterable<C> = []) {
    for (const change of changes) this.add(change);
  }

  /** Records a change applied after every change already recorded. */
  add(change: C): void {
    const list = this.byMember.get(change.member);
    if (list === undefined) {
      this.byMember.set(change.member, [change]);
      return;
    }
    // Insert after every change with at ≤ change.at: the newcomer wins ties.
    const position = upperBound(list, change.at);
    if (position === list.length) list.push(change);
    else list.splice(position, 0, change);
  }

  /** The change that decides `member` at `at`, or undefined when none applies. */
  changeAt(member: string, at: number): C | undefined {
    const list = this.byMember.get(member);
    if (list === undefined) return undefined;
    const position = upperBound(list, at);
    return position === 0 ? undefined : list[position - 1];
  }
}

/** First index whose `at` is greater than `at` (list sorted by `at`). */
function upperBound(list: readonly TimedChange[], at: number): number {
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (list[mid].at <= at) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Consent lookups by time over a `MemberTimeline` of consent changes. */
export class ConsentTimeline extends MemberTimeline<ConsentChange> {
  /** Consent of `member` at `at` (rule 1). */
  levelAt(member: string, at: number): ConsentLevel {
    return this.changeAt(member, at)?.level ?? "off";
  }
}

/** Group-label lookups by time over a `MemberTimeline` of group changes. */
export class GroupTimeline extends MemberTimeline<GroupChange> {
  /** Label of `member` at `at` (rule 5); null when none or cleared. */
  labelAt(member: string, at: number): string | null {
    return this.changeAt(member, at)?.group ?? null;
  }
}

/** Ascending order of member and message ids by UTF-16 code units (never locale-dependent). */
export function compareIds(a: string, b: string): number {
  if (a < b) return -1;
  return a > b ? 1 : 0;
}
