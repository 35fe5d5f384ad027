/**
 * @module slack-platform
 * The `ChatPlatform` for Slack: channel posts with `chat.postMessage` and private answers with
 * `chat.postEphemeral` in the channel, both as Block Kit with the plain text as fallback and both
 * through the per-channel send queue; display names from the member directory. A post resolves
 * only once Slack answered `ok` with the message's ts, else it throws (the scheduler's claim then
 * records a miss instead of posting twice).
 */
import type { ChatPlatform, OutgoingMessage } from "../../src/ports/chat-platform.js";
import { isSlackId, parseCoreChannelId, type SlackChannelRef } from "./channel-ids.js";
import type { MemberDirectory } from "./member-directory.js";
import { renderBlockKit } from "./render-block-kit.js";
import type { SendQueue } from "./send-queue.js";

/** The two Web API methods used to post, as `WebClient.chat` offers them. */
export interface SlackChatApi {
  postMessage(args: Record<string, unknown>): Promise<{ ok?: boolean; ts?: string }>;
  postEphemeral(args: Record<string, unknown>): Promise<{ ok?: boolean }>;
}

export interface SlackPlatformOptions {
  readonly chat: SlackChatApi;
  readonly queue: SendQueue;
  readonly directory: MemberDirectory;
}

function slackChannel(channel: string): SlackChannelRef {
  const ref = parseCoreChannelId(channel);
  if (ref === null) throw new Error(`not a Slack channel id: ${channel}`);
  return ref;
}

export class SlackPlatform implements ChatPlatform {
  readonly name = "slack";

  constructor(private readonly options: SlackPlatformOptions) {}

  async postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }> {
    const ref = slackChannel(channel);
    const result = await this.options.queue.run(channel, () =>
      this.options.chat.postMessage({
        channel: ref.channel,
        text: message.text,
        blocks: renderBlockKit(message.blocks),
        unfurl_links: false,
        unfurl_media: false,
      }),
    );
    if (result.ok !== true || typeof result.ts !== "string") {
      throw new Error("chat.postMessage answered without a message ts");
    }
    return { messageId: result.ts };
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
