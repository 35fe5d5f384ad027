/**
 * @module tick-report
 * What one scheduler pass did, for tests and logs: posts made, slots skipped (and why), claims
 * recorded as missed, and failures. Plain data, no message text.
 */

/** "trial": a format trial's week switch or its result (DESIGN.md §1 format trial). */
export type PostKind = "digest" | "note" | "trial";

export interface SlotRef {
  readonly channel: string;
  readonly kind: PostKind;
  /**
   * The claim period, e.g. "2026-11-02T09:00[Europe/Berlin]" (digest), "2026-11-02T08:00Z" (note)
   * or "trial 2026-11-02T09:00Z week 2" (a trial's post).
   */
  readonly period: string;
}

export interface PostedEntry extends SlotRef {
  /** The slot's instant (digest), the evaluation time (note) or the post's due time (trial). */
  readonly slotAt: number;
  readonly audience: "channel" | "facilitators";
  readonly messageId: string;
}

export type SkipReason =
  /** Another replica holds the claim. */
  | "claimed-elsewhere"
  /** The compose function had nothing to post (recorded as posted with `NOTHING_POSTED`). */
  | "nothing-to-post"
  /** A note for facilitators, but no `sendToFacilitators` was wired. */
  | "no-facilitator-route";

export interface SkippedEntry extends SlotRef {
  readonly reason: SkipReason;
}

export interface MissedEntry {
  readonly channel: string;
  readonly kind: string;
  readonly period: string;
  readonly claimedBy: string;
  /**
   * "too-late": found 24 h or more after its slot (or still unsent then, e.g. rate limited);
   * "outcome-unknown": the holder started the platform call and never finished within its lease
   * (the post may have arrived, so it is not tried again); "not-taken-over": a claim whose holder
   * stopped while composing and that no replica took over within 24 h of its lease ending;
   * "refused": the platform answered the post with an error (`detail`: its code).
   */
  readonly reason: "too-late" | "outcome-unknown" | "not-taken-over" | "refused";
  readonly detail?: string;
}

/** A post the platform did not take (rate limited): open again from `retryAt`. */
export interface RetryingEntry {
  readonly channel: string;
  readonly kind: string;
  readonly period: string;
  readonly retryAt: number;
  readonly error: string;
}

/** A post of unknown outcome looked up on the platform: found (recorded) or opened again. */
export interface SettledEntry {
  readonly channel: string;
  readonly kind: string;
  readonly period: string;
  readonly found: boolean;
}

export interface FailedEntry {
  readonly channel: string;
  readonly kind: PostKind | "settings";
  readonly period: string | null;
  /** The error's code when it has one, else its name. */
  readonly error: string;
}

export interface TickReport {
  /** The clock's time at the start of the pass. */
  readonly at: number;
  readonly posted: PostedEntry[];
  readonly skipped: SkippedEntry[];
  readonly missed: MissedEntry[];
  readonly failed: FailedEntry[];
  readonly retrying: RetryingEntry[];
  readonly settled: SettledEntry[];
}
