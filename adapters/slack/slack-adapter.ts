/**
 * @module slack-adapter
 * Builds the Slack `PlatformAdapter` for `plumbline serve` on `@slack/bolt` 5.1. HTTP mode (the
 * default) serves events, `/influence` and interactivity on `/slack/events` through the guarded
 * receiver; with an app token it uses Socket Mode instead (no routes; `start` connects; Slack's
 * Socket Mode acknowledges before processing, so it is for development). The Web API client posts
 * to SLACK_API_URL when set, never retries on its own and rejects rate-limited calls, so the send
 * queue alone decides what is sent again. The bot's identity comes from `auth.test` once, here,
 * which also fails fast on a bad token.
 */
import { App, webApi } from "@slack/bolt";
import type { SlackConfig } from "../../src/config/load-config.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { type Clock, systemClock } from "../../src/ports/clock.js";
import type { Logger } from "../../src/ports/logger.js";
import type { ChartRenderer } from "../chart-image.js";
import type { Bot } from "../create-bot.js";
import type { PlatformAdapter } from "../platform-adapter.js";
import { boltLogger } from "./bolt-logger.js";
import { SLACK_CHANNEL_PREFIX } from "./channel-ids.js";
import { errorCode, GuardedReceiver } from "./guarded-receiver.js";
import { isRecord } from "./map-message.js";
import { MemberDirectory } from "./member-directory.js";
import { SendQueue } from "./send-queue.js";
import { registerListeners } from "./slack-listeners.js";
import { SlackPlatform } from "./slack-platform.js";

export interface SlackIdentity {
  readonly botUserId: string;
  readonly botId: string;
}

export interface SlackAdapterOptions {
  readonly config: SlackConfig;
  readonly logger: Logger;
  /** Platform ids that are facilitators everywhere (they need no `users.info` look-up). */
  readonly facilitators: readonly string[];
  /** Request timestamps are checked against this clock; default the system clock. */
  readonly clock?: Clock;
  /** The send queue's wait; default a timer. Tests pass one that does not really wait. */
  readonly sleep?: (ms: number) => Promise<void>;
  /** Skips `auth.test` (benchmarks); normally looked up from the token. */
  readonly identity?: SlackIdentity;
  /** Least time between two posts in one channel; default 1000 ms. */
  readonly postIntervalMs?: number;
  /** SVG → PNG for the digest's chart; default `svgToPng` (tests inject a failing one). */
  readonly renderChart?: ChartRenderer;
}

const realSleep = (ms: number) => new Promise<void>((resolve) => setTimeout(resolve, ms));

function apiUrl(config: SlackConfig): string | undefined {
  if (config.apiUrl === null) return undefined;
  return config.apiUrl.endsWith("/") ? config.apiUrl : `${config.apiUrl}/`;
}

/** Seconds to wait for a rate-limited Web API call, else null. */
export function retryAfterOf(error: unknown): number | null {
  if (!isRecord(error) && !(error instanceof Error)) return null;
  const { code, retryAfter } = error as { code?: unknown; retryAfter?: unknown };
  if (code !== webApi.ErrorCode.RateLimitedError) return null;
  return typeof retryAfter === "number" && retryAfter >= 0 ? retryAfter : 1;
}

async function lookUpIdentity(client: webApi.WebClient): Promise<SlackIdentity> {
  let result: webApi.AuthTestResponse;
  try {
    result = await client.auth.test();
  } catch (error) {
    throw new PlumblineError("CONFIG_INVALID", `Slack auth.test failed (${errorCode(error)})`, {
      hint: "check SLACK_BOT_TOKEN (a bot token, xoxb-…) and, if set, SLACK_API_URL",
      cause: error,
    });
  }
  if (typeof result.user_id !== "string" || typeof result.bot_id !== "string") {
    throw new PlumblineError("CONFIG_INVALID", "SLACK_BOT_TOKEN is not a bot token", {
      hint: "use the Bot User OAuth Token (xoxb-…) from the app's OAuth & Permissions page",
    });
  }
  return { botUserId: result.user_id, botId: result.bot_id };
}

/** The Slack adapter; resolves once the bot's identity is known. */
export async function createSlackAdapter(options: SlackAdapterOptions): Promise<PlatformAdapter> {
  const { config, logger } = options;
  const clock = options.clock ?? systemClock;
  const slackLogger = boltLogger(logger);
  const clientOptions: webApi.WebClientOptions = {
    ...(apiUrl(config) ? { slackApiUrl: apiUrl(config) } : {}),
    logger: slackLogger,
    rejectRateLimitedCalls: true,
    retryConfig: { retries: 0 },
    timeout: 15_000,
  };
  const client = new webApi.WebClient(config.botToken, clientOptions);
  const identity = options.identity ?? (await lookUpIdentity(client));
  const socketMode = config.appToken !== null;
  const receiver = socketMode
    ? null
    : new GuardedReceiver({ signingSecret: config.signingSecret, now: () => clock.now(), logger });
  const app = new App({
    token: config.botToken,
    botId: identity.botId,
    botUserId: identity.botUserId,
    logger: slackLogger,
    clientOptions,
    ignoreSelf: true,
    ...(receiver ? { receiver } : { socketMode: true, appToken: config.appToken ?? "" }),
  });
  // Errors go back to the receiver (500, Slack retries) instead of Bolt's default logging.
  app.error(async (error) => {
    throw error;
  });

  let bot: Bot | null = null;
  const directory = new MemberDirectory({
    lookup: (user) => client.users.info({ user }),
    now: () => clock.now(),
    logger,
    describeError: errorCode,
  });
  registerListeners(app, {
    bot: () => bot,
    botUserId: identity.botUserId,
    facilitators: options.facilitators,
    directory,
    logger,
  });
  const queue = new SendQueue({
    now: () => clock.now(),
    sleep: options.sleep ?? realSleep,
    retryAfterOf,
    logger,
    ...(options.postIntervalMs !== undefined ? { minIntervalMs: options.postIntervalMs } : {}),
  });
  const chat = {
    // The renderer's blocks are a subset of Block Kit; the SDK's argument types are wider unions.
    postMessage: (args: Record<string, unknown>) =>
      client.chat.postMessage(args as unknown as webApi.ChatPostMessageArguments),
    postEphemeral: (args: Record<string, unknown>) =>
      client.chat.postEphemeral(args as unknown as webApi.ChatPostEphemeralArguments),
    update: (args: Record<string, unknown>) =>
      client.chat.update(args as unknown as webApi.ChatUpdateArguments),
  };
  const upload = (args: Record<string, unknown>) =>
    client.filesUploadV2(args as unknown as webApi.FilesUploadV2Arguments);
  const platform = new SlackPlatform({
    chat,
    history: (args) =>
      client.conversations.history(args as unknown as webApi.ConversationsHistoryArguments),
    upload,
    queue,
    directory,
    logger,
    ...(options.renderChart ? { renderChart: options.renderChart } : {}),
  });

  return {
    name: "slack",
    channelPrefix: SLACK_CHANNEL_PREFIX,
    platform,
    routes: receiver ? [receiver.route] : [],
    async start(next: Bot) {
      bot = next;
      await app.start();
      logger.info({ mode: socketMode ? "socket" : "http" }, "slack adapter started");
    },
    async stop() {
      await app.stop();
      bot = null;
    },
  };
}
