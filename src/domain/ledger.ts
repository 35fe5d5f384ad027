/**
 * @module ledger
 * What is kept of a channel between events: consent history, the per-message signal ledger and
 * group labels. The log path builds it in memory; the stores persist the same content. Analysis
 * reads only a `LedgerSnapshot`, so both paths give the same report.
 */
import type { ConsentLevel } from "./events.js";

/** One message as kept: who wrote it, when, whom it answered and mentioned. No text. */
export interface LedgerMessage {
  readonly id: string;
  readonly author: string;
  /** Epoch ms of the original message (an edit keeps it). */
  readonly at: number;
  /** Author of the parent message, already limited to members consenting at `at`; else null. */
  readonly parentAuthor: string | null;
  /** Distinct mentioned members other than the author, consenting at `at`, sorted. */
  readonly mentions: readonly string[];
  readonly deleted: boolean;
}

export interface ConsentChange {
  readonly member: string;
  readonly at: number;
  readonly level: ConsentLevel;
  readonly notice: string | null;
}

export interface GroupChange {
  readonly member: string;
  readonly at: number;
  readonly group: string | null;
}

export interface LedgerSnapshot {
  readonly channel: string;
  /** Messages in ledger order (ascending `at`, then id). */
  readonly messages: readonly LedgerMessage[];
  /** Consent changes in the order they were applied. */
  readonly consent: readonly ConsentChange[];
  /** Group changes in the order they were applied. */
  readonly groups: readonly GroupChange[];
  /** Latest event time seen for the channel (epoch ms), or null if none. */
  readonly lastEventAt: number | null;
}
