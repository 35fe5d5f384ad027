/**
 * @module local-platform
 * The console's `ChatPlatform`: every post and private answer is printed as plain text, marked
 * with who would see it, so a facilitator can read exactly what the bot would say.
 */
import type { ChatPlatform, OutgoingMessage } from "../../src/ports/chat-platform.js";

export interface LocalPost {
  readonly channel: string;
  /** null for a channel post, else the member who alone sees it. */
  readonly privateTo: string | null;
  readonly text: string;
}

export class LocalPlatform implements ChatPlatform {
  readonly name = "console";
  readonly posts: LocalPost[] = [];
  private counter = 0;

  constructor(private readonly print: (text: string) => void) {}

  async postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }> {
    this.record({ channel, privateTo: null, text: message.text });
    this.counter++;
    return { messageId: `console-post-${this.counter}` };
  }

  async postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void> {
    this.record({ channel, privateTo: member, text: message.text });
  }

  async displayName(member: string): Promise<string | null> {
    return member;
  }

  /** Prints a command answer the way the platform would show it. */
  show(channel: string, privateTo: string | null, message: OutgoingMessage): void {
    this.record({ channel, privateTo, text: message.text });
  }

  private record(post: LocalPost): void {
    this.posts.push(post);
    const who =
      post.privateTo === null
        ? `plumbline posted in #${post.channel}`
        : `plumbline, only ${post.privateTo} sees this`;
    const body = post.text
      .trimEnd()
      .split("\n")
      .map((line) => `│ ${line}`.trimEnd());
    this.print(`┌─ ${who}\n${body.join("\n")}\n└─\n`);
  }
}
