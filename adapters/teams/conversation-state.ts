/**
 * @module conversation-state
 * The per-channel state the Teams adapter keeps through `Store.writeChannelState(channel,
 * "conversation", …)`: the conversation reference for proactive posts (always the bare channel,
 * never a thread), the team it belongs to (to erase every channel of a team the bot leaves) and the
 * tenant. `readConversationState` checks the shape of what it reads back.
 */
import type { Store } from "../../src/ports/store.js";

export interface StoredReference {
  readonly channelId: string;
  readonly serviceUrl: string;
  readonly conversation: {
    readonly id: string;
    readonly conversationType?: string;
    readonly tenantId?: string;
    readonly isGroup?: boolean;
  };
  readonly bot?: { readonly id: string; readonly name?: string };
  readonly locale?: string;
}

export interface ConversationState {
  readonly reference: StoredReference;
  readonly teamId: string | null;
  readonly tenantId: string;
}

function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null;
}

/** The stored state of a channel, or null when none (or not in this shape). */
export async function readConversationState(
  store: Store,
  channel: string,
): Promise<ConversationState | null> {
  const value = await store.readChannelState(channel, "conversation");
  if (!isRecord(value) || !isRecord(value.reference)) return null;
  const ref = value.reference;
  if (typeof ref.serviceUrl !== "string" || typeof ref.channelId !== "string") return null;
  if (!isRecord(ref.conversation) || typeof ref.conversation.id !== "string") return null;
  return {
    reference: ref as unknown as StoredReference,
    teamId: typeof value.teamId === "string" ? value.teamId : null,
    tenantId: typeof value.tenantId === "string" ? value.tenantId : "unknown-tenant",
  };
}
