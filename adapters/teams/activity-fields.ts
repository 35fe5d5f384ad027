/**
 * @module activity-fields
 * Pure readings of a Bot Framework activity as Teams sends it: the core channel id (the
 * conversation id without its `;messageid=` thread suffix), the thread root, the member id
 * (`aadObjectId`, else the channel account id), the tenant, the mentions other than the bot, the
 * delivery key, and the `influence …` command after the bot's own @mention. Field meanings follow
 * the Bot Framework activity schema and Microsoft's Teams bot pages (learn.microsoft.com,
 * microsoftteams/platform/bots/how-to/conversations/channel-and-group-conversations). No SDK
 * import here: the functions read plain objects, so fixtures and a future SDK both fit.
 */

/** Prefix of every core channel id this adapter owns. */
export const TEAMS_CHANNEL_PREFIX = "teams:";

const THREAD_MARK = ";messageid=";

export interface AccountLike {
  readonly id?: string;
  readonly aadObjectId?: string;
  readonly name?: string;
}

/** The parts of an activity the adapter reads (the SDK's `Activity` fits this shape). */
export interface ActivityLike {
  readonly type?: string;
  readonly id?: string;
  readonly timestamp?: Date | string;
  readonly channelId?: string;
  readonly serviceUrl?: string;
  readonly conversation?: {
    readonly id?: string;
    readonly conversationType?: string;
    readonly tenantId?: string;
  };
  readonly from?: AccountLike;
  readonly recipient?: AccountLike;
  readonly replyToId?: string;
  readonly entities?: readonly unknown[];
  readonly channelData?: unknown;
  readonly membersAdded?: readonly AccountLike[];
  readonly membersRemoved?: readonly AccountLike[];
  readonly action?: string;
}

function record(value: unknown): Record<string, unknown> | null {
  return typeof value === "object" && value !== null ? (value as Record<string, unknown>) : null;
}

function text(value: unknown): string | null {
  return typeof value === "string" && value !== "" ? value : null;
}

/**
 * Teams and Bot Framework ids are printable ASCII without spaces: conversations
 * `19:…@thread.tacv2` (with `;messageid=…` in a thread) or `a:…` (personal), accounts `29:…`,
 * Entra object ids (GUIDs), numeric message ids. Anything else (NUL, control characters, escape
 * sequences, spaces, other scripts) is refused before it reaches the store.
 */
const TEAMS_ID = /^[\x21-\x7e]{1,512}$/;

export function isTeamsId(value: unknown): value is string {
  return typeof value === "string" && TEAMS_ID.test(value);
}

/** The first id field of the activity that is present but malformed, or null. */
export function malformedIdField(activity: ActivityLike): string | null {
  const data = record(activity.channelData);
  const fields: [string, unknown][] = [
    ["id", activity.id],
    ["conversation.id", activity.conversation?.id],
    ["conversation.tenantId", activity.conversation?.tenantId],
    ["from.id", activity.from?.id],
    ["from.aadObjectId", activity.from?.aadObjectId],
    ["replyToId", activity.replyToId],
    ["channelData.team.id", record(data?.team)?.id],
    ["channelData.channel.id", record(data?.channel)?.id],
    ["channelData.tenant.id", record(data?.tenant)?.id],
  ];
  for (const [name, value] of fields) {
    if (value !== undefined && value !== null && value !== "" && !isTeamsId(value)) return name;
  }
  return null;
}

/** `teams:` + the conversation id without any `;messageid=` suffix. */
export function coreChannelId(conversationId: string): string {
  const cut = conversationId.indexOf(THREAD_MARK);
  return TEAMS_CHANNEL_PREFIX + (cut < 0 ? conversationId : conversationId.slice(0, cut));
}

/** The platform conversation id of a core channel id (the bare channel, never a thread). */
export function platformConversationId(channel: string): string {
  return channel.startsWith(TEAMS_CHANNEL_PREFIX)
    ? channel.slice(TEAMS_CHANNEL_PREFIX.length)
    : channel;
}

/** The message id after `;messageid=`, or null when the conversation id names no thread. */
export function threadRootId(conversationId: string): string | null {
  const cut = conversationId.indexOf(THREAD_MARK);
  return cut < 0 ? null : text(conversationId.slice(cut + THREAD_MARK.length));
}

/** The core member id of an account: its Entra object id, else its channel account id. */
export function memberIdOf(account: AccountLike | undefined): string | null {
  return text(account?.aadObjectId) ?? text(account?.id);
}

export function tenantOf(activity: ActivityLike): string {
  const data = record(activity.channelData);
  return (
    text(activity.conversation?.tenantId) ?? text(record(data?.tenant)?.id) ?? "unknown-tenant"
  );
}

