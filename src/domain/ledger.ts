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
  /**
   * Present (true) when the message mentioned more than `BROADCAST_MENTIONS` distinct members
   * besides its author: a broadcast yields its reply signal only (DESIGN.md §4.2), so its
   * mentions are not kept.
   */
  readonly broadcast?: boolean;
}

/** A message mentioning more distinct members than this (author aside) is a broadcast. */
export const BROADCAST_MENTIONS = 50;

/** True when `mentions` name more than BROADCAST_MENTIONS distinct members besides the author. */
export function isBroadcast(mentions: readonly string[], author: string): boolean {
  const distinct = new Set(mentions);
  distinct.delete(author);
  return distinct.size > BROADCAST_MENTIONS;
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

/** A format period starts (name) or ends (null) at `at`; kept like group labels. */
export interface FormatChange {
  readonly at: number;
  readonly format: string | null;
}

export interface LedgerSnapshot {
  readonly channel: string;
  /** Messages in ledger order (ascending `at`, then id). */
  readonly messages: readonly LedgerMessage[];
  /** Consent changes in the order they were applied. */
  readonly consent: readonly ConsentChange[];
  /** Group changes in the order they were applied. */
  readonly groups: readonly GroupChange[];
  /** Format changes in the order they were applied (absent in snapshots built before issue 16). */
  readonly formats?: readonly FormatChange[];
  /** Latest event time seen for the channel (epoch ms), or null if none. */
  readonly lastEventAt: number | null;
}
