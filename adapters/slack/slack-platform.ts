/**
 * @module slack-platform
 * The `ChatPlatform` for Slack: channel posts with `chat.postMessage` and private answers with
 * `chat.postEphemeral` in the channel, both as Block Kit with the plain text as fallback and both
 * through the per-channel send queue; display names from the member directory. A post resolves
 * only once Slack answered `ok` with the message's ts, else it throws (the scheduler's claim then
 * records a miss instead of posting twice). A message's chart is rendered to PNG before the post
 * and shared in the post's thread afterwards (see chart-upload); a chart that cannot be rendered or
 * uploaded never stops the post, which then says the chart is missing.
 */
import type { ChatPlatform, OutgoingMessage } from "../../src/ports/chat-platform.js";
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

export interface SlackPlatformOptions {
  readonly chat: SlackChatApi;
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

  constructor(private readonly options: SlackPlatformOptions) {
    this.logger = options.logger ?? silentLogger;
    this.renderChart = options.renderChart ?? ((svg) => svgToPng(svg, { logger: this.logger }));
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

  async postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }> {
    const ref = slackChannel(channel);
    const png = this.chartPng(message);
    const chartLine = message.chart
      ? png !== null
        ? CHART_IN_THREAD_TEXT
        : CHART_MISSING_TEXT
      : undefined;
    const result = await this.options.queue.run(channel, () =>
      this.options.chat.postMessage({
        channel: ref.channel,
        text: message.text,
        blocks: renderBlockKit(message.blocks, chartLine === undefined ? {} : { chartLine }),
        unfurl_links: false,
        unfurl_media: false,
      }),
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
