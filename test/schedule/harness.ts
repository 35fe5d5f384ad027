/**
 * Test helpers for the scheduler: a recording chat platform, settings per channel, and a
 * scheduler wired to them with a manual clock.
 */
import {
  type ChannelSettings,
  DEFAULT_CHANNEL_SETTINGS,
} from "../../src/domain/channel-settings.js";
import type {
  ChatPlatform,
  OutgoingMessage,
  PostFailure,
  PostOptions,
} from "../../src/ports/chat-platform.js";
import type { ManualClock } from "../../src/ports/clock.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import { Scheduler } from "../../src/schedule/scheduler.js";
import type { SchedulerDeps } from "../../src/schedule/scheduler-deps.js";

export const HOUR = 3_600_000;
export const MINUTE = 60_000;

export interface RecordedPost {
  readonly channel: string;
  readonly text: string;
  readonly at: number;
  readonly messageId: string;
  readonly marker?: string;
}

/** An error whose meaning the recording platform reports through `describeFailure`. */
export function failure(meaning: PostFailure, message = "platform failure"): Error {
  return Object.assign(new Error(message), { meaning });
}

/** Records every post with the clock's time; `hang` makes posts never finish (a dying replica). */
export class RecordingPlatform implements ChatPlatform {
  readonly name = "recording";
  readonly posts: RecordedPost[] = [];
  hang = false;
  /** Errors thrown by the next posts, one per post (nothing recorded). */
  failures: unknown[] = [];
  /** Resolves each time a post starts. */
  onPost: (() => void) | null = null;
  private next = 0;

  constructor(
    private readonly clock: ManualClock,
    private readonly prefix: string,
  ) {}

  /** Set by a test to give the platform a post lookup (as Slack has). */
  findPost?: (channel: string, marker: string, since: number) => Promise<string | null>;

  async postToChannel(
    channel: string,
    message: OutgoingMessage,
    options: PostOptions = {},
  ): Promise<{ messageId: string }> {
    this.onPost?.();
    if (this.hang) return new Promise(() => {});
    if (this.failures.length > 0) throw this.failures.shift();
    this.next++;
    const messageId = `${this.prefix}-${this.next}`;
    this.posts.push({
      channel,
      text: message.text,
      at: this.clock.now(),
      messageId,
      ...(options.marker === undefined ? {} : { marker: options.marker }),
    });
    return { messageId };
  }

  /** The meaning attached by `failure(...)`; any other error is "unknown". */
  describeFailure(_channel: string, error: unknown): PostFailure {
    return (error as { meaning?: PostFailure }).meaning ?? { outcome: "unknown" };
  }

  async postPrivately(): Promise<void> {}

  async displayName(): Promise<string | null> {
    return null;
  }
}

export function message(text: string): OutgoingMessage {
  return { blocks: [{ kind: "heading", text }], text };
}

export function settingsMap(
  entries: Record<string, Partial<ChannelSettings>>,
): (channel: string) => Promise<ChannelSettings> {
  return async (channel) => ({ ...DEFAULT_CHANNEL_SETTINGS, ...(entries[channel] ?? {}) });
}

export function makeScheduler(
  overrides: Partial<SchedulerDeps> & { store: Store; clock: ManualClock; replicaId?: string },
): { scheduler: Scheduler; platform: RecordingPlatform; logger: MemoryLogger } {
  const platform =
    (overrides.platform as RecordingPlatform | undefined) ??
    new RecordingPlatform(overrides.clock, overrides.replicaId ?? "r1");
  const logger = (overrides.logger as MemoryLogger | undefined) ?? new MemoryLogger();
  const scheduler = new Scheduler({
    replicaId: "r1",
    readSettings: settingsMap({}),
    composeDigest: async (channel, slotAt) =>
      message(`digest ${channel} ${new Date(slotAt).toISOString()}`),
    composeNote: async () => null,
    ...overrides,
    platform,
    logger,
  });
  return { scheduler, platform, logger };
}

/** Ticks every `stepMs` from the clock's time until `until` (inclusive). */
export async function runUntil(
  clock: ManualClock,
  until: number,
  stepMs: number,
  tick: () => Promise<unknown>,
): Promise<void> {
  while (clock.now() <= until) {
    await tick();
    clock.advance(stepMs);
  }
}
