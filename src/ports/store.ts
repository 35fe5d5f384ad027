/**
 * @module store
 * The persistence port (DESIGN.md §8). One contract, three implementations in `src/store`
 * (memory, SQLite, PostgreSQL) run by one shared test suite. Member ids never reach a table as
 * given: the store turns each platform id into a keyed HMAC (`memberKey`) and keeps the platform id
 * only for members whose current consent in that channel is `named`. `loadSnapshot` maps keys back:
 * a member with a kept platform id appears under it, every other member as `~` + key.
 *
 * Ingestion (`src/ingest`) applies the event rules of docs/event-semantics.md through `StoreTx`,
 * inside `transaction`, so a delivery key and the changes it causes commit together or not at all.
 */
import type { ConsentLevel } from "../domain/events.js";
import type {
  ConsentChange,
  FormatChange,
  GroupChange,
  LedgerMessage,
  LedgerSnapshot,
} from "../domain/ledger.js";

/** Prefix of the snapshot id of a member whose platform id is not kept. */
export const PSEUDONYM_PREFIX = "~";

/** A message as the transaction sees it: member fields hold member keys. */
export interface StoredMessageHead {
  readonly author: string;
  readonly at: number;
}

/**
 * The operations ingestion needs, all inside one transaction. Every `member`, `author`,
 * `parentAuthor` and mention here is a member key (`Store.memberKey`), never a platform id.
 */
export interface StoreTx {
  /**
   * Inserts the delivery key (ON CONFLICT DO NOTHING), stored only as a digest; true when it was
   * new. `owner` (channel and member key of the event) lets erasure delete it with the member.
   */
  addDelivery(
    key: string,
    receivedAt: number,
    owner?: { readonly channel: string; readonly member: string | null },
  ): Promise<boolean>;
  /** Records a delivery the store could not apply: its key's digest and the error code only. */
  addRejected(key: string, code: string, receivedAt: number): Promise<void>;
  /** Records that the channel saw an event at `at` (keeps the latest). */
  touchChannel(channel: string, at: number): Promise<void>;
  /** Rule 1: level of the latest applied change with `at` ≤ the given time; `off` when none. */
  consentAt(channel: string, member: string, at: number): Promise<ConsentLevel>;
  /** `consentAt` for several members at one time, in the order given (one query). */
  consentAtMany(channel: string, members: readonly string[], at: number): Promise<ConsentLevel[]>;
  /** Appends a consent change (applied order is kept). */
  addConsent(channel: string, change: ConsentChange): Promise<void>;
  /** Keeps (string) or forgets (null) the member's platform id in the channel. */
  setPlatformId(channel: string, member: string, platformId: string | null): Promise<void>;
  /** Appends a group change (applied order is kept). */
  addGroup(channel: string, change: GroupChange): Promise<void>;
  /** Appends a format change (applied order is kept). */
  addFormat(channel: string, change: FormatChange): Promise<void>;
  findMessage(channel: string, id: string): Promise<StoredMessageHead | null>;
  /**
   * Stores a new ledger message, its mentions as rows of kind `mention`; false (and nothing
   * written) when a message with that id is already stored — the first wins.
   */
  insertMessage(channel: string, message: LedgerMessage): Promise<boolean>;
  /** Replaces the mention rows of a stored message and its broadcast mark. */
  setMentions(
    channel: string,
    id: string,
    mentions: readonly string[],
    broadcast: boolean,
  ): Promise<void>;
  setDeleted(channel: string, id: string, deleted: boolean): Promise<void>;
}

/** Opaque per-channel JSON state owned by other modules. */
export type ChannelStateKind = "settings" | "balance-note" | "conversation" | "format-trial";

export interface ChannelInfo {
  readonly channel: string;
  readonly workspace: string | null;
  readonly lastEventAt: number | null;
}

/**
 * "claimed": composing, nothing sent yet (another replica may take it over once its lease ends);
 * "posting": the platform call is under way (never taken over: the outcome may be a post);
 * "posted" and "missed" are final.
 */
export type ClaimStatus = "claimed" | "posting" | "posted" | "missed";

/**
 * Why a claim was recorded as missed; kept in `platformMessageId` as `(missed: <reason>)`.
 * "refused: <code>" is a post the platform answered with an error (it certainly did not arrive
 * and will not by retrying, e.g. Slack's `channel_not_found`, Teams' 403).
 */
export type MissReason = "outcome unknown" | "too late" | "not taken over" | `refused: ${string}`;

/** How `settlePost` ends a "posting" claim. */
export type PostSettlement =
  /** The platform shows the post: record its message id. */
  | { readonly status: "posted"; readonly platformMessageId: string }
  /** The platform shows no such post: open again (lease kept, so any replica may take it). */
  | { readonly status: "claimed" }
  | { readonly status: "missed"; readonly reason: MissReason };

/** The message id recorded for a claim missed for `reason`. */
export function missedMarker(reason: MissReason): string {
  return `(missed: ${reason})`;
}

/** One post claim: the row that lets exactly one replica post a digest or note. */
export interface PostClaim {
  readonly channel: string;
  /** e.g. "digest" or "note". */
  readonly kind: string;
  /** e.g. "2026-W45". */
  readonly period: string;
  readonly claimedBy: string;
  readonly claimedAt: number;
  /** Epoch ms after which an unfinished claim counts as a miss. */
  readonly leaseUntil: number;
  readonly status: ClaimStatus;
  readonly platformMessageId: string | null;
  /** Member key of the member a post concerns, if any (erased with that member). */
  readonly member: string | null;
}

