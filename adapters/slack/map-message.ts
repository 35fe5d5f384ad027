/**
 * @module map-message
 * Turns one Slack `message` event (inside its Events API envelope) into the neutral `ChatEvent`,
 * keeping ids and times only: mentions come from the rich_text `user` elements, else from `<@U…>`
 * in the text, and the text itself is dropped here (it is never returned, stored or logged).
 * Thread replies carry `thread_ts` (the root's ts, the parent's id) and `parent_user_id` (its
 * author); blocks nested deeper than MAX_BLOCK_DEPTH are not walked (the text's mentions count
 * instead), so no payload can exhaust the stack; `message_changed` becomes an `edit` of the original ts with the new mention list,
 * `message_deleted` a `delete` of `deleted_ts`. Bot messages and the bot's own are ignored.
 */
import type { ChatEvent } from "../../src/domain/events.js";
import { coreChannelId, isSlackId } from "./channel-ids.js";

export type MappedMessage =
  | {
      readonly kind: "event";
      readonly event: ChatEvent;
      /** Mentions were read from the text because the blocks nest too deep. */
      readonly blocksTooDeep?: boolean;
    }
  | { readonly kind: "ignored"; readonly reason: string }
  /** A message event missing a field it needs; nothing is stored. */
  | { readonly kind: "invalid"; readonly field: string };

export interface MapMessageInput {
  /** The envelope's `team_id`. */
  readonly team: string;
  /** The `event` object of the envelope. */
  readonly event: unknown;
  /** The bot's own user id (its messages are ignored). */
  readonly botUserId: string;
}

/** Subtypes that are a member's message (counted like a plain one). */
const MESSAGE_SUBTYPES = new Set(["thread_broadcast", "file_share", "me_message"]);

const TEXT_MENTION = /<@([UW][A-Z0-9]+)(?:\|[^>]*)?>/g;
const SLACK_TS = /^\d{1,12}(\.\d{1,6})?$/;

export function isRecord(value: unknown): value is Record<string, unknown> {
  return typeof value === "object" && value !== null && !Array.isArray(value);
}

function field(record: Record<string, unknown>, key: string): string | undefined {
  const value = record[key];
  return typeof value === "string" && value !== "" ? value : undefined;
}

/** Epoch ms of a Slack ts ("1700000000.000100"); null when it is not one. */
export function tsToMillis(ts: string | undefined): number | null {
  if (ts === undefined || !SLACK_TS.test(ts)) return null;
  return Math.round(Number(ts) * 1000);
}

/**
 * Deepest nesting of rich_text blocks read (Slack's own blocks nest a handful of levels: block,
 * section or list, elements). Deeper blocks are not walked: a payload crafted to nest thousands
 * of levels would otherwise cost a stack frame per level.
 */
export const MAX_BLOCK_DEPTH = 32;

/** Adds each rich_text `user` element's id; false (and nothing added) when nested too deep. */
function walkRichText(root: unknown, into: Set<string>): boolean {
  const found: string[] = [];
  const stack: { node: unknown; depth: number }[] = [{ node: root, depth: 0 }];
  for (let item = stack.pop(); item !== undefined; item = stack.pop()) {
    const { node, depth } = item;
    if (depth > MAX_BLOCK_DEPTH) return false;
    if (Array.isArray(node)) {
      for (const child of node) stack.push({ node: child, depth: depth + 1 });
      continue;
    }
    if (!isRecord(node)) continue;
    if (node.type === "user" && isSlackId(node.user_id)) found.push(node.user_id);
    if (node.elements !== undefined) stack.push({ node: node.elements, depth: depth + 1 });
  }
  for (const id of found) into.add(id);
  return true;
}

export interface Mentions {
  readonly ids: string[];
  /** The blocks nested deeper than MAX_BLOCK_DEPTH, so the mentions came from the text. */
  readonly blocksTooDeep: boolean;
}

