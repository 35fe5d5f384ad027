/**
 * @module memory-tx
 * The memory store's state and its `StoreTx`: every write pushes an undo step so the store can
 * roll a failed transaction back.
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, FormatChange, GroupChange } from "../domain/ledger.js";
import type { StoreTx } from "../ports/store.js";
import { deliveryDigest } from "./migrations.js";

export interface MemoryMessage {
  readonly id: string;
  readonly author: string;
  readonly at: number;
  readonly parentAuthor: string | null;
  readonly deleted: boolean;
  readonly mentions: readonly string[];
  readonly broadcast?: boolean;
}

/** A delivery as kept: when it arrived and, for erasure, whose event it was. */
export interface MemoryDelivery {
  readonly at: number;
  readonly channel: string | null;
  readonly member: string | null;
}

export interface MemoryChannel {
  consent: ConsentChange[];
  groups: GroupChange[];
  formats: FormatChange[];
  readonly messages: Map<string, MemoryMessage>;
  /** Member key → platform id (named members only). */
  readonly named: Map<string, string>;
  /** Channel state kind → JSON text. */
  readonly state: Map<string, string>;
  /** Facilitator member key → platform id (kept with the role). */
  readonly facilitators: Map<string, string>;
}

export interface MemoryState {
  /** Delivery key digest → delivery. */
  readonly deliveries: Map<string, MemoryDelivery>;
  /** Rejected delivery key digest → error code and time. */
  readonly rejected: Map<string, { readonly code: string; readonly at: number }>;
  readonly channels: Map<string, MemoryChannel>;
  /** The channel rows: workspace and latest event time. */
  readonly rows: Map<string, { workspace: string | null; lastEventAt: number | null }>;
}

export function emptyChannel(): MemoryChannel {
  return {
    consent: [],
    groups: [],
    formats: [],
    messages: new Map(),
    named: new Map(),
    state: new Map(),
    facilitators: new Map(),
  };
}

/** Restores `map[key]` to its present value (or absence). */
function undoSet<K, V>(map: Map<K, V>, key: K, undo: (() => void)[]): void {
  const had = map.has(key);
  const old = map.get(key) as V;
  undo.push(() => {
    if (had) map.set(key, old);
    else map.delete(key);
  });
}

/** Rule 1 over changes in applied order: `>=` lets the later of equal times win. */
function levelAt(changes: readonly ConsentChange[], member: string, at: number): ConsentLevel {
  let level: ConsentLevel = "off";
  let best = Number.NEGATIVE_INFINITY;
  for (const change of changes) {
    if (change.member === member && change.at <= at && change.at >= best) {
      best = change.at;
      level = change.level;
    }
  }
  return level;
}

export function memoryTx(state: MemoryState, undo: (() => void)[]): StoreTx {
  const channel = (id: string): MemoryChannel => {
    let c = state.channels.get(id);
    if (c === undefined) {
      c = emptyChannel();
      undoSet(state.channels, id, undo);
      state.channels.set(id, c);
    }
    return c;
  };
  return {
    async addDelivery(key, receivedAt, owner) {
      const digest = deliveryDigest(key);
      if (state.deliveries.has(digest)) return false;
      undoSet(state.deliveries, digest, undo);
      state.deliveries.set(digest, {
        at: receivedAt,
        channel: owner?.channel ?? null,
        member: owner?.member ?? null,
      });
      return true;
    },
    async addRejected(key, code, receivedAt) {
      const digest = deliveryDigest(key);
      if (state.rejected.has(digest)) return;
      undoSet(state.rejected, digest, undo);
      state.rejected.set(digest, { code, at: receivedAt });
    },
    async touchChannel(id, at) {
      const row = state.rows.get(id);
      undoSet(state.rows, id, undo);
      const last = row?.lastEventAt ?? null;
      state.rows.set(id, {
        workspace: row?.workspace ?? null,
        lastEventAt: last === null || at > last ? at : last,
      });
    },
    async consentAt(id, member, at): Promise<ConsentLevel> {
      return levelAt(state.channels.get(id)?.consent ?? [], member, at);
    },
    async consentAtMany(id, members, at): Promise<ConsentLevel[]> {
      const changes = state.channels.get(id)?.consent ?? [];
      return members.map((member) => levelAt(changes, member, at));
    },
    async addConsent(id, change) {
      const c = channel(id);
      const before = c.consent;
      undo.push(() => {
        c.consent = before;
      });
      c.consent = [...before, change];
    },
    async setPlatformId(id, member, platformId) {
      const c = channel(id);
      undoSet(c.named, member, undo);
      if (platformId === null) c.named.delete(member);
      else c.named.set(member, platformId);
    },
    async addGroup(id, change) {
      const c = channel(id);
      const before = c.groups;
      undo.push(() => {
        c.groups = before;
      });
      c.groups = [...before, change];
    },
    async addFormat(id, change) {
      const c = channel(id);
      const before = c.formats;
      undo.push(() => {
        c.formats = before;
      });
      c.formats = [...before, change];
    },
    async findMessage(id, messageId) {
      const m = state.channels.get(id)?.messages.get(messageId);
      return m === undefined ? null : { author: m.author, at: m.at };
    },
    async insertMessage(id, message) {
      const c = channel(id);
      if (c.messages.has(message.id)) return false;
      undoSet(c.messages, message.id, undo);
      const { broadcast, ...rest } = message;
      c.messages.set(message.id, {
        ...rest,
        mentions: [...new Set(message.mentions)],
        ...(broadcast === true ? { broadcast: true } : {}),
      });
      return true;
    },
    async setMentions(id, messageId, mentions, broadcast) {
      const c = channel(id);
      const m = c.messages.get(messageId);
      if (m === undefined) return;
      undoSet(c.messages, messageId, undo);
      const { broadcast: _old, ...rest } = m;
      c.messages.set(messageId, {
        ...rest,
        mentions: [...new Set(mentions)],
        ...(broadcast ? { broadcast: true } : {}),
      });
    },
    async setDeleted(id, messageId, deleted) {
      const c = channel(id);
      const m = c.messages.get(messageId);
      if (m === undefined) return;
      undoSet(c.messages, messageId, undo);
      c.messages.set(messageId, { ...m, deleted });
    },
  };
}
