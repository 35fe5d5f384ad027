/**
 * @module teams-handler
 * The bot's turn logic on Teams, a `TeamsActivityHandler`: channel and group-chat messages become
 * `message` events (author, thread root or replied-to parent, people mentioned), edits `edit`
 * events with the new mention list, soft deletes `delete`, undeletes `undelete`
 * (botbuilder 4.23 `onTeamsMessageEditEvent`, `onTeamsMessageSoftDeleteEvent`,
 * `onTeamsMessageUndeleteEvent`); a message to the bot starting with `influence` runs the command
 * router instead and is not counted. Message text is read only to find a command and is then
 * cleared from the activity; it is never stored or logged. Installing stores the conversation
 * reference and registers the channel; removal erases the channel (all channels of a team).
 */
import { TeamsActivityHandler, TeamsInfo, type TurnContext } from "botbuilder";
import type { ChatEvent } from "../../src/domain/events.js";
import type { Logger } from "../../src/ports/logger.js";
import type { Bot } from "../create-bot.js";
import {
  type ActivityLike,
  activityTime,
  commandWords,
  coreChannelId,
  deliveryKeyOf,
  type MentionRef,
  memberIdOf,
  mentionsBot,
  parentOf,
  personMentions,
  threadRootId,
} from "./activity-fields.js";
import { ChannelRegistry } from "./channel-registry.js";
import type { MemberDirectory } from "./member-directory.js";
import type { TeamsPlatform } from "./teams-platform.js";

export const PERSONAL_CHAT_ANSWER =
  "plumbline answers in the channel it measures: mention it there, as in @plumbline influence me.";

export interface TeamsHandlerOptions {
  readonly platform: TeamsPlatform;
  readonly directory: MemberDirectory;
  readonly logger: Logger;
  readonly now: () => number;
}

export class PlumblineTeamsHandler extends TeamsActivityHandler {
  private bot: Bot | null = null;
  private registry: ChannelRegistry | null = null;

  constructor(private readonly options: TeamsHandlerOptions) {
    super();
    this.onMessage(async (context, next) => {
      await this.message(context);
      await next();
    });
    this.onTeamsMessageEditEvent(async (context, next) => {
      await this.edit(context);
      await next();
    });
    this.onTeamsMessageSoftDeleteEvent(async (context, next) => {
      await this.removal(context, "delete");
      await next();
    });
    this.onTeamsMessageUndeleteEvent(async (context, next) => {
      await this.removal(context, "undelete");
      await next();
    });
    this.onConversationUpdate(async (context, next) => {
      await this.conversationUpdate(context);
      await next();
    });
    this.onInstallationUpdate(async (context, next) => {
      const action = context.activity.action ?? "";
      if (action.startsWith("remove")) await this.requireRegistry().forget(context.activity);
      else if (action.startsWith("add"))
        await this.requireRegistry().remember(context.activity, true);
      await next();
    });
  }

  /** Connects the handler to the bot once it exists. */
  attach(bot: Bot): void {
    this.bot = bot;
    this.registry = new ChannelRegistry(bot.store, this.options.logger);
  }

  private requireBot(): Bot {
    if (this.bot === null) throw new Error("the Teams handler is not started");
    return this.bot;
  }

  private requireRegistry(): ChannelRegistry {
    if (this.registry === null) throw new Error("the Teams handler is not started");
    return this.registry;
  }

  /** Reads and clears the activity's text and attachments: nothing of them outlives this call. */
  private takeText(context: TurnContext): string {
    const activity = context.activity;
    const text = typeof activity.text === "string" ? activity.text : "";
    activity.text = "";
    activity.attachments = [];
    return text;
  }

  private async message(context: TurnContext): Promise<void> {
    const activity = context.activity;
    const messageText = this.takeText(context);
    const kind = activity.conversation?.conversationType;
    if (kind === "personal") {
      if (commandWords(activity, messageText, (m) => m.id) !== null) {
        await this.options.platform.sendInTurn(context, PERSONAL_CHAT_ANSWER);
      }
      return;
    }
    const author = memberIdOf(activity.from);
    if (!activity.id || !activity.conversation?.id || author === null) {
      this.options.logger.debug(
        { type: activity.type },
        "teams message without id, conversation or sender skipped",
      );
      return;
    }
    this.options.directory.learn(activity.from);
    const channel = coreChannelId(activity.conversation.id);
    await this.requireRegistry().remember(activity, false);
    const mentions = await this.resolveMentions(context, personMentions(activity));
    if (mentionsBot(activity)) {
      const words = commandWords(activity, messageText, (m) => mentions.get(m.id) ?? m.id);
      if (words !== null) {
        await this.command(context, { channel, member: author, words });
        return;
      }
    }
    const parent = parentOf(activity);
    const event: ChatEvent = {
      type: "message",
      at: activityTime(activity, this.options.now()),
      channel,
      id: activity.id,
      author,
      ...(parent !== null ? { parent } : {}),
      mentions: [...new Set(mentions.values())].filter((m) => m !== author),
    };
    await this.requireBot().onEvent(event, deliveryKeyOf(activity));
  }

