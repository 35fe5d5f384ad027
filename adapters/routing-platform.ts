/**
 * @module routing-platform
 * One `ChatPlatform` over several adapters: a post goes to the adapter whose channel prefix the
 * core channel id carries. An id no adapter owns is a programming error and throws. Failures are
 * described, and posts looked up, by the channel's own adapter; one that cannot look up posts
 * (Teams) throws, so the scheduler records such an unknown outcome as a miss.
 */
import type {
  ChatPlatform,
  OutgoingMessage,
  PostFailure,
  PostOptions,
} from "../src/ports/chat-platform.js";

export class RoutingPlatform implements ChatPlatform {
  readonly name = "routing";

  constructor(private readonly routes: readonly { prefix: string; platform: ChatPlatform }[]) {}

  private pick(channel: string): ChatPlatform {
    const route = this.routes.find((r) => channel.startsWith(r.prefix));
    if (!route) throw new Error(`no platform adapter owns channel ${channel}`);
    return route.platform;
  }

  postToChannel(
    channel: string,
    message: OutgoingMessage,
    options?: PostOptions,
  ): Promise<{ messageId: string }> {
    return this.pick(channel).postToChannel(channel, message, options);
  }

  describeFailure(channel: string, error: unknown): PostFailure {
    return this.pick(channel).describeFailure?.(channel, error) ?? { outcome: "unknown" };
  }

  async findPost(channel: string, marker: string, since: number): Promise<string | null> {
    const platform = this.pick(channel);
    if (platform.findPost === undefined) {
      throw new Error(`${platform.name} cannot look up a channel's posts`);
    }
    return platform.findPost(channel, marker, since);
  }

  postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void> {
    return this.pick(channel).postPrivately(channel, member, message);
  }

  async displayName(member: string): Promise<string | null> {
    for (const { platform } of this.routes) {
      const name = await platform.displayName(member);
      if (name !== null) return name;
    }
    return null;
  }
}
