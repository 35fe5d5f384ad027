/**
 * @module scheduler
 * Decides when digests and balance notes are posted and which replica posts them (DESIGN.md §8).
 * Each pass (`tick`) walks the registered channels in an order of its own (channels sorted by a
 * hash of replica id and channel), so replicas sharing one database start on different channels
 * and split a burst of due digests between them instead of queueing on the same claims. A digest
 * slot (the channel's weekday and time in its own zone) that has come round is claimed through the
 * store's claim row, keyed (channel, "digest", local slot date-time), in two phases: "claimed"
 * while composing (nothing sent; a replica that dies here is taken over by another once its lease
 * ends) and "posting" from just before the platform call. A "posting" claim left unfinished past
 * its lease is logged as a miss ("outcome unknown") and never posted again, because the first post
 * may have reached the channel (the platforms offer no idempotency key). A slot found 24 hours or
 * more late is recorded as missed, not posted. A failed platform call is sorted by what the platform
 * says it means (`describeFailure`): not sent (rate limited) opens the claim again at the
 * platform's retry time; refused records a miss with the platform's reason; unknown (timeout,
 * 5xx) is looked up on the platform once the lease ends, by the marker the post carried
 * (`findPost`, Slack), and recorded as posted or opened again — or, where the platform cannot
 * look (Teams), recorded as missed "outcome unknown". Notes are evaluated once per UTC hour and
 * claimed per hour the same way. Posts due at a time of their own (a format trial's week switches
 * and its result, `duePosts`) are claimed under kind "trial" the same two-phase way, so each is
 * posted once across replicas and restarts. Time comes from the injected clock; only `start` uses
 * real timers.
 */
import { createHash } from "node:crypto";
import type { ChannelSettings } from "../domain/channel-settings.js";
import { isPlumblineError, PlumblineError } from "../domain/errors.js";
import type { OutgoingMessage, PostFailure } from "../ports/chat-platform.js";
import type { ClaimKey, MissReason, PostClaim } from "../ports/store.js";
import { digestSlotsBetween } from "./digest-slots.js";
import {
  DEFAULT_LEASE_MS,
  DEFAULT_LOOKBACK_MS,
  type DuePost,
  FACILITATORS_DELIVERY,
  LATE_LIMIT_MS,
  LOOK_BACK_MS,
  NOTHING_POSTED,
  type SchedulerDeps,
} from "./scheduler-deps.js";
import { digestPeriod, HOUR_MS, hourStart, notePeriod } from "./slot-period.js";
import type { MissedEntry, PostKind, SkipReason, SlotRef, TickReport } from "./tick-report.js";

/** Most channels one pass works on at once. */
export const MAX_JOBS = 64;

export class Scheduler {
  private readonly deps: SchedulerDeps;
  private readonly leaseMs: number;
  private readonly lookbackMs: number;
  private readonly jobs: number;
  /** Per channel, the UTC hour whose note this replica has evaluated. */
  private readonly noteHours = new Map<string, number>();
  private timer: ReturnType<typeof setInterval> | null = null;
  /** When this replica last looked for expired digest claims to take over. */
  private lastSweep = Number.NEGATIVE_INFINITY;
  private running: Promise<void> | null = null;

