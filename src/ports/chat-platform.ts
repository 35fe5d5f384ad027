/**
 * @module chat-platform
 * What the core needs from a chat platform to speak: post in a channel, answer one member
 * privately, and look up a named member's display name. Adapters (Slack, Teams, local) implement
 * it and render the neutral blocks their own way; the core never sees a platform payload.
 */
import type { Block } from "../report/blocks.js";

/** A message in neutral form: blocks plus a plain-text fallback of the same content. */
export interface OutgoingMessage {
  readonly blocks: readonly Block[];
  readonly text: string;
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
