/**
 * @module scheduler-deps
 * What the composition root hands the scheduler: the store, the platform, the clock, the logger,
 * this replica's id and the compose functions (the analysis and the message builders live
 * elsewhere), plus the scheduler's timing constants and the message ids it records when nothing
 * reached the channel.
 */
import type { ChannelSettings } from "../domain/channel-settings.js";
import { DAY_MS } from "../domain/settings.js";
import type { ChatPlatform, OutgoingMessage } from "../ports/chat-platform.js";
import type { Clock } from "../ports/clock.js";
import type { Logger } from "../ports/logger.js";
import type { Store } from "../ports/store.js";

/** Default claim lease: a claim unfinished this long after it was taken is a miss. */
export const DEFAULT_LEASE_MS = 15 * 60_000;
/** A digest slot this late or later is recorded as missed instead of posted. */
export const LATE_LIMIT_MS = DAY_MS;
/** How far back each pass looks for digest slots (a week and a day: every weekly slot is seen). */
export const DEFAULT_LOOKBACK_MS = 8 * DAY_MS;
/** How far before a claim was taken `findPost` looks (clocks of replica and platform differ). */
export const LOOK_BACK_MS = 60_000;
/** Message id recorded when the compose function had nothing to post. */
export const NOTHING_POSTED = "(nothing posted)";
/** Message id recorded for a note delivered privately to the facilitators. */
export const FACILITATORS_DELIVERY = "(sent to facilitators)";

/** A composed balance note and where it goes. */
export interface NoteComposition {
  readonly message: OutgoingMessage;
  readonly audience: "channel" | "facilitators";
  /** Platform id of the member the note concerns, stored with the claim (erased with them). */
  readonly member?: string | null;
  /** Runs once the note is delivered and its claim completed, e.g. `NoteDecision.commit`. */
  readonly onPosted?: () => Promise<void>;
}

/**
 * A post that falls due at a known time outside the digest schedule (a format trial's week switch
 * or its result), claimed under (channel, "trial", `period`) so one replica posts it once.
 */
export interface DuePost {
  /** Unique per post, e.g. "trial 2026-11-02T09:00Z week 2". */
  readonly period: string;
  readonly dueAt: number;
  /** From this time the post is stale and recorded as missed ("too late"); null = never. */
  readonly staleAt: number | null;
  /** Composed only once the claim is held; null = nothing to post. */
  readonly compose: () => Promise<OutgoingMessage | null>;
  /** Runs once the post is delivered and its claim completed. */
  readonly onPosted?: () => Promise<void>;
}

export interface SchedulerDeps {
  readonly store: Store;
  readonly platform: ChatPlatform;
  readonly clock: Clock;
  readonly logger: Logger;
  /** This replica's name in claim rows (config `replicaId`). */
  readonly replicaId: string;
  readonly readSettings: (channel: string) => Promise<ChannelSettings>;
  /** The digest for the slot at `slotAt` (epoch ms); null = nothing to post. */
  readonly composeDigest: (channel: string, slotAt: number) => Promise<OutgoingMessage | null>;
  /** Runs the analysis and the note policy; null = no note due. */
  readonly composeNote: (channel: string, now: number) => Promise<NoteComposition | null>;
  /** Posts due now for the channel outside the digest schedule (format trials); default none. */
  readonly duePosts?: (channel: string, now: number) => Promise<readonly DuePost[]>;
  /** Delivers a note to the channel's facilitators privately. */
  readonly sendToFacilitators?: (channel: string, message: OutgoingMessage) => Promise<void>;
  readonly leaseMs?: number;
  readonly lookbackMs?: number;
  /**
   * Channels a pass works on at once (default 1): with a worker pool, one job's analysis runs
   * while another waits on the store or the platform, so a lone replica can use every worker.
   */
  readonly jobs?: number;
}
