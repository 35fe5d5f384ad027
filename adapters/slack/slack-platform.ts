/**
 * @module slack-platform
 * The `ChatPlatform` for Slack: channel posts with `chat.postMessage` and private answers with
 * `chat.postEphemeral` in the channel, both as Block Kit with the plain text as fallback and both
 * through the per-channel send queue; display names from the member directory. A post resolves
 * only once Slack answered `ok` with the message's ts, else it throws (the scheduler's claim then
 * records a miss instead of posting twice). A message's chart is rendered to PNG before the post
 * and shared in the post's thread afterwards (see chart-upload); a chart that cannot be rendered or
 * uploaded never stops the post, which then says the chart is missing.
 *
 * A scheduled post carries its claim's marker as message metadata (`event_type` "plumbline_post",
 * docs.slack.dev/messaging/message-metadata; no content, only kind and period), so `findPost`
 * can ask `conversations.history` (with `include_all_metadata`, scopes channels:history and
 * groups:history, which the bot has for its events) whether a post whose answer was lost
 * arrived. `describeFailure` sorts a failed post: Slack's 429 (after the queue's waits) and a send
 * that never started are "not sent"; an `ok: false` answer is "refused" with Slack's error code
 * (except Slack's own server errors, whose outcome is unknown); a 5xx, a timeout or a network
 * error is "unknown".
 */
import { webApi } from "@slack/bolt";
import {
  type ChatPlatform,
  type OutgoingMessage,
  type PostFailure,
  type PostOptions,
  SendNotStartedError,
} from "../../src/ports/chat-platform.js";
import { type Logger, silentLogger } from "../../src/ports/logger.js";
import { type ChartRenderer, svgToPng } from "../chart-image.js";
import { isSlackId, parseCoreChannelId, type SlackChannelRef } from "./channel-ids.js";
import {
  CHART_IN_THREAD_TEXT,
  CHART_MISSING_TEXT,
  type SlackUploadApi,
  uploadChartToThread,
} from "./chart-upload.js";
import { errorCode } from "./guarded-receiver.js";
import type { MemberDirectory } from "./member-directory.js";
import { renderBlockKit } from "./render-block-kit.js";
import type { SendQueue } from "./send-queue.js";

/** The Web API methods used to post, as `WebClient.chat` offers them. */
export interface SlackChatApi {
  postMessage(args: Record<string, unknown>): Promise<{ ok?: boolean; ts?: string }>;
  postEphemeral(args: Record<string, unknown>): Promise<{ ok?: boolean }>;
  /** Edits a posted message (only to say its chart is missing). */
  update(args: Record<string, unknown>): Promise<{ ok?: boolean }>;
}

/** One page of `conversations.history`, as far as `findPost` reads it. */
export interface SlackHistoryPage {
  readonly ok?: boolean;
  readonly messages?: readonly {
    readonly ts?: string;
    readonly metadata?: { readonly event_type?: string; readonly event_payload?: unknown };
  }[];
  readonly has_more?: boolean;
  readonly response_metadata?: { readonly next_cursor?: string };
}

/** The metadata event type of plumbline's scheduled posts. */
export const POST_EVENT_TYPE = "plumbline_post";
/** Pages of history `findPost` reads at most (200 messages each). */
const HISTORY_PAGES = 5;
/** `ok: false` codes that are Slack's own failures: the post may or may not exist. */
const SERVER_ERRORS = new Set([
  "internal_error",
  "fatal_error",
  "request_timeout",
  "service_unavailable",
]);

export interface SlackPlatformOptions {
  readonly chat: SlackChatApi;
  /** `WebClient.conversations.history`; without it `findPost` is absent (outcomes unknown). */
  readonly history?: (args: Record<string, unknown>) => Promise<SlackHistoryPage>;
  /** `WebClient.filesUploadV2` (scope files:write). */
  readonly upload: SlackUploadApi;
  readonly queue: SendQueue;
  readonly directory: MemberDirectory;
  readonly logger?: Logger;
  /** SVG → PNG for chart images; default `svgToPng` at twice the chart's size. */
  readonly renderChart?: ChartRenderer;
}

function slackChannel(channel: string): SlackChannelRef {
  const ref = parseCoreChannelId(channel);
  if (ref === null) throw new Error(`not a Slack channel id: ${channel}`);
  return ref;
}

export class SlackPlatform implements ChatPlatform {
  readonly name = "slack";
  private readonly logger: Logger;
  private readonly renderChart: ChartRenderer;
  readonly findPost?: (channel: string, marker: string, since: number) => Promise<string | null>;

  constructor(private readonly options: SlackPlatformOptions) {
    this.logger = options.logger ?? silentLogger;
    this.renderChart = options.renderChart ?? ((svg) => svgToPng(svg, { logger: this.logger }));
    const history = options.history;
    if (history !== undefined) {
      this.findPost = (channel, marker, since) => findInHistory(history, channel, marker, since);
    }
  }

