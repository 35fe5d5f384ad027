/**
 * @module routing-platform
 * One `ChatPlatform` over several adapters: a post goes to the adapter whose channel prefix the
 * core channel id carries. An id no adapter owns is a programming error and throws.
 */
import type { ChatPlatform, OutgoingMessage } from "../src/ports/chat-platform.js";

export class RoutingPlatform implements ChatPlatform {
  readonly name = "routing";

  constructor(private readonly routes: readonly { prefix: string; platform: ChatPlatform }[]) {}

  private pick(channel: string): ChatPlatform {
    const route = this.routes.find((r) => channel.startsWith(r.prefix));
    if (!route) throw new Error(`no platform adapter owns channel ${channel}`);
    return route.platform;
  }

  postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }> {
    return this.pick(channel).postToChannel(channel, message);
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
