/**
 * @module member-directory
 * Who a Slack member is, from `users.info`, cached briefly: whether they are a workspace admin or
 * owner (they may act as facilitators) and their display name (shown only for `named` members).
 * Concurrent look-ups of one member share a request; a failed look-up is not cached and answers
 * "unknown" (not an admin, no name).
 */
import type { Logger } from "../../src/ports/logger.js";
import { isRecord } from "./map-message.js";

export interface MemberInfo {
  readonly isAdmin: boolean;
  readonly displayName: string | null;
}

export interface MemberDirectoryOptions {
  /** Calls `users.info` for one user id and returns its result. */
  readonly lookup: (user: string) => Promise<unknown>;
  readonly now: () => number;
  /** How long an answer is kept; default 10 minutes. */
  readonly ttlMs?: number;
  /** Most members kept; default 5000 (oldest dropped first). */
  readonly maxEntries?: number;
  readonly logger: Logger;
  /** Names an error for the log (never its payload). */
  readonly describeError: (error: unknown) => string;
}

const UNKNOWN: MemberInfo = Object.freeze({ isAdmin: false, displayName: null });

function text(value: unknown): string | null {
  return typeof value === "string" && value.trim() !== "" ? value.trim() : null;
}

/** Reads the fields plumbline needs from a `users.info` result. */
export function memberInfoOf(result: unknown): MemberInfo {
  if (!isRecord(result) || !isRecord(result.user)) return UNKNOWN;
  const user = result.user;
  const profile = isRecord(user.profile) ? user.profile : {};
  return {
    isAdmin: user.is_admin === true || user.is_owner === true || user.is_primary_owner === true,
    displayName:
      text(profile.display_name) ??
      text(profile.real_name) ??
      text(user.real_name) ??
      text(user.name),
  };
}

export class MemberDirectory {
  private readonly cache = new Map<string, { at: number; info: Promise<MemberInfo> }>();
  private readonly ttlMs: number;
  private readonly maxEntries: number;

  constructor(private readonly options: MemberDirectoryOptions) {
    this.ttlMs = options.ttlMs ?? 10 * 60_000;
    this.maxEntries = options.maxEntries ?? 5000;
  }

  info(user: string): Promise<MemberInfo> {
    const now = this.options.now();
    const hit = this.cache.get(user);
    if (hit && now - hit.at < this.ttlMs) return hit.info;
    const info = this.options.lookup(user).then(memberInfoOf, (error: unknown) => {
      this.cache.delete(user);
      this.options.logger.warn(
        { error: this.options.describeError(error) },
        "slack users.info failed; member treated as unknown",
      );
      return UNKNOWN;
    });
    this.cache.delete(user);
    this.cache.set(user, { at: now, info });
    if (this.cache.size > this.maxEntries) {
      const oldest = this.cache.keys().next().value;
      if (oldest !== undefined) this.cache.delete(oldest);
    }
    return info;
  }
}
