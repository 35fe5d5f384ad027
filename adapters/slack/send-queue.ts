/**
 * @module send-queue
 * Paces posts per channel (Slack allows about one `chat.postMessage` per second per channel,
 * docs.slack.dev/apis/web-api/rate-limits): sends for one channel run one after another, at least
 * `minIntervalMs` apart. A 429 means Slack did not take the call, so the send waits the
 * `Retry-After` seconds and is tried again (a few times at most). Any other failure, including a
 * network error or a 5xx after the request went out, is rethrown untouched: the post may have
 * arrived, and the platform has no idempotency key, so it is never retried here. A send given
 * `startWithinMs` that would have to wait longer than that is not made: it fails at once with
 * `SendNotStartedError` (the scheduler then opens its claim again instead of posting after its
 * lease ended).
 */
import { SendNotStartedError } from "../../src/ports/chat-platform.js";
import type { Logger } from "../../src/ports/logger.js";

export interface SendQueueOptions {
  /** Least time between two sends in one channel; default 1000 ms. */
  readonly minIntervalMs?: number;
  /** Epoch ms. */
  readonly now: () => number;
  /** Waits; injected so tests never sleep. */
  readonly sleep: (ms: number) => Promise<void>;
  /** Seconds to wait when the error is a rate limit, else null. */
  readonly retryAfterOf: (error: unknown) => number | null;
  /** Rate-limit waits per send before giving up; default 3. */
  readonly maxRateLimitWaits?: number;
  readonly logger: Logger;
}

export class SendQueue {
  private readonly tails = new Map<string, Promise<unknown>>();
  private readonly nextAt = new Map<string, number>();
  private readonly minIntervalMs: number;
  private readonly maxWaits: number;

  constructor(private readonly options: SendQueueOptions) {
    this.minIntervalMs = options.minIntervalMs ?? 1000;
    this.maxWaits = options.maxRateLimitWaits ?? 3;
  }

  /**
   * Runs `send` in the channel's turn; resolves or rejects with its outcome. With
   * `startWithinMs`, a send that cannot start within that time of this call is not made.
   */
  run<T>(
    channel: string,
    send: () => Promise<T>,
    options: { startWithinMs?: number } = {},
  ): Promise<T> {
    const previous = this.tails.get(channel) ?? Promise.resolve();
    const calledAt = this.options.now();
    const deadline =
      options.startWithinMs === undefined
        ? Number.POSITIVE_INFINITY
        : calledAt + options.startWithinMs;
    const go = () => this.attempt(channel, send, calledAt, deadline);
    const task = previous.then(go, go);
    this.tails.set(channel, task);
    const forget = () => {
      if (this.tails.get(channel) === task) this.tails.delete(channel);
    };
    task.then(forget, forget);
    return task;
  }

  private async attempt<T>(
    channel: string,
    send: () => Promise<T>,
    calledAt: number,
    deadline: number,
  ): Promise<T> {
    for (let waits = 0; ; waits++) {
      const now = this.options.now();
      const wait = (this.nextAt.get(channel) ?? 0) - now;
      if (now + Math.max(0, wait) > deadline) throw new SendNotStartedError(now - calledAt);
      if (wait > 0) await this.options.sleep(wait);
      try {
        return await send();
      } catch (error) {
        const retryAfter = this.options.retryAfterOf(error);
        if (retryAfter === null || waits >= this.maxWaits) throw error;
        const delayMs = Math.max(retryAfter * 1000, this.minIntervalMs);
        this.options.logger.warn(
          { channel, retryAfterSeconds: retryAfter },
          "slack rate limit; waiting",
        );
        this.nextAt.set(channel, this.options.now() + delayMs);
      } finally {
        const earliest = this.options.now() + this.minIntervalMs;
        if ((this.nextAt.get(channel) ?? 0) < earliest) this.nextAt.set(channel, earliest);
      }
    }
  }
}
