/**
 * @module rate-limited-log
 * One log line per event, at most `limit` lines per window: the rest are counted and the count
 * rides on the next line written (`suppressed`). For refusals of unauthenticated requests, which
 * anyone can send by the thousand; time is injected.
 */
import type { LogFields, Logger } from "../src/ports/logger.js";

export interface RateLimitedLogOptions {
  readonly logger: Logger;
  readonly now: () => number;
  /** Lines per window; default 10. */
  readonly limit?: number;
  /** Window length in ms; default 60,000. */
  readonly windowMs?: number;
}

export type RateLimitedLog = (
  level: "info" | "warn" | "error",
  fields: LogFields,
  message: string,
) => void;

/** A logging function that writes at most `limit` lines per window (see the module header). */
export function rateLimitedLog(options: RateLimitedLogOptions): RateLimitedLog {
  const limit = options.limit ?? 10;
  const windowMs = options.windowMs ?? 60_000;
  let windowStart = Number.NEGATIVE_INFINITY;
  let written = 0;
  let suppressed = 0;
  return (level, fields, message) => {
    const now = options.now();
    if (now - windowStart >= windowMs) {
      windowStart = now;
      written = 0;
    }
    if (written >= limit) {
      suppressed += 1;
      return;
    }
    written += 1;
    const extra = suppressed > 0 ? { suppressed } : {};
    suppressed = 0;
    options.logger[level]({ ...fields, ...extra }, message);
  };
}
