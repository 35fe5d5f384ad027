/**
 * @module send-queue
 * Paces and retries sends per Teams conversation. Sends to one conversation run one at a time and
 * within every one of Microsoft's published per-bot, per-conversation limits for sending a message
 * (MicrosoftDocs/msteams-docs, msteams-platform/bots/how-to/rate-limit.md, "Per bot per thread
 * limit": 7 per 1 s, 8 per 2 s, 60 per 30 s, 1,800 per 3,600 s), the 1-second one kept one lower (`perSecond`, default 6). A send that
 * Teams certainly refused — HTTP 429 or 412 (throttled) or a refused connection — is tried again
 * after an exponential delay with jitter ("equal jitter", M. Brooker, 2015, "Exponential Backoff
 * And Jitter", AWS Architecture Blog), never shorter than a `Retry-After` header. A 502 or 504
 * comes from a gateway that may already have passed the post on: its outcome is unknown, so it is
 * thrown at once (the caller records a miss, as for Slack) and only the conversation's next send
 * waits out the back-off. Any other failure, including a timeout or a reset connection, is thrown
 * at once: a post is never resent when it may have arrived. Time and sleep are injected, so tests
 * never wait.
 */

/** Microsoft's per-conversation send limits: [window ms, sends] (see the module comment). */
export const TEAMS_SEND_LIMITS: readonly (readonly [number, number])[] = Object.freeze([
  [1000, 7],
  [2000, 8],
  [30_000, 60],
  [3_600_000, 1800],
]);

export interface SendQueueOptions {
  /** Sends per rolling second per conversation; default 6 (under Teams' 7). */
  readonly perSecond?: number;
  /** Every rolling window [ms, sends] to keep within; default `TEAMS_SEND_LIMITS`. */
  readonly limits?: readonly (readonly [number, number])[];
  /** Attempts per send including the first; default 5. */
  readonly maxAttempts?: number;
  readonly baseDelayMs?: number;
  readonly maxDelayMs?: number;
  readonly now: () => number;
  readonly sleep: (ms: number) => Promise<void>;
  /** Uniform in [0, 1); default Math.random. */
  readonly random?: () => number;
}

const RETRY_STATUSES = new Set([412, 429]);
/** Gateway failures: the post may have arrived, so never resent; later sends back off. */
const BACK_OFF_STATUSES = new Set([502, 504]);
const RETRY_CODES = new Set(["ECONNREFUSED"]);

function field(value: unknown, key: string): unknown {
  return typeof value === "object" && value !== null
    ? (value as Record<string, unknown>)[key]
    : undefined;
}

/** The HTTP status of a failed send (the SDK's RestError carries `statusCode`), if any. */
export function statusOf(error: unknown): number | null {
  const direct = field(error, "statusCode");
  if (typeof direct === "number") return direct;
  const status = field(field(error, "response"), "status");
  return typeof status === "number" ? status : null;
}

/** `Retry-After` of a failed send in ms (seconds or an HTTP date), or null. */
export function retryAfterMs(error: unknown, now: number): number | null {
  const headers = field(field(error, "response"), "headers");
  const get = field(headers, "get");
  const raw =
    typeof get === "function"
      ? (get as (name: string) => unknown).call(headers, "retry-after")
      : field(headers, "retry-after");
  if (typeof raw !== "string" || raw.trim() === "") return null;
  const seconds = Number(raw);
  if (Number.isFinite(seconds)) return Math.max(0, seconds * 1000);
  const date = Date.parse(raw);
  return Number.isFinite(date) ? Math.max(0, date - now) : null;
}

/** True when Teams certainly did not accept the send and asked for a later try. */
export function isRetryable(error: unknown): boolean {
  const status = statusOf(error);
  if (status !== null) return RETRY_STATUSES.has(status);
  const code = field(error, "code");
  return typeof code === "string" && RETRY_CODES.has(code);
}

export class SendQueue {
  private readonly tails = new Map<string, Promise<unknown>>();
  private readonly recent = new Map<string, number[]>();
  /** Per conversation: no send before this time (ms), after a gateway failure. */
  private readonly coolUntil = new Map<string, number>();
  private limits: readonly (readonly [number, number])[];
  private readonly longestWindow: number;
  private readonly maxAttempts: number;
  private readonly baseDelayMs: number;
  private readonly maxDelayMs: number;
  private readonly random: () => number;

  constructor(private readonly options: SendQueueOptions) {
    const perSecond = options.perSecond ?? 6;
    this.limits = (options.limits ?? TEAMS_SEND_LIMITS).map(([ms, n]) =>
      ms === 1000 ? ([ms, Math.min(n, perSecond)] as const) : ([ms, n] as const),
    );
    if (!this.limits.some(([ms]) => ms === 1000)) this.limits = [[1000, perSecond], ...this.limits];
    this.longestWindow = Math.max(...this.limits.map(([ms]) => ms));
    this.maxAttempts = options.maxAttempts ?? 5;
    this.baseDelayMs = options.baseDelayMs ?? 1000;
    this.maxDelayMs = options.maxDelayMs ?? 32_000;
    this.random = options.random ?? Math.random;
  }

  /** Runs `attempt` for conversation `key` after earlier sends there, paced and retried. */
  send<T>(key: string, attempt: () => Promise<T>): Promise<T> {
    const previous = this.tails.get(key) ?? Promise.resolve();
    const run = previous.catch(() => undefined).then(() => this.withRetries(key, attempt));
    const tail = run.catch(() => undefined);
    this.tails.set(key, tail);
    void tail.then(() => {
      if (this.tails.get(key) === tail) this.tails.delete(key);
    });
    return run;
  }

  /** The delay before retry number `retry` (1-based): half fixed, half jitter, capped. */
  backoffMs(retry: number): number {
    const ceiling = Math.min(this.maxDelayMs, this.baseDelayMs * 2 ** (retry - 1));
    return ceiling / 2 + this.random() * (ceiling / 2);
  }

  private async withRetries<T>(key: string, attempt: () => Promise<T>): Promise<T> {
    for (let tries = 1; ; tries++) {
      await this.pace(key);
      try {
        return await attempt();
      } catch (error) {
        const status = statusOf(error);
        if (status !== null && BACK_OFF_STATUSES.has(status)) {
          const wait = Math.max(this.backoffMs(1), retryAfterMs(error, this.options.now()) ?? 0);
          this.coolUntil.set(key, this.options.now() + wait);
        }
        if (!isRetryable(error) || tries >= this.maxAttempts) throw error;
        const wait = Math.max(this.backoffMs(tries), retryAfterMs(error, this.options.now()) ?? 0);
        await this.options.sleep(wait);
      }
    }
  }

  private async pace(key: string): Promise<void> {
    const until = this.coolUntil.get(key);
    if (until !== undefined) {
      this.coolUntil.delete(key);
      const now = this.options.now();
      if (until > now) await this.options.sleep(until - now);
    }
    const sent = this.recent.get(key) ?? [];
    for (;;) {
      const now = this.options.now();
      while (sent.length > 0 && sent[0] <= now - this.longestWindow) sent.shift();
      // The earliest time every window has room again: in a window of `ms` holding `n` sends or
      // more, the send n places back from the newest must have left it.
      let until = now;
      for (const [ms, n] of this.limits) {
        if (sent.length >= n) until = Math.max(until, sent[sent.length - n] + ms);
      }
      if (until <= now) {
        sent.push(now);
        this.recent.set(key, sent);
        return;
      }
      await this.options.sleep(until - now);
    }
  }
}
