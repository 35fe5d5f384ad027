/**
 * @module apply-event
 * Rules 1–5 of docs/event-semantics.md on a store transaction, the same rules the in-memory
 * `ChannelLedger` (src/attention/channel-ledger.ts) applies: consent is read at the event's time,
 * a reply's parent author comes from the event or the ledger, edits refilter mentions at the
 * message's own time, deletes and undeletes flip a mark. Member ids become member keys first.
 */
import type { ChatEvent, ConsentLevel, MessageEvent } from "../domain/events.js";
import { BROADCAST_MENTIONS, isBroadcast } from "../domain/ledger.js";
import type { StoreTx } from "../ports/store.js";

export interface ApplyContext {
  readonly tx: StoreTx;
  readonly memberKey: (platformId: string) => string;
}

const consenting = (level: ConsentLevel): boolean => level !== "off";

/** Applies one (new) event inside the caller's transaction. */
export async function applyEvent(ctx: ApplyContext, event: ChatEvent): Promise<void> {
  const { tx, memberKey } = ctx;
  await tx.touchChannel(event.channel, event.at);
  switch (event.type) {
    case "consent": {
      const member = memberKey(event.member);
      await tx.addConsent(event.channel, {
        member,
        at: event.at,
        level: event.level,
        notice: event.notice ?? null,
      });
      // The platform id is kept only while the member's latest consent is `named`.
      const current = await tx.consentAt(event.channel, member, Number.MAX_SAFE_INTEGER);
      await tx.setPlatformId(event.channel, member, current === "named" ? event.member : null);
      return;
    }
    case "message":
      await storeMessage(ctx, event);
      return;
    case "edit": {
      const stored = await tx.findMessage(event.channel, event.id);
      if (stored === null) return;
      const keys = event.mentions.map(memberKey);
      const broadcast = isBroadcast(keys, stored.author);
      const mentions = broadcast
        ? []
        : await filterMentions(ctx, {
            channel: event.channel,
            mentions: keys,
            author: stored.author,
            at: stored.at,
          });
      await tx.setMentions(event.channel, event.id, mentions, broadcast);
      return;
    }
    case "delete":
    case "undelete": {
      const stored = await tx.findMessage(event.channel, event.id);
      if (stored !== null) await tx.setDeleted(event.channel, event.id, event.type === "delete");
      return;
    }
    case "group":
      await tx.addGroup(event.channel, {
        member: memberKey(event.member),
        at: event.at,
        group: event.group,
      });
      return;
    case "format":
      await tx.addFormat(event.channel, { at: event.at, format: event.format });
      return;
  }
}

async function storeMessage(ctx: ApplyContext, event: MessageEvent): Promise<void> {
  const { tx, memberKey } = ctx;
  const author = memberKey(event.author);
  let parentAuthor: string | null =
    event.parentAuthor === undefined ? null : memberKey(event.parentAuthor);
  if (parentAuthor === null && event.parent !== undefined) {
    parentAuthor = (await tx.findMessage(event.channel, event.parent))?.author ?? null;
  }
  if (parentAuthor === author) parentAuthor = null;
  const named = [...new Set((event.mentions ?? []).map(memberKey))].filter((m) => m !== author);
  // DESIGN.md §4.2: a broadcast keeps its reply signal only, so its mentions are never looked up.
  const broadcast = named.length > BROADCAST_MENTIONS;
  const mentions = broadcast ? [] : named;
  // One consent lookup for the author, the parent's author and the mentioned, all at `at`.
  const asked = parentAuthor === null ? [author, ...mentions] : [author, parentAuthor, ...mentions];
  const levels = await tx.consentAtMany(event.channel, asked, event.at);
  if (!consenting(levels[0])) return;
  const offset = parentAuthor === null ? 1 : 2;
  if (parentAuthor !== null && !consenting(levels[1])) parentAuthor = null;
  // insertMessage keeps the first message of an id and ignores later ones (first wins).
  await tx.insertMessage(event.channel, {
    id: event.id,
    author,
    at: event.at,
    parentAuthor,
    mentions: mentions.filter((_, i) => consenting(levels[i + offset])),
    deleted: false,
    ...(broadcast ? { broadcast: true } : {}),
  });
}

/** The member an event is about (its author or member), as a platform id; null for none. */
export function eventMember(event: ChatEvent): string | null {
  if (event.type === "message") return event.author;
  if (event.type === "consent" || event.type === "group") return event.member;
  return null;
}

/** Rule 2's filter: distinct, not the author, consenting at `at` (order is fixed at snapshot). */
async function filterMentions(
  ctx: ApplyContext,
  args: { channel: string; mentions: readonly string[]; author: string; at: number },
): Promise<string[]> {
  const candidates = [...new Set(args.mentions)].filter((m) => m !== args.author);
  const levels = await ctx.tx.consentAtMany(args.channel, candidates, args.at);
  return candidates.filter((_, i) => consenting(levels[i]));
}