  constructor(deps: SchedulerDeps) {
    const leaseMs = deps.leaseMs ?? DEFAULT_LEASE_MS;
    const lookbackMs = deps.lookbackMs ?? DEFAULT_LOOKBACK_MS;
    const jobs = deps.jobs ?? 1;
    if (!(leaseMs > 0) || !(lookbackMs >= LATE_LIMIT_MS)) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `scheduler leaseMs must be > 0 and lookbackMs ≥ ${LATE_LIMIT_MS} (got ${leaseMs}, ${lookbackMs})`,
        { hint: "leave leaseMs and lookbackMs unset to use the defaults" },
      );
    }
    if (!(Number.isInteger(jobs) && jobs >= 1 && jobs <= MAX_JOBS)) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `scheduler jobs must be a whole number from 1 to ${MAX_JOBS} (got ${jobs})`,
        { hint: "leave jobs unset for one channel at a time, or use the worker pool's size" },
      );
    }
    this.deps = deps;
    this.leaseMs = leaseMs;
    this.lookbackMs = lookbackMs;
    this.jobs = jobs;
  }

  /** One pass over every channel: post what is due, record what was missed. */
  async tick(): Promise<TickReport> {
    const at = this.deps.clock.now();
    const report: TickReport = {
      at,
      posted: [],
      skipped: [],
      missed: [],
      failed: [],
      retrying: [],
      settled: [],
    };
    const channels = this.walkOrder((await this.deps.store.listChannels()).map((c) => c.channel));
    // `jobs` lanes take the next channel of the walk as each finishes its last. Every lane runs to
    // its end before the pass goes on, even when one fails, so passes never overlap.
    let next = 0;
    const lane = async () => {
      while (next < channels.length) await this.runChannel(channels[next++], at, report);
    };
    const lanes = await Promise.allSettled(
      Array.from({ length: Math.min(this.jobs, channels.length) }, lane),
    );
    for (const result of lanes) if (result.status === "rejected") throw result.reason;
    await this.settleUnknown(report);
    await this.takeOver(report);
    const now = this.deps.clock.now();
    // Where the platform can be asked, an unknown outcome gets one more lease to be looked up.
    const unknownBefore = this.deps.platform.findPost === undefined ? now : now - this.leaseMs;
    for (const claim of await this.deps.store.markMissedClaims(
      unknownBefore,
      now - LATE_LIMIT_MS,
    )) {
      this.missed(report, claim, missReasonOf(claim));
    }
    return report;
  }

  /** One channel of a pass: its due digests, due posts and note, with a takeover sweep between. */
  private async runChannel(channel: string, at: number, report: TickReport): Promise<void> {
    let settings: ChannelSettings;
    try {
      settings = await this.deps.readSettings(channel);
    } catch (error) {
      this.fail(report, { channel, kind: "settings", period: null }, error);
      return;
    }
    await this.runDigests(channel, settings, at, report);
    await this.runDuePosts(channel, at, report);
    if (this.deps.clock.now() - this.lastSweep >= this.leaseMs / 4) await this.takeOver(report);
    await this.runNote(channel, settings, at, report);
  }

  /**
   * Takes over digest claims whose holder's lease ended with nothing sent (a dead replica's
   * jobs), between channels of a long pass too, so they are done soon after the lease ends.
   */
  private async takeOver(report: TickReport): Promise<void> {
    const now = this.deps.clock.now();
    this.lastSweep = now;
    const expired = await this.deps.store.expiredClaims(now, "digest");
    for (const channel of new Set(expired.map((c) => c.channel))) {
      let settings: ChannelSettings;
      try {
        settings = await this.deps.readSettings(channel);
      } catch (error) {
        this.fail(report, { channel, kind: "settings", period: null }, error);
        continue;
      }
      await this.runDigests(channel, settings, this.deps.clock.now(), report);
    }
  }

  /** This replica's order over the channels: by SHA-256 of (replica id, channel). */
  private walkOrder(channels: string[]): string[] {
    const rank = (channel: string) =>
      createHash("sha256").update(`${this.deps.replicaId}\u0000${channel}`).digest("hex");
    return channels
      .map((channel) => ({ channel, rank: rank(channel) }))
      .sort((a, b) => (a.rank < b.rank ? -1 : a.rank > b.rank ? 1 : 0))
      .map((c) => c.channel);
  }

  private missed(
    report: TickReport,
    claim: Pick<PostClaim, "channel" | "kind" | "period" | "claimedBy">,
    reason: MissedEntry["reason"],
    detail?: string,
  ): void {
    const entry: MissedEntry = {
      ...pick(claim),
      claimedBy: claim.claimedBy,
      reason,
      ...(detail === undefined ? {} : { detail }),
    };
    report.missed.push(entry);
    this.deps.logger.warn({ ...entry, replica: this.deps.replicaId }, "scheduled post missed");
  }

  /** Runs `tick` now and every `intervalMs` (at most an hour) until `stop`. */
  start(intervalMs: number): void {
    if (!(intervalMs > 0 && intervalMs <= HOUR_MS)) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `scheduler interval ${intervalMs} ms is not in (0, 1 h]`,
        {
          hint: "start the scheduler with an interval such as 60000 (one minute)",
        },
      );
    }
    if (this.timer !== null) return;
    this.timer = setInterval(() => this.runGuarded(), intervalMs);
    this.runGuarded();
  }

  /** Stops the timer and waits for a pass in progress. */
  async stop(): Promise<void> {
    if (this.timer !== null) clearInterval(this.timer);
    this.timer = null;
    await this.running;
  }

  private runGuarded(): void {
    if (this.running !== null) return;
    this.running = this.tick()
      .then(
        () => undefined,
        (error: unknown) =>
          this.deps.logger.error(
            { error: errorName(error), detail: errorDetail(error) },
            "scheduler pass failed",
          ),
      )
      .finally(() => {
        this.running = null;
      });
  }

  private async runDigests(
    channel: string,
    settings: ChannelSettings,
    at: number,
    report: TickReport,
  ): Promise<void> {
    if (settings.digest === "off") return;
    let slots: number[];
    try {
      slots = digestSlotsBetween({
        schedule: settings.digest,
        timezone: settings.timezone,
        from: at - this.lookbackMs,
        to: at,
      });
    } catch (error) {
      this.fail(report, { channel, kind: "digest", period: null }, error);
      return;
    }
    for (const slotAt of slots) {
      const period = digestPeriod(slotAt, settings.timezone);
      await this.runSlot(report, { channel, kind: "digest", period }, at, {
        dueAt: slotAt,
        stale: at - slotAt >= LATE_LIMIT_MS,
        compose: () => this.deps.composeDigest(channel, slotAt),
      });
    }
  }

  /**
   * One due channel post: skipped unless its claim is open (absent, or "claimed" by a holder
   * whose lease has ended); recorded as missed ("too late") when stale; else claimed, composed
   * and delivered, then `onPosted`.
   */
  private async runSlot(
    report: TickReport,
    ref: SlotRef,
    at: number,
    post: {
      readonly dueAt: number;
      readonly stale: boolean;
      readonly compose: () => Promise<OutgoingMessage | null>;
      readonly onPosted?: () => Promise<void>;
    },
  ): Promise<void> {
    try {
      const held = await this.deps.store.getClaim(ref);
      if (held !== null && !(held.status === "claimed" && held.leaseUntil < at)) return;
      if (post.stale) {
        const recorded = await this.deps.store.recordMiss({
          ...ref,
          claimedBy: this.deps.replicaId,
          now: this.deps.clock.now(),
          leaseMs: 0,
          reason: "too late",
        });
        if (recorded) this.missed(report, { ...ref, claimedBy: this.deps.replicaId }, "too-late");
      } else if (await this.claim(ref, this.leaseMs, null)) {
        const posted = await this.deliver(report, ref, post.dueAt, "channel", post.compose);
        if (posted) await post.onPosted?.();
      } else {
        this.skip(report, ref, "claimed-elsewhere");
      }
    } catch (error) {
      this.fail(report, ref, error);
    }
  }

  /** A trial's due posts: each claimed once, stale ones recorded as missed. */
  private async runDuePosts(channel: string, at: number, report: TickReport): Promise<void> {
    if (this.deps.duePosts === undefined) return;
    let posts: readonly DuePost[];
    try {
      posts = await this.deps.duePosts(channel, at);
    } catch (error) {
      this.fail(report, { channel, kind: "trial", period: null }, error);
      return;
    }
    for (const post of posts) {
      await this.runSlot(report, { channel, kind: "trial", period: post.period }, at, {
        dueAt: post.dueAt,
        stale: post.staleAt !== null && at >= post.staleAt,
        compose: post.compose,
        ...(post.onPosted === undefined ? {} : { onPosted: post.onPosted }),
      });
    }
  }

  private async runNote(
    channel: string,
    settings: ChannelSettings,
    at: number,
    report: TickReport,
  ): Promise<void> {
    if (settings.notes === "off") return;
    const hour = hourStart(at);
    if (this.noteHours.get(channel) === hour) return;
    this.noteHours.set(channel, hour);
    const ref: SlotRef = { channel, kind: "note", period: notePeriod(at) };
    try {
      if ((await this.deps.store.getClaim(ref)) !== null) return;
      const note = await this.deps.composeNote(channel, at);
      if (note === null) return;
      if (note.audience === "facilitators" && this.deps.sendToFacilitators === undefined) {
        this.skip(report, ref, "no-facilitator-route");
        return;
      }
      if (!(await this.claim(ref, this.leaseMs, note.member ?? null))) {
        this.skip(report, ref, "claimed-elsewhere");
        return;
      }
      const posted = await this.deliver(report, ref, at, note.audience, async () => note.message);
      if (posted) await note.onPosted?.();
    } catch (error) {
      this.fail(report, ref, error);
    }
  }

  /** Composes and delivers a claimed slot, then completes its claim. True when delivered. */
  private async deliver(
    report: TickReport,
    ref: SlotRef,
    slotAt: number,
    audience: "channel" | "facilitators",
    compose: () => Promise<OutgoingMessage | null>,
  ): Promise<boolean> {
    const message = await compose();
    if (message === null) {
      await this.complete(ref, NOTHING_POSTED);
      this.skip(report, ref, "nothing-to-post");
      return false;
    }
    const holder = { ...ref, claimedBy: this.deps.replicaId };
    const now = this.deps.clock.now();
    if (!(await this.deps.store.beginPost({ ...holder, now, leaseMs: this.leaseMs }))) {
      // Our lease ended while composing and another replica took the slot over: it posts.
      this.deps.logger.warn(
        { ...ref, replica: this.deps.replicaId },
        "claim taken over; not posting",
      );
      this.skip(report, ref, "claimed-elsewhere");
      return false;
    }
    let messageId: string;
    try {
      if (audience === "facilitators" && this.deps.sendToFacilitators !== undefined) {
        await this.deps.sendToFacilitators(ref.channel, message);
        messageId = FACILITATORS_DELIVERY;
      } else {
        messageId = (
          await this.deps.platform.postToChannel(ref.channel, message, {
            marker: postMarker(ref),
            startWithinMs: this.leaseMs / 2,
          })
        ).messageId;
      }
    } catch (error) {
      await this.afterFailedPost(report, holder, audience, error);
      return false;
    }
    if (!(await this.complete(ref, messageId))) {
      this.deps.logger.warn({ ...ref, messageId }, "posted, but the claim was no longer ours");
    }
    report.posted.push({ ...ref, slotAt, audience, messageId });
    this.deps.logger.info({ ...ref, audience, messageId, replica: this.deps.replicaId }, "posted");
    return true;
  }

  /**
   * What a failed platform call leaves: "not sent" (rate limited after the queue's waits, or never
   * started) opens the claim again at the platform's retry time, so any replica's next pass tries
   * it, until the slot is 24 h late; "refused" records the miss with the platform's reason;
   * "unknown" leaves the claim "posting", to be looked up on the platform once its lease ends
   * (`settleUnknown`) or, where the platform cannot look, recorded as missed "outcome unknown".
   */
  private async afterFailedPost(
    report: TickReport,
    holder: SlotRef & { claimedBy: string },
    audience: "channel" | "facilitators",
    error: unknown,
  ): Promise<void> {
    const failure: PostFailure =
      audience === "channel"
        ? (this.deps.platform.describeFailure?.(holder.channel, error) ?? { outcome: "unknown" })
        : { outcome: "unknown" };
    const now = this.deps.clock.now();
    if (failure.outcome === "not-sent") {
      const retryAt = now + (failure.retryAfterMs ?? 0);
      if (await this.deps.store.releasePost({ ...holder, retryAt })) {
        report.retrying.push({ ...pick(holder), retryAt, error: errorName(error) });
        this.deps.logger.warn(
          { ...pick(holder), retryAt, error: errorName(error), replica: this.deps.replicaId },
          "post not taken by the platform; open again for a later pass",
        );
        return;
      }
    } else if (failure.outcome === "refused") {
      const reason: MissReason = `refused: ${failure.reason}`;
      const settled = await this.deps.store.settlePost({
        ...holder,
        now,
        settlement: { status: "missed", reason },
      });
      if (settled) {
        this.missed(report, holder, "refused", failure.reason);
        return;
      }
    }
    this.fail(report, { ...pick(holder), kind: holder.kind }, error);
  }

  /**
   * Posts whose outcome was unknown (a timeout, a 5xx, a replica killed while posting), once their
   * lease ended: the platform is asked whether the post carrying the claim's marker arrived. Found:
   * recorded as posted with that message id. Not there: opened again, so one replica posts it.
   * When the platform cannot tell, the claim stays for the next pass, and is recorded as missed
   * "outcome unknown" one lease later.
   */
  private async settleUnknown(report: TickReport): Promise<void> {
    const findPost = this.deps.platform.findPost?.bind(this.deps.platform);
    if (findPost === undefined) return;
    const now = this.deps.clock.now();
    for (const claim of await this.deps.store.expiredClaims(now, "digest", "posting")) {
      let found: string | null;
      try {
        found = await findPost(claim.channel, postMarker(claim), claim.claimedAt - LOOK_BACK_MS);
      } catch (error) {
        this.deps.logger.warn(
          { ...pick(claim), error: errorName(error), replica: this.deps.replicaId },
          "could not ask the platform whether a post arrived; asking again next pass",
        );
        continue;
      }
      const settled = await this.deps.store.settlePost({
        ...pick(claim),
        claimedBy: null,
        now,
        settlement:
          found === null ? { status: "claimed" } : { status: "posted", platformMessageId: found },
      });
      if (!settled) continue;
      report.settled.push({ ...pick(claim), found: found !== null });
      this.deps.logger.info(
        { ...pick(claim), found: found !== null, messageId: found, replica: this.deps.replicaId },
        found === null
          ? "post of unknown outcome is not in the channel; open again"
          : "post of unknown outcome found in the channel; recorded",
      );
    }
  }

  private claim(ref: SlotRef, leaseMs: number, member: string | null): Promise<boolean> {
    return this.deps.store.claimPost({
      ...ref,
      claimedBy: this.deps.replicaId,
      now: this.deps.clock.now(),
      leaseMs,
      member,
    });
  }

  private complete(ref: SlotRef, platformMessageId: string): Promise<boolean> {
    return this.deps.store.completePost({
      ...ref,
      claimedBy: this.deps.replicaId,
      platformMessageId,
    });
  }

  private skip(report: TickReport, ref: SlotRef, reason: SkipReason): void {
    report.skipped.push({ ...ref, reason });
    this.deps.logger.debug({ ...ref, reason }, "scheduled post skipped");
  }

  private fail(
    report: TickReport,
    ref: { channel: string; kind: PostKind | "settings"; period: string | null },
    error: unknown,
  ): void {
    const entry = { ...ref, error: errorName(error) };
    report.failed.push(entry);
    // A claimed slot that fails stays unfinished and becomes a miss after its lease: the post may
    // have reached the platform, so it is never retried.
    this.deps.logger.error(
      { ...entry, detail: errorDetail(error), replica: this.deps.replicaId },
      "scheduled post failed",
    );
  }
}

/** The claim's name on the platform (Slack message metadata): kind and period, no content. */
export function postMarker(key: ClaimKey): string {
  return `${key.kind} ${key.period}`;
}

function missReasonOf(claim: PostClaim): MissedEntry["reason"] {
  return claim.platformMessageId?.includes("outcome unknown") === true
    ? "outcome-unknown"
    : "not-taken-over";
}

function pick(key: ClaimKey): ClaimKey {
  return { channel: key.channel, kind: key.kind, period: key.period };
}

function errorName(error: unknown): string {
  if (isPlumblineError(error)) return error.code;
  return error instanceof Error ? error.name : "unknown";
}

function errorDetail(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
