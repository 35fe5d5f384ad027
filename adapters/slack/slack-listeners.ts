/**
 * @module slack-listeners
 * The Bolt listeners: member messages become neutral events ingested once per `event_id`;
 * `member_left_channel` erases the member's rows in that channel; `app_uninstalled` and a revoked
 * bot token erase the workspace; `/influence` is acknowledged at once and answered through
 * `respond()` (ephemeral unless the core says the answer is for the channel). A channel is
 * registered with its workspace the first time it is seen.
 */
import type { App } from "@slack/bolt";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";
import type { Logger } from "../../src/ports/logger.js";
import type { Bot } from "../create-bot.js";
import { coreChannelId, isSlackId } from "./channel-ids.js";
import { errorCode } from "./guarded-receiver.js";
import { isRecord, MAX_BLOCK_DEPTH, mapMessage } from "./map-message.js";
import type { MemberDirectory } from "./member-directory.js";
import { renderBlockKit } from "./render-block-kit.js";

export const INFLUENCE_COMMAND = "/influence";

const IN_THREAD_ANSWER =
  "/influence works in the channel itself, not inside a thread: type it in the channel's message box.";
const FAILED_ANSWER =
  "Sorry, plumbline could not answer just now. Nothing was changed; please try again in a minute.";

export interface ListenerDeps {
  /** The bot once `start` ran; null before. */
  readonly bot: () => Bot | null;
  readonly botUserId: string;
  readonly facilitators: readonly string[];
  readonly directory: MemberDirectory;
  readonly logger: Logger;
}

/** The delivery key of an Events API envelope: its `event_id`, marked as Slack's. */
export function deliveryKey(eventId: string): string {
  return `slack:${eventId}`;
}

/** The command's `trigger_id` as the request id of its delivery keys, when it has a sane shape. */
function requestIdOf(triggerId: unknown): { requestId?: string } {
  return typeof triggerId === "string" && /^[\w.-]{1,128}$/.test(triggerId)
    ? { requestId: `slack:${triggerId}` }
    : {};
}

function requireBot(deps: ListenerDeps): Bot {
  const bot = deps.bot();
  if (bot === null) throw new Error("slack adapter not started");
  return bot;
}

function slackMessage(message: OutgoingMessage) {
  return { text: message.text, blocks: renderBlockKit(message.blocks) };
}

/** Registers every listener plumbline uses on the app. */
export function registerListeners(app: App, deps: ListenerDeps): void {
  const { logger } = deps;
  const registered = new Set<string>();
  const ensureChannel = async (bot: Bot, channel: string, team: string) => {
    if (registered.has(channel)) return;
    await bot.store.registerChannel(channel, team);
    registered.add(channel);
  };

  app.event("message", async (args) => {
    const body: unknown = args.body;
    if (!isRecord(body) || typeof body.team_id !== "string" || typeof body.event_id !== "string") {
      return;
    }
    const mapped = mapMessage({ team: body.team_id, event: body.event, botUserId: deps.botUserId });
    if (mapped.kind === "invalid") {
      logger.warn({ event: body.event_id, field: mapped.field }, "slack message event incomplete");
      return;
    }
    if (mapped.kind === "ignored") {
      logger.debug({ event: body.event_id, reason: mapped.reason }, "slack message not counted");
      return;
    }
    if (mapped.blocksTooDeep) {
      logger.warn(
        { event: body.event_id, maxDepth: MAX_BLOCK_DEPTH },
        "slack blocks nest too deep; mentions read from the text",
      );
    }
    const bot = requireBot(deps);
    await ensureChannel(bot, mapped.event.channel, body.team_id);
    const { applied } = await bot.onEvent(mapped.event, deliveryKey(body.event_id));
    logger.debug(
      { event: body.event_id, type: mapped.event.type, applied },
      "slack event ingested",
    );
  });

  app.event("member_left_channel", async (args) => {
    const body: unknown = args.body;
    if (!isRecord(body) || !isRecord(body.event) || typeof body.team_id !== "string") return;
    const { user, channel } = body.event;
    if (!isSlackId(user) || !isSlackId(channel) || user === deps.botUserId) return;
    const counts = await requireBot(deps).store.eraseMember(
      coreChannelId(body.team_id, channel),
      user,
    );
    logger.info({ rows: counts.rows }, "slack member left; their rows in the channel erased");
  });

  const eraseWorkspace = async (team: string, why: string) => {
    const counts = await requireBot(deps).store.eraseWorkspace(team);
    for (const channel of registered) {
      if (channel.startsWith(coreChannelId(team, ""))) registered.delete(channel);
    }
    logger.info({ rows: counts.rows, why }, "slack workspace erased");
  };

  app.event("app_uninstalled", async (args) => {
    const body: unknown = args.body;
    if (isRecord(body) && typeof body.team_id === "string") {
      await eraseWorkspace(body.team_id, "app_uninstalled");
    }
  });

  app.event("tokens_revoked", async (args) => {
    const body: unknown = args.body;
    if (!isRecord(body) || typeof body.team_id !== "string" || !isRecord(body.event)) return;
    const tokens = body.event.tokens;
    const bot = isRecord(tokens) && Array.isArray(tokens.bot) ? tokens.bot : [];
    if (bot.length > 0) await eraseWorkspace(body.team_id, "tokens_revoked");
  });

  app.command(INFLUENCE_COMMAND, async ({ command, ack, respond }) => {
    await ack();
    const raw = command as unknown as Record<string, unknown>;
    if (typeof raw.thread_ts === "string" && raw.thread_ts !== "") {
      await respond({ response_type: "ephemeral", text: IN_THREAD_ANSWER });
      return;
    }
    const { team_id: team, channel_id: channelId, user_id: member } = command;
    try {
      const bot = requireBot(deps);
      const channel = coreChannelId(team, channelId);
      await ensureChannel(bot, channel, team);
      const isPlatformAdmin = deps.facilitators.includes(member)
        ? false
        : (await deps.directory.info(member)).isAdmin;
      const answer = await bot.onCommand({
        channel,
        member,
        text: command.text ?? "",
        isPlatformAdmin,
        inThread: false,
        ...requestIdOf(raw.trigger_id),
      });
      await respond({
        response_type: answer.visibility === "channel" ? "in_channel" : "ephemeral",
        ...slackMessage(answer.message),
      });
    } catch (error) {
      logger.error({ error: errorCode(error) }, "slack command failed");
      await respond({ response_type: "ephemeral", text: FAILED_ANSWER });
    }
  });
}
