/**
 * @module platform-adapter
 * What `plumbline serve` needs from a chat platform's adapter: the `ChatPlatform` the bot posts
 * through, the HTTP routes it serves on the shared server, and start/stop. Each adapter owns the
 * core channel ids that start with its prefix ("slack:", "teams:"), so one bot can serve both
 * platforms and the scheduler's posts reach the right one.
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { ChatPlatform } from "../src/ports/chat-platform.js";
import type { Bot } from "./create-bot.js";

export interface HttpRoute {
  /** Exact path, e.g. "/slack/events". */
  readonly path: string;
  handle(request: IncomingMessage, response: ServerResponse): Promise<void>;
}

export interface PlatformAdapter {
  readonly name: string;
  /** Core channel ids of this platform start with this prefix. */
  readonly channelPrefix: string;
  readonly platform: ChatPlatform;
  /** Routes on the shared HTTP server (none for a socket connection). */
  readonly routes: readonly HttpRoute[];
  /** Called once the bot exists; connects sockets or readies listeners. */
  start(bot: Bot): Promise<void>;
  stop(): Promise<void>;
}