export interface ClaimRequest {
  readonly channel: string;
  readonly kind: string;
  readonly period: string;
  readonly claimedBy: string;
  readonly now: number;
  readonly leaseMs: number;
  /** Platform id of the member the post concerns, if any; stored as a member key. */
  readonly member?: string | null;
}

export interface ClaimKey {
  readonly channel: string;
  readonly kind: string;
  readonly period: string;
}

export interface PurgeCutoffs {
  /** Ledger messages with `at` before this (epoch ms) are dropped. */
  readonly ledgerBefore: number;
  /** Delivery keys received before this are dropped. */
  readonly deliveriesBefore: number;
}

export interface PurgeCounts {
  readonly messages: number;
  readonly deliveries: number;
}

export interface EraseCounts {
  /** Rows deleted or cleared, summed over tables. */
  readonly rows: number;
}

export type StoreKind = "memory" | "sqlite" | "postgres";

export interface Store {
  readonly kind: StoreKind;
  /** Schema version of the open database (0 for memory). */
  readonly schemaVersion: number;
  /** The keyed HMAC-SHA256 of a platform id, as stored. Deterministic for one id key. */
  memberKey(platformId: string): string;
  /** Runs `fn` in one transaction: all of its writes commit, or none (it rethrows). */
  transaction<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T>;
  /** The channel's ledger, member ids mapped as the module header says. */
  loadSnapshot(channel: string): Promise<LedgerSnapshot>;

  /** Creates the channel row if needed and sets its workspace (null = none). */
  registerChannel(channel: string, workspace: string | null): Promise<void>;
  listChannels(): Promise<ChannelInfo[]>;

  readChannelState(channel: string, kind: ChannelStateKind): Promise<unknown>;
  /** Stores a JSON-serialisable value; `null` removes it. */
  writeChannelState(channel: string, kind: ChannelStateKind, value: unknown): Promise<void>;

  addFacilitator(channel: string, platformId: string): Promise<void>;
  removeFacilitator(channel: string, platformId: string): Promise<void>;
  isFacilitator(channel: string, platformId: string): Promise<boolean>;
  /** Facilitators as snapshot ids (platform id when kept, else `~` + key), sorted. */
  listFacilitators(channel: string): Promise<string[]>;
  /**
   * Platform ids of the channel's added facilitators, whatever their consent (the role keeps its
   * own platform id, DESIGN.md §7), sorted; a row stored before the role kept ids and never
   * re-added is left out.
   */
  facilitatorPlatformIds(channel: string): Promise<string[]>;

  /**
   * Inserts the claim (ON CONFLICT DO NOTHING), or takes over a "claimed" one whose lease ended
   * before `now` (its holder died before sending anything); true only for the one caller that
   * inserted or took it over.
   */
  claimPost(request: ClaimRequest): Promise<boolean>;
  /**
   * Moves the caller's "claimed" claim to "posting" just before the platform call, with a fresh
   * lease; false when the claim is no longer the caller's (taken over) or not "claimed".
   */
  beginPost(key: ClaimKey & { claimedBy: string; now: number; leaseMs: number }): Promise<boolean>;
  /**
   * Moves the caller's "posting" claim back to "claimed" when the platform refused the call
   * without taking it (e.g. rate limited), so it may be tried again: with `retryAt` its lease ends
   * then (any replica may take it from that time, e.g. after Slack's `Retry-After`), else the
   * lease is kept. False if not held.
   */
  releasePost(key: ClaimKey & { claimedBy: string; retryAt?: number }): Promise<boolean>;
  /**
   * Ends a "posting" claim as `settlement` says: the caller's own (`claimedBy`), or, with
   * `claimedBy` null, anyone's whose lease ended before `now` (a post whose outcome was unknown,
   * once the platform was asked). False when the claim is no longer "posting" or not eligible.
   */
  settlePost(
    key: ClaimKey & { claimedBy: string | null; now: number; settlement: PostSettlement },
  ): Promise<boolean>;
  /**
   * Records a slot as missed for `reason` (inserting the row, or turning a "claimed" one whose
   * lease ended before `now` into a miss); true when this call recorded it.
   */
  recordMiss(request: ClaimRequest & { reason: MissReason }): Promise<boolean>;
  /** Marks a claim posted by its holder with the platform's message id; false if not held. */
  completePost(key: ClaimKey & { claimedBy: string; platformMessageId: string }): Promise<boolean>;
  getClaim(key: ClaimKey): Promise<PostClaim | null>;
  /**
   * Marks as missed, and returns: "posting" claims whose lease ended before `now` (reason
   * "outcome unknown"), and "claimed" claims whose lease ended before `abandonedBefore` (reason
   * "not taken over", e.g. a note hour every replica has passed); without it, none of those.
   */
  markMissedClaims(now: number, abandonedBefore?: number): Promise<PostClaim[]>;
  /**
   * Claims of `kind` in `status` (default "claimed": takeover candidates; "posting": posts whose
   * outcome is unknown) whose lease ended before `now`, sorted.
   */
  expiredClaims(now: number, kind: string, status?: "claimed" | "posting"): Promise<PostClaim[]>;

  /** Deletes every row naming the member (by platform id) in the channel. */
  eraseMember(channel: string, platformId: string): Promise<EraseCounts>;
  eraseChannel(channel: string): Promise<EraseCounts>;
  eraseWorkspace(workspace: string): Promise<EraseCounts>;
  purge(cutoffs: PurgeCutoffs): Promise<PurgeCounts>;

  /**
   * A random secret named `name` (e.g. "report-links"), created on first use and kept in the
   * store, so every replica of one database signs and checks with the same one.
   */
  sharedSecret(name: string): Promise<string>;
  /** Rejected deliveries recorded so far (for operators and tests). */
  countRejected(): Promise<number>;

  close(): Promise<void>;
}
