/**
 * @module channel-ledger
 * The in-memory ledger of one channel: applies `ChatEvent`s in arrival order by the rules of
 * docs/event-semantics.md (1 consent by time, 2 messages, 3 edits, 4 deletes and undeletes,
 * 5 group labels) and hands out a `LedgerSnapshot`; `buildLedgers` replays a log up to `until`
 * (rule 6). Nothing of a message's text exists here: only who wrote to, answered and mentioned whom.
 */
import type { ChatEvent, ConsentLevel, MessageEvent } from "../domain/events.js";
import {
  type ConsentChange,
  type FormatChange,
  type GroupChange,
  isBroadcast,
  type LedgerMessage,
  type LedgerSnapshot,
} from "../domain/ledger.js";
import { ConsentTimeline, compareIds, GroupTimeline, isConsenting } from "./timeline.js";

interface StoredMessage {
  readonly id: string;
  readonly author: string;
  readonly at: number;
  readonly parentAuthor: string | null;
  mentions: readonly string[];
  deleted: boolean;
  broadcast: boolean;
}

/** Applies one channel's events by rules 1–5 of docs/event-semantics.md. */
export class ChannelLedger {
  /** The channel every applied event must belong to. */
  readonly channel: string;
  private readonly consent: ConsentChange[] = [];
  private readonly groups: GroupChange[] = [];
  private readonly formats: FormatChange[] = [];
  private readonly consentTimeline = new ConsentTimeline();
  private readonly groupTimeline = new GroupTimeline();
  private readonly messages = new Map<string, StoredMessage>();
  private lastEventAt: number | null = null;

  constructor(channel: string) {
    this.channel = channel;
  }

  /** Applies one event (arrival order matters: rule 1 looks only at changes applied so far). */
  apply(event: ChatEvent): void {
    if (event.channel !== this.channel) {
      throw new Error(
        `ChannelLedger for "${this.channel}" was given an event of channel "${event.channel}"`,
      );
    }
    if (this.lastEventAt === null || event.at > this.lastEventAt) this.lastEventAt = event.at;
    switch (event.type) {
      case "consent": {
        const change: ConsentChange = Object.freeze({
          member: event.member,
          at: event.at,
          level: event.level,
          notice: event.notice ?? null,
        });
        this.consent.push(change);
        this.consentTimeline.add(change);
        return;
      }
      case "message":
        this.storeMessage(event);
        return;
      case "edit": {
        const stored = this.messages.get(event.id);
        if (stored !== undefined) {
          stored.broadcast = isBroadcast(event.mentions, stored.author);
          stored.mentions = stored.broadcast
            ? Object.freeze([])
            : this.filterMentions(event.mentions, stored.author, stored.at);
        }
        return;
      }
      case "delete":
      case "undelete": {
        const stored = this.messages.get(event.id);
        if (stored !== undefined) stored.deleted = event.type === "delete";
        return;
      }
      case "group": {
        const change: GroupChange = Object.freeze({
          member: event.member,
          at: event.at,
          group: event.group,
        });
        this.groups.push(change);
        this.groupTimeline.add(change);
        return;
      }
      case "format":
        this.formats.push(Object.freeze({ at: event.at, format: event.format }));
        return;
    }
  }

  /** Consent of `member` at `at` by the changes applied so far (rule 1). */
  consentAt(member: string, at: number): ConsentLevel {
    return this.consentTimeline.levelAt(member, at);
  }

  /** Group label of `member` at `at` by the changes applied so far (rule 5). */
  groupAt(member: string, at: number): string | null {
    return this.groupTimeline.labelAt(member, at);
  }

  /** A frozen copy of the ledger: messages by ascending `at`, then id; changes in applied order. */
  snapshot(): LedgerSnapshot {
    const messages: LedgerMessage[] = [];
    for (const stored of this.messages.values()) {
      messages.push(
        Object.freeze({
          id: stored.id,
          author: stored.author,
          at: stored.at,
          parentAuthor: stored.parentAuthor,
          mentions: stored.mentions,
          deleted: stored.deleted,
          ...(stored.broadcast ? { broadcast: true } : {}),
        }),
      );
    }
    messages.sort((a, b) => a.at - b.at || compareIds(a.id, b.id));
    return Object.freeze({
      channel: this.channel,
      messages: Object.freeze(messages),
      consent: Object.freeze([...this.consent]),
      groups: Object.freeze([...this.groups]),
      formats: Object.freeze([...this.formats]),
      lastEventAt: this.lastEventAt,
    });
  }

  private storeMessage(event: MessageEvent): void {
    if (this.messages.has(event.id)) return; // first wins
    if (!isConsenting(this.consentAt(event.author, event.at))) return;
    let parentAuthor: string | null = event.parentAuthor ?? null;
    if (parentAuthor === null && event.parent !== undefined) {
      parentAuthor = this.messages.get(event.parent)?.author ?? null;
    }
    if (
      parentAuthor !== null &&
      (parentAuthor === event.author || !isConsenting(this.consentAt(parentAuthor, event.at)))
    ) {
      parentAuthor = null;
    }
    const broadcast = isBroadcast(event.mentions ?? [], event.author);
    this.messages.set(event.id, {
      id: event.id,
      author: event.author,
      at: event.at,
      parentAuthor,
      mentions: broadcast
        ? Object.freeze([])
        : this.filterMentions(event.mentions ?? [], event.author, event.at),
      deleted: false,
      broadcast,
    });
  }

  /** Rule 2's mention filter: distinct, not the author, consenting at `at`, sorted. */
  private filterMentions(
    mentions: readonly string[],
    author: string,
    at: number,
  ): readonly string[] {
    const kept = new Set<string>();
    for (const member of mentions) {
      if (member !== author && !kept.has(member) && isConsenting(this.consentAt(member, at))) {
        kept.add(member);
      }
    }
    return Object.freeze([...kept].sort(compareIds));
  }
}

/**
 * Replays events into one ledger per channel, applying only events with `at` ≤ `until` (rule 6;
 * no `until` applies all). Every channel that occurs in `events` gets an entry, in order of first
 * occurrence, even when all its events fall after `until` (then its snapshot is empty).
 */
export function buildLedgers(
  events: Iterable<ChatEvent>,
  options: { until?: number } = {},
): Map<string, LedgerSnapshot> {
  const until = options.until ?? Number.POSITIVE_INFINITY;
  const ledgers = new Map<string, ChannelLedger>();
  for (const event of events) {
    let ledger = ledgers.get(event.channel);
    if (ledger === undefined) {
      ledger = new ChannelLedger(event.channel);
      ledgers.set(event.channel, ledger);
    }
    if (event.at <= until) ledger.apply(event);
  }
  const snapshots = new Map<string, LedgerSnapshot>();
  for (const [channel, ledger] of ledgers) snapshots.set(channel, ledger.snapshot());
  return snapshots;
}

/** The latest `at` among `events` (the CLI's default `until`), or null when there are none. */
export function latestEventTime(events: Iterable<ChatEvent>): number | null {
  let latest: number | null = null;
  for (const event of events) {
    if (latest === null || event.at > latest) latest = event.at;
  }
  return latest;
}
