/**
 * @module parse-event-fields
 * Field-by-field validation of one parsed log object into a `ChatEvent` (DESIGN.md §3). Each event
 * type has a fixed set of required and optional fields; any other field is an error naming it, and
 * a field that could carry message content (text, links, files, ...) is refused with the reason.
 * Checks run in a fixed order, so the same bad line always reports the same field.
 */
import { LogLineError } from "../domain/errors.js";
import type { ChatEvent, ChatEventType, ConsentLevel } from "../domain/events.js";
import { parseIsoTime } from "./parse-iso-time.js";

/** A message event while its optional fields are filled in (both readers build one). */
interface MessageFields {
  type: "message";
  at: number;
  channel: string;
  id: string;
  author: string;
  parent?: string;
  parentAuthor?: string;
  mentions?: readonly string[];
}

/** Longest id, channel, member or label accepted. */
export const MAX_ID_LENGTH = 256;

/** Fields refused everywhere because they would carry message content. */
export const CONTENT_FIELDS: readonly string[] = [
  "text",
  "body",
  "content",
  "blocks",
  "attachments",
  "links",
  "files",
];

const EVENT_TYPES: readonly ChatEventType[] = [
  "consent",
  "message",
  "edit",
  "delete",
  "undelete",
  "group",
  "format",
];

const LEVELS: readonly ConsentLevel[] = ["off", "counted", "named"];

const FIELDS: Readonly<Record<ChatEventType, { required: string[]; optional: string[] }>> = {
  consent: { required: ["at", "channel", "member", "level"], optional: ["notice"] },
  message: {
    required: ["at", "channel", "id", "author"],
    optional: ["parent", "parentAuthor", "mentions"],
  },
  edit: { required: ["at", "channel", "id", "mentions"], optional: [] },
  delete: { required: ["at", "channel", "id"], optional: [] },
  undelete: { required: ["at", "channel", "id"], optional: [] },
  group: { required: ["at", "channel", "member", "group"], optional: [] },
  format: { required: ["at", "channel", "format"], optional: [] },
};

const ID_RULE = `a non-empty string of at most ${MAX_ID_LENGTH} characters`;

/** Validates a parsed JSON object from log line `line`; throws `LogLineError` on the first problem. */
export function parseEventObject(record: Record<string, unknown>, line: number): ChatEvent {
  return wellFormedEvent(record) ?? checkedEvent(record, line);
}

/** Each type's fields, `type` included, for the one-pass check of `wellFormedEvent`. */
const ALLOWED = new Map<string, ReadonlySet<string>>(
  EVENT_TYPES.map((type) => [
    type,
    new Set(["type", ...FIELDS[type].required, ...FIELDS[type].optional]),
  ]),
);

function isId(value: unknown): value is string {
  return typeof value === "string" && value.length > 0 && value.length <= MAX_ID_LENGTH;
}

function isIdList(value: unknown): value is string[] {
  if (!Array.isArray(value)) return false;
  for (let k = 0; k < value.length; k++) if (!isId(value[k])) return false;
  return true;
}

/**
 * The event of a record that passes every check of `checkedEvent`, built the same way (same
 * fields in the same order), in one pass over its keys and without building error closures; null
 * for anything else, which `checkedEvent` then reports with its field and fix. The field-by-field
 * version took two thirds of the log reader's time on large logs (DEVELOPERS.md, "Speed").
 */
export function wellFormedEvent(record: Record<string, unknown>): ChatEvent | null {
  const type = record.type;
  if (typeof type !== "string") return null;
  const allowed = ALLOWED.get(type);
  if (allowed === undefined) return null;
  // Content fields are in no set, so a record carrying one goes to checkedEvent's refusal.
  for (const key of Object.keys(record)) if (!allowed.has(key)) return null;
  const atText = record.at;
  const at = typeof atText === "string" ? parseIsoTime(atText) : null;
  const channel = record.channel;
  if (at === null || !isId(channel)) return null;
  switch (type as ChatEventType) {
    case "message": {
      const { id, author } = record;
      if (!isId(id) || !isId(author)) return null;
      const event: MessageFields = { type: "message", at, channel, id, author };
      if (Object.hasOwn(record, "parent")) {
        if (!isId(record.parent)) return null;
        event.parent = record.parent;
      }
      if (Object.hasOwn(record, "parentAuthor")) {
        if (!isId(record.parentAuthor)) return null;
        event.parentAuthor = record.parentAuthor;
      }
      if (Object.hasOwn(record, "mentions")) {
        const mentions = record.mentions;
        if (!isIdList(mentions)) return null;
        event.mentions = mentions.slice();
      }
      return event;
    }
    case "consent": {
      const { member, level } = record;
      if (!isId(member) || typeof level !== "string" || !(LEVELS as string[]).includes(level)) {
        return null;
      }
      if (!Object.hasOwn(record, "notice")) {
        return { type: "consent", at, channel, member, level: level as ConsentLevel };
      }
      const notice = record.notice;
      if (typeof notice !== "string" || notice.length > MAX_ID_LENGTH) return null;
      return { type: "consent", at, channel, member, level: level as ConsentLevel, notice };
    }
    case "edit": {
      const { id, mentions } = record;
      if (!isId(id) || !isIdList(mentions)) return null;
      return { type: "edit", at, channel, id, mentions: mentions.slice() };
    }
    case "delete":
    case "undelete": {
      const id = record.id;
      if (!isId(id)) return null;
      return { type: type as "delete" | "undelete", at, channel, id };
    }
    case "group": {
      const { member, group } = record;
      if (!isId(member) || !(group === null || isId(group))) return null;
      return { type: "group", at, channel, member, group };
    }
    case "format": {
      const format = record.format;
      if (!(format === null || isId(format))) return null;
      return { type: "format", at, channel, format };
    }
  }
  return null;
}