/** The team id from `channelData.team.id` (channel conversations only). */
export function teamIdOf(activity: ActivityLike): string | null {
  return text(record(record(activity.channelData)?.team)?.id);
}

/** `channelData.eventType` (editMessage, softDeleteMessage, undeleteMessage, teamDeleted …). */
export function eventTypeOf(activity: ActivityLike): string | null {
  return text(record(activity.channelData)?.eventType);
}

/** Epoch ms of the activity, or `fallback` when it carries no valid timestamp. */
export function activityTime(activity: ActivityLike, fallback: number): number {
  const raw = activity.timestamp;
  const at = raw instanceof Date ? raw.getTime() : typeof raw === "string" ? Date.parse(raw) : NaN;
  return Number.isFinite(at) ? at : fallback;
}

/** The parent of a message: its thread root (unless it is the root), else the replied-to id. */
export function parentOf(activity: ActivityLike): string | null {
  const id = text(activity.id);
  const root = threadRootId(activity.conversation?.id ?? "");
  if (root !== null && root !== id) return root;
  const reply = text(activity.replyToId);
  return reply !== null && reply !== id ? reply : null;
}

export interface MentionRef {
  /** The mentioned account's channel id (29:…). */
  readonly id: string;
  /** Present when Teams includes the Entra object id in the entity. */
  readonly aadObjectId: string | null;
  /** The `<at>…</at>` fragment of the text. */
  readonly text: string | null;
}

/** Mention entities, in order; the bot's own and non-member targets kept apart by `botId`. */
export function mentionEntities(activity: ActivityLike): MentionRef[] {
  const out: MentionRef[] = [];
  for (const entity of activity.entities ?? []) {
    const e = record(entity);
    if (e?.type !== "mention") continue;
    const mentioned = record(e.mentioned);
    const id = text(mentioned?.id);
    if (id === null) continue;
    out.push({ id, aadObjectId: text(mentioned?.aadObjectId), text: text(e.text) });
  }
  return out;
}

/** True when an id names the bot itself, a bot or a channel/team rather than a person. */
export function isNotPerson(id: string, botId: string | null): boolean {
  return id === botId || id.startsWith("28:") || id.startsWith("19:");
}

/** The mentions of people, the bot's own removed, duplicates dropped. */
export function personMentions(activity: ActivityLike): MentionRef[] {
  const botId = text(activity.recipient?.id);
  const seen = new Set<string>();
  return mentionEntities(activity).filter((m) => {
    if (isNotPerson(m.id, botId) || seen.has(m.id)) return false;
    seen.add(m.id);
    return true;
  });
}

export function mentionsBot(activity: ActivityLike): boolean {
  const botId = text(activity.recipient?.id);
  return botId !== null && mentionEntities(activity).some((m) => m.id === botId);
}

/**
 * The words after `influence` when `messageText`, with the bot's `<at>` fragments removed, starts
 * with it; else null. Another person's `<at>Name</at>` becomes `<@member id>` (the form the command
 * parser reads), using `memberIdFor`. Only the command words survive; the caller drops the text.
 */
export function commandWords(
  activity: ActivityLike,
  messageText: string,
  memberIdFor: (mention: MentionRef) => string,
): string | null {
  const botId = text(activity.recipient?.id);
  let rest = messageText;
  for (const m of mentionEntities(activity)) {
    if (m.text === null) continue;
    const replacement = isNotPerson(m.id, botId) ? " " : ` <@${memberIdFor(m)}> `;
    rest = rest.split(m.text).join(replacement);
  }
  rest = rest
    .replace(/&nbsp;/g, " ")
    .replace(/<\/?(p|div|span|br)[^>]*>/gi, " ")
    .trim();
  const match = /^\/?influence(?:\s+([\s\S]*))?$/i.exec(rest);
  if (!match) return null;
  return (match[1] ?? "").replace(/\s+/g, " ").trim();
}

/**
 * The delivery key: tenant + conversation + activity id. Edits, deletes and undeletes reuse the
 * message's own id, so their event type and timestamp join the key; a redelivery of the same
 * activity gives the same key, a later edit a new one.
 */
export function deliveryKeyOf(activity: ActivityLike): string {
  const parts = ["teams", tenantOf(activity), activity.conversation?.id ?? "", activity.id ?? ""];
  if (activity.type === "messageUpdate" || activity.type === "messageDelete") {
    const raw = activity.timestamp;
    const stamp = raw instanceof Date ? raw.toISOString() : String(raw ?? "");
    parts.push(activity.type, eventTypeOf(activity) ?? "", stamp);
  }
  return parts.join("|");
}