  describeFailure(_channel: string, error: unknown): PostFailure {
    if (error instanceof SendNotStartedError) return { outcome: "not-sent", retryAfterMs: null };
    const retryAfter = retryAfterSeconds(error);
    if (retryAfter !== null) return { outcome: "not-sent", retryAfterMs: retryAfter * 1000 };
    const code = (error as { code?: unknown } | null)?.code;
    if (code === webApi.ErrorCode.PlatformError) {
      const slackError = (error as { data?: { error?: unknown } }).data?.error;
      if (typeof slackError === "string" && !SERVER_ERRORS.has(slackError)) {
        return { outcome: "refused", reason: slackError };
      }
    }
    return { outcome: "unknown" };
  }

  private chartPng(message: OutgoingMessage): Buffer | null {
    if (!message.chart) return null;
    try {
      return this.renderChart(message.chart.svg);
    } catch (error) {
      this.logger.warn({ error: errorCode(error) }, "chart image failed; posting text bars only");
      return null;
    }
  }

  async postToChannel(
    channel: string,
    message: OutgoingMessage,
    options: PostOptions = {},
  ): Promise<{ messageId: string }> {
    const ref = slackChannel(channel);
    const png = this.chartPng(message);
    const chartLine = message.chart
      ? png !== null
        ? CHART_IN_THREAD_TEXT
        : CHART_MISSING_TEXT
      : undefined;
    const result = await this.options.queue.run(
      channel,
      () =>
        this.options.chat.postMessage({
          channel: ref.channel,
          text: message.text,
          blocks: renderBlockKit(message.blocks, chartLine === undefined ? {} : { chartLine }),
          unfurl_links: false,
          unfurl_media: false,
          ...(options.marker === undefined
            ? {}
            : {
                metadata: { event_type: POST_EVENT_TYPE, event_payload: { claim: options.marker } },
              }),
        }),
      options.startWithinMs === undefined ? {} : { startWithinMs: options.startWithinMs },
    );
    if (result.ok !== true || typeof result.ts !== "string") {
      throw new Error("chat.postMessage answered without a message ts");
    }
    const ts = result.ts;
    if (png !== null && message.chart) {
      const shared = await uploadChartToThread({
        queue: this.options.queue,
        upload: this.options.upload,
        logger: this.logger,
        channel,
        slackChannel: ref.channel,
        threadTs: ts,
        png,
        alt: message.chart.alt,
      });
      if (!shared) await this.sayChartMissing(channel, ref.channel, ts, message);
    }
    return { messageId: ts };
  }

  /** Replaces the digest's "in the thread" line; a failure is logged, the digest stays posted. */
  private async sayChartMissing(
    channel: string,
    slackChannelId: string,
    ts: string,
    message: OutgoingMessage,
  ): Promise<void> {
    try {
      await this.options.queue.run(channel, () =>
        this.options.chat.update({
          channel: slackChannelId,
          ts,
          text: message.text,
          blocks: renderBlockKit(message.blocks, { chartLine: CHART_MISSING_TEXT }),
        }),
      );
    } catch (error) {
      this.logger.warn(
        { channel, error: errorCode(error) },
        "could not mark the digest's chart as missing",
      );
    }
  }

  async postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void> {
    const ref = slackChannel(channel);
    await this.options.queue.run(channel, () =>
      this.options.chat.postEphemeral({
        channel: ref.channel,
        user: member,
        text: message.text,
        blocks: renderBlockKit(message.blocks),
      }),
    );
  }

  async displayName(member: string): Promise<string | null> {
    if (!isSlackId(member)) return null;
    return (await this.options.directory.info(member)).displayName;
  }
}

/** Seconds of a rate-limited Web API call's `Retry-After`, else null. */
function retryAfterSeconds(error: unknown): number | null {
  const { code, retryAfter } = (error ?? {}) as { code?: unknown; retryAfter?: unknown };
  if (code !== webApi.ErrorCode.RateLimitedError) return null;
  return typeof retryAfter === "number" && retryAfter >= 0 ? retryAfter : 1;
}

/**
 * The ts of the bot's post carrying `marker` in the channel's history since `since`, or null;
 * reads at most `HISTORY_PAGES` pages, newest first. Throws when Slack does not answer `ok`.
 */
async function findInHistory(
  history: (args: Record<string, unknown>) => Promise<SlackHistoryPage>,
  channel: string,
  marker: string,
  since: number,
): Promise<string | null> {
  const ref = slackChannel(channel);
  let cursor: string | undefined;
  for (let page = 0; page < HISTORY_PAGES; page++) {
    const answer = await history({
      channel: ref.channel,
      oldest: (Math.max(0, since) / 1000).toFixed(6),
      include_all_metadata: true,
      limit: 200,
      ...(cursor === undefined ? {} : { cursor }),
    });
    if (answer.ok !== true) throw new Error("conversations.history did not answer ok");
    for (const m of answer.messages ?? []) {
      const payload = m.metadata?.event_payload as { claim?: unknown } | undefined;
      if (
        m.metadata?.event_type === POST_EVENT_TYPE &&
        payload?.claim === marker &&
        typeof m.ts === "string"
      ) {
        return m.ts;
      }
    }
    cursor = answer.response_metadata?.next_cursor;
    if (answer.has_more !== true || cursor === undefined || cursor === "") return null;
  }
  throw new Error(`the post was not within ${HISTORY_PAGES} pages of history`);
}