/** `parseEventObject` check by check, in the fixed order that names the first bad field. */
export function checkedEvent(record: Record<string, unknown>, line: number): ChatEvent {
  const bad = (field: string, message: string): LogLineError =>
    new LogLineError("LOG_BAD_FIELD", line, field, message);
  const has = (field: string): boolean => Object.hasOwn(record, field);

  for (const field of CONTENT_FIELDS) {
    if (has(field)) {
      throw bad(
        field,
        "the log must never carry message content; remove this field " +
          "(only who replied to and mentioned whom is kept)",
      );
    }
  }
  const typeList = EVENT_TYPES.join(", ");
  if (!has("type")) throw bad("type", `missing; expected one of ${typeList}`);
  const type = record.type;
  if (typeof type !== "string" || !(EVENT_TYPES as readonly string[]).includes(type)) {
    throw bad("type", `expected one of ${typeList} (got ${describe(type)})`);
  }
  const eventType = type as ChatEventType;
  const spec = FIELDS[eventType];
  for (const field of Object.keys(record)) {
    if (field !== "type" && !spec.required.includes(field) && !spec.optional.includes(field)) {
      const allowed = ["type", ...spec.required, ...spec.optional].join(", ");
      throw bad(field, `not allowed on a "${eventType}" event; remove it (allowed: ${allowed})`);
    }
  }
  for (const field of spec.required) {
    if (!has(field)) throw bad(field, `missing; a "${eventType}" event needs it`);
  }

  const at = parseIsoTime(typeof record.at === "string" ? record.at : "");
  if (at === null) {
    throw bad("at", "expected an ISO 8601 time with a zone, like 2026-11-02T09:00:00Z");
  }
  const id = (field: string): string => {
    const value = record[field];
    if (typeof value !== "string" || value.length === 0 || value.length > MAX_ID_LENGTH) {
      throw bad(field, `expected ${ID_RULE} (got ${describe(value)})`);
    }
    return value;
  };
  const mentions = (): string[] => {
    const value = record.mentions;
    if (!Array.isArray(value)) {
      throw bad(
        "mentions",
        `expected an array of member ids, like ["bo","cy"] (got ${describe(value)})`,
      );
    }
    return value.map((item: unknown, k) => {
      if (typeof item !== "string" || item.length === 0 || item.length > MAX_ID_LENGTH) {
        throw bad("mentions", `item ${k + 1} must be ${ID_RULE} (got ${describe(item)})`);
      }
      return item;
    });
  };
  const channel = id("channel");

  switch (eventType) {
    case "consent": {
      const level = record.level;
      if (typeof level !== "string" || !(LEVELS as readonly string[]).includes(level)) {
        throw bad("level", `expected "off", "counted" or "named" (got ${describe(level)})`);
      }
      const member = id("member");
      if (!has("notice"))
        return { type: eventType, at, channel, member, level: level as ConsentLevel };
      const notice = record.notice;
      if (typeof notice !== "string" || notice.length > MAX_ID_LENGTH) {
        throw bad("notice", `expected the notice version as a string, or leave the field out`);
      }
      return { type: eventType, at, channel, member, level: level as ConsentLevel, notice };
    }
    case "message": {
      const event: MessageFields = {
        type: eventType,
        at,
        channel,
        id: id("id"),
        author: id("author"),
      };
      if (has("parent")) event.parent = id("parent");
      if (has("parentAuthor")) event.parentAuthor = id("parentAuthor");
      if (has("mentions")) event.mentions = mentions();
      return event;
    }
    case "edit":
      return { type: eventType, at, channel, id: id("id"), mentions: mentions() };
    case "delete":
    case "undelete":
      return { type: eventType, at, channel, id: id("id") };
    case "group": {
      const member = id("member");
      const group = record.group;
      if (group === null) return { type: eventType, at, channel, member, group: null };
      if (typeof group !== "string" || group.length === 0 || group.length > MAX_ID_LENGTH) {
        throw bad("group", `expected a label (${ID_RULE}) or null to clear the member's group`);
      }
      return { type: eventType, at, channel, member, group };
    }
    case "format": {
      const format = record.format;
      if (format === null) return { type: eventType, at, channel, format: null };
      if (typeof format !== "string" || format.length === 0 || format.length > MAX_ID_LENGTH) {
        throw bad("format", `expected a format name (${ID_RULE}) or null to end the format period`);
      }
      return { type: eventType, at, channel, format };
    }
  }
}

/** A short, safe rendering of a bad value for an error message. */
function describe(value: unknown): string {
  if (value === undefined) return "nothing";
  if (value === null) return "null";
  if (Array.isArray(value)) return "an array";
  if (typeof value === "object") return "an object";
  if (typeof value === "string") {
    return value.length > 40 ? `"${value.slice(0, 40)}…"` : JSON.stringify(value);
  }
  return String(value);
}
