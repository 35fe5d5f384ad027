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

export interface ChatPlatform {
  readonly name: string;
  /** Posts in the channel; resolves to the platform's message id once the platform accepted it. */
  postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }>;
  /** Shows a message to one member only (ephemeral or a personal conversation). */
  postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void>;
  /** Display name for a member who consented to be named; null when unknown. */
  displayName(member: string): Promise<string | null>;
}
