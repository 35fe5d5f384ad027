/**
 * @module chat-platform
 * What the core needs from a chat platform to speak: post in a channel, answer one member
 * privately, and look up a named member's display name. Adapters (Slack, Teams, local) implement
 * it and render the neutral blocks their own way; the core never sees a platform payload.
 */
import type { Block } from "../domain/blocks.js";

/** A chart to show with a message: SVG markup (core output) and its alternative text. */
export interface MessageChart {
  readonly svg: string;
  readonly alt: string;
}

/** A message in neutral form: blocks plus a plain-text fallback of the same content. */
export interface OutgoingMessage {
  readonly blocks: readonly Block[];
  readonly text: string;
  /**
   * The share bars as a chart image, when the message has them. Adapters rasterise it; when
   * that or the upload fails they say so and post the text alone (the bars blocks carry the
   * same figures).
   */
  readonly chart?: MessageChart;
}

/** How a scheduled post is sent (the scheduler's claim). */
export interface PostOptions {
  /**
   * Names the scheduled post, e.g. "digest 2026-11-30T09:00[UTC]". A platform that can carry it
   * invisibly with the message (Slack's message metadata) does, so `findPost` can look for it.
   */
  readonly marker?: string;
  /**
   * The send must start within this many ms of the call (e.g. while it waits in a rate-limit
   * queue), else it is not made and fails as "not sent": the claim's lease must not end while a
   * request may still reach the platform.
   */
  readonly startWithinMs?: number;
}

/**
 * What a failed post means. "not-sent": the platform certainly did not take it (rate limited,
 * or never started), so it may be tried again, after `retryAfterMs` when the platform said so.
 * "refused": the platform answered with an error and will not take it as it is (e.g. the bot was
 * removed from the channel); `reason` is the platform's code. "unknown": the request may have
 * reached the channel (timeout, 5xx, a reset connection).
 */
export type PostFailure =
  | { readonly outcome: "not-sent"; readonly retryAfterMs: number | null }
  | { readonly outcome: "refused"; readonly reason: string }
  | { readonly outcome: "unknown" };

/** Thrown by a platform's send queue when a send could not start in its `startWithinMs`. */
export class SendNotStartedError extends Error {
  constructor(waitedMs: number) {
    super(`the send did not start within its time (waited ${Math.round(waitedMs)} ms)`);
    this.name = "SendNotStartedError";
  }
}

export interface ChatPlatform {
  readonly name: string;
  /** Posts in the channel; resolves to the platform's message id once the platform accepted it. */
  postToChannel(
    channel: string,
    message: OutgoingMessage,
    options?: PostOptions,
  ): Promise<{ messageId: string }>;
  /** What a failure of `postToChannel` in `channel` means; absent = every failure is "unknown". */
  describeFailure?(channel: string, error: unknown): PostFailure;
  /**
   * The message id of the post carrying `marker` in the channel since `since` (epoch ms), or
   * null when the platform shows none; throws when it cannot tell (the call failed). Absent on
   * platforms that cannot look (Teams' bot API lists no channel messages).
   */
  findPost?(channel: string, marker: string, since: number): Promise<string | null>;
  /** Shows a message to one member only (ephemeral or a personal conversation). */
  postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void>;
  /** Display name for a member who consented to be named; null when unknown. */
  displayName(member: string): Promise<string | null>;
}