  private async command(
    context: TurnContext,
    request: { channel: string; member: string; words: string },
  ): Promise<void> {
    const activity = context.activity;
    const root = threadRootId(activity.conversation.id);
    const response = await this.requireBot().onCommand({
      channel: request.channel,
      member: request.member,
      text: request.words,
      isPlatformAdmin: await this.isTeamOwner(context),
      inThread: root !== null && root !== activity.id,
      ...(typeof activity.id === "string" && activity.id !== ""
        ? { requestId: `teams:${activity.id}` }
        : {}),
    });
    if (response.visibility === "channel") {
      await this.options.platform.postToChannel(request.channel, response.message);
    } else {
      await this.options.platform.answerPrivately(context, response.message);
    }
    this.options.logger.info(
      { channel: request.channel, visibility: response.visibility },
      "teams command answered",
    );
  }

  /** Team owners count as platform admins where the roster says so (`userRole`). */
  private async isTeamOwner(context: TurnContext): Promise<boolean> {
    if (context.activity.conversation?.conversationType !== "channel") return false;
    try {
      const account = await TeamsInfo.getMember(context, context.activity.from.id);
      this.options.directory.learn(account);
      return (account.userRole ?? "").toLowerCase() === "owner";
    } catch (error) {
      this.options.logger.warn(
        { error: errorName(error) },
        "teams roster lookup failed; not an owner",
      );
      return false;
    }
  }

  /** Channel account id → core member id for each mention, via the roster when not yet seen. */
  private async resolveMentions(
    context: TurnContext,
    mentions: readonly MentionRef[],
  ): Promise<Map<string, string>> {
    const out = new Map<string, string>();
    for (const m of mentions) {
      const known = m.aadObjectId ?? this.options.directory.memberOf(m.id);
      if (known !== null) {
        out.set(m.id, known);
        continue;
      }
      try {
        const account = await TeamsInfo.getMember(context, m.id);
        this.options.directory.learn(account);
        const member = memberIdOf(account);
        if (member !== null) out.set(m.id, member);
      } catch (error) {
        this.options.logger.warn(
          { error: errorName(error) },
          "teams mention not in the roster; not counted",
        );
      }
    }
    return out;
  }

  private async edit(context: TurnContext): Promise<void> {
    const activity = context.activity;
    this.takeText(context);
    if (!activity.id || !activity.conversation?.id) return;
    const mentions = await this.resolveMentions(context, personMentions(activity));
    const author = memberIdOf(activity.from);
    await this.requireBot().onEvent(
      {
        type: "edit",
        at: activityTime(activity, this.options.now()),
        channel: coreChannelId(activity.conversation.id),
        id: activity.id,
        mentions: [...new Set(mentions.values())].filter((m) => m !== author),
      },
      deliveryKeyOf(activity),
    );
  }

  private async removal(context: TurnContext, type: "delete" | "undelete"): Promise<void> {
    const activity = context.activity;
    this.takeText(context);
    if (!activity.id || !activity.conversation?.id) return;
    await this.requireBot().onEvent(
      {
        type,
        at: activityTime(activity, this.options.now()),
        channel: coreChannelId(activity.conversation.id),
        id: activity.id,
      },
      deliveryKeyOf(activity),
    );
  }

  private async conversationUpdate(context: TurnContext): Promise<void> {
    const activity: ActivityLike = context.activity;
    const botId = activity.recipient?.id;
    const registry = this.requireRegistry();
    if (activity.membersAdded?.some((m) => m.id === botId)) await registry.remember(activity, true);
    const removed = activity.membersRemoved ?? [];
    const eventType = (activity.channelData as { eventType?: unknown } | undefined)?.eventType;
    if (removed.some((m) => m.id === botId) || eventType === "teamDeleted") {
      await registry.forget(activity);
      return;
    }
    if (eventType === "channelDeleted") {
      await registry.forgetChannel(activity);
      return;
    }
    for (const member of removed) {
      const id = memberIdOf(member);
      if (id !== null) await registry.eraseMember(activity, id);
    }
  }
}

function errorName(error: unknown): string {
  return error instanceof Error ? `${error.name}: ${error.message}`.slice(0, 200) : "unknown error";
}