function textMentions(message: Record<string, unknown>, into: Set<string>): void {
  if (typeof message.text !== "string") return;
  for (const match of message.text.matchAll(TEXT_MENTION)) into.add(match[1]);
}

/**
 * Mentioned user ids of a message: rich_text `user` elements, else `<@U…>` in the text (also
 * when the blocks nest deeper than MAX_BLOCK_DEPTH).
 */
export function mentionsOf(message: Record<string, unknown>): Mentions {
  const blocks = Array.isArray(message.blocks) ? message.blocks : [];
  const rich = blocks.filter((b) => isRecord(b) && b.type === "rich_text");
  const found = new Set<string>();
  let blocksTooDeep = false;
  if (rich.length > 0) {
    blocksTooDeep = !walkRichText(rich, found);
    if (blocksTooDeep) textMentions(message, found);
  } else {
    textMentions(message, found);
  }
  return { ids: [...found].sort(), blocksTooDeep };
}

function fromBot(message: Record<string, unknown>, botUserId: string): boolean {
  return (
    message.subtype === "bot_message" ||
    typeof message.bot_id === "string" ||
    message.user === botUserId
  );
}

/** Maps one message event; see the module header for the rules. */
export function mapMessage(input: MapMessageInput): MappedMessage {
  const { event, team, botUserId } = input;
  if (!isRecord(event)) return { kind: "invalid", field: "event" };
  const channelId = field(event, "channel");
  if (!isSlackId(channelId)) return { kind: "invalid", field: "event.channel" };
  if (event.channel_type === "im") return { kind: "ignored", reason: "direct message" };
  const channel = coreChannelId(team, channelId);
  const subtype = field(event, "subtype");

  if (subtype === "message_changed") {
    const inner = event.message;
    if (!isRecord(inner)) return { kind: "invalid", field: "event.message" };
    if (fromBot(inner, botUserId)) return { kind: "ignored", reason: "bot message" };
    const id = field(inner, "ts");
    const at = tsToMillis(field(event, "event_ts") ?? field(event, "ts"));
    if (tsToMillis(id) === null || id === undefined) {
      return { kind: "invalid", field: "event.message.ts" };
    }
    if (at === null) return { kind: "invalid", field: "event.ts" };
    const mentions = mentionsOf(inner);
    return {
      kind: "event",
      event: { type: "edit", at, channel, id, mentions: mentions.ids },
      ...(mentions.blocksTooDeep ? { blocksTooDeep: true } : {}),
    };
  }
  if (subtype === "message_deleted") {
    const id = field(event, "deleted_ts");
    const at = tsToMillis(field(event, "event_ts") ?? field(event, "ts"));
    if (id === undefined || tsToMillis(id) === null) {
      return { kind: "invalid", field: "event.deleted_ts" };
    }
    if (at === null) return { kind: "invalid", field: "event.ts" };
    return { kind: "event", event: { type: "delete", at, channel, id } };
  }
  if (subtype !== undefined && !MESSAGE_SUBTYPES.has(subtype)) {
    return { kind: "ignored", reason: `subtype ${subtype}` };
  }
  if (fromBot(event, botUserId)) return { kind: "ignored", reason: "bot message" };
  const author = field(event, "user");
  if (!isSlackId(author)) return { kind: "invalid", field: "event.user" };
  const id = field(event, "ts");
  const at = tsToMillis(id);
  if (id === undefined || at === null) return { kind: "invalid", field: "event.ts" };
  const threadTs = field(event, "thread_ts");
  const isReply = threadTs !== undefined && threadTs !== id && tsToMillis(threadTs) !== null;
  const parentAuthor = field(event, "parent_user_id");
  const mentions = mentionsOf(event);
  return {
    kind: "event",
    ...(mentions.blocksTooDeep ? { blocksTooDeep: true } : {}),
    event: {
      type: "message",
      at,
      channel,
      id,
      author,
      ...(isReply ? { parent: threadTs } : {}),
      ...(isReply && isSlackId(parentAuthor) ? { parentAuthor } : {}),
      mentions: mentions.ids,
    },
  };
}
