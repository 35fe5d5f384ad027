/**
 * @module channel-registry
 * Which Teams channels and chats the bot is in, kept in the store: on install (and on the first
 * message from a channel this process has not seen) the conversation reference of the bare channel
 * is stored and the channel registered under its tenant; when the bot is removed from a chat or a
 * team, or a team or channel is deleted, every channel concerned is erased; a member leaving is
 * erased from the channels of that team or chat.
 */
import { TurnContext } from "botbuilder";
import type { Logger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import {
  type ActivityLike,
  coreChannelId,
  platformConversationId,
  TEAMS_CHANNEL_PREFIX,
  teamIdOf,
  tenantOf,
} from "./activity-fields.js";
import { type ConversationState, readConversationState } from "./conversation-state.js";

export class ChannelRegistry {
  /** Channel → service URL stored by this process. */
  private readonly remembered = new Map<string, string>();

  constructor(
    private readonly store: Store,
    private readonly logger: Logger,
  ) {}

  /** Stores the reference (bare channel) and registers the channel; `force` rewrites it. */
  async remember(activity: ActivityLike, force: boolean): Promise<void> {
    const conversationId = activity.conversation?.id;
    if (!conversationId || !activity.serviceUrl) return;
    const channel = coreChannelId(conversationId);
    if (!force && this.remembered.get(channel) === activity.serviceUrl) return;
    const reference = TurnContext.getConversationReference(
      activity as Parameters<typeof TurnContext.getConversationReference>[0],
    );
    const tenantId = tenantOf(activity);
    const state: ConversationState = {
      reference: {
        channelId: reference.channelId ?? "msteams",
        serviceUrl: activity.serviceUrl,
        conversation: {
          id: platformConversationId(channel),
          ...(activity.conversation?.conversationType
            ? { conversationType: activity.conversation.conversationType }
            : {}),
          tenantId,
        },
        ...(reference.bot?.id
          ? { bot: { id: reference.bot.id, name: reference.bot.name ?? "" } }
          : {}),
      },
      teamId: teamIdOf(activity),
      tenantId,
    };
    await this.store.registerChannel(channel, tenantId);
    await this.store.writeChannelState(channel, "conversation", state);
    this.remembered.set(channel, activity.serviceUrl);
    if (force) this.logger.info({ channel }, "teams conversation registered");
  }

  /** The channels of the activity's team (every channel stored with that team id), or its chat. */
  private async channelsOf(activity: ActivityLike): Promise<string[]> {
    const own = activity.conversation?.id ? [coreChannelId(activity.conversation.id)] : [];
    const team = teamIdOf(activity);
    if (team === null) return own;
    const out = new Set(own);
    for (const info of await this.store.listChannels()) {
      if (!info.channel.startsWith(TEAMS_CHANNEL_PREFIX)) continue;
      const state = await readConversationState(this.store, info.channel);
      if (state?.teamId === team) out.add(info.channel);
    }
    return [...out];
  }

  /** The bot left (or the team was deleted): erase every channel concerned. */
  async forget(activity: ActivityLike): Promise<void> {
    for (const channel of await this.channelsOf(activity)) {
      const counts = await this.store.eraseChannel(channel);
      this.remembered.delete(channel);
      this.logger.info({ channel, rows: counts.rows }, "teams channel erased: the bot was removed");
    }
  }

  /** A channel of a team was deleted (`channelData.channel.id`). */
  async forgetChannel(activity: ActivityLike): Promise<void> {
    const data = activity.channelData as { channel?: { id?: unknown } } | undefined;
    const id = data?.channel?.id;
    if (typeof id !== "string" || id === "") return;
    const channel = coreChannelId(id);
    const counts = await this.store.eraseChannel(channel);
    this.remembered.delete(channel);
    this.logger.info(
      { channel, rows: counts.rows },
      "teams channel erased: the channel was deleted",
    );
  }

  /** A member left the team or chat: erase them from each of its channels. */
  async eraseMember(activity: ActivityLike, member: string): Promise<void> {
    let rows = 0;
    for (const channel of await this.channelsOf(activity))
      rows += (await this.store.eraseMember(channel, member)).rows;
    this.logger.info({ rows }, "teams member erased: they left the team or chat");
  }
}
