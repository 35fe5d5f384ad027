/**
 * @module memory-tx
 * The memory store's state and its `StoreTx`: every write pushes an undo step so the store can
 * roll a failed transaction back.
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, GroupChange } from "../domain/ledger.js";
import type { StoreTx } from "../ports/store.js";

export interface MemoryMessage {
  readonly id: string;
  readonly author: string;
  readonly at: number;
  readonly parentAuthor: string | null;
  readonly deleted: boolean;
  readonly mentions: readonly string[];
}

export interface MemoryChannel {
  consent: ConsentChange[];
  groups: GroupChange[];
  readonly messages: Map<string, MemoryMessage>;
  /** Member key → platform id (named members only). */
  readonly named: Map<string, string>;
  /** Channel state kind → JSON text. */
  readonly state: Map<string, string>;
  /** Facilitator member key → platform id (kept with the role). */
  readonly facilitators: Map<string, string>;
}

export interface MemoryState {
  readonly deliveries: Map<string, number>;
  readonly channels: Map<string, MemoryChannel>;
  /** The channel rows: workspace and latest event time. */
  readonly rows: Map<string, { workspace: string | null; lastEventAt: number | null }>;
}

export function emptyChannel(): MemoryChannel {
  return {
    consent: [],
    groups: [],
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
    async addDelivery(key, receivedAt) {
      if (state.deliveries.has(key)) return false;
      undoSet(state.deliveries, key, undo);
      state.deliveries.set(key, receivedAt);
      return true;
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
    async findMessage(id, messageId) {
      const m = state.channels.get(id)?.messages.get(messageId);
      return m === undefined ? null : { author: m.author, at: m.at };
    },
    async insertMessage(id, message) {
      const c = channel(id);
      if (c.messages.has(message.id)) return false;
      undoSet(c.messages, message.id, undo);
      c.messages.set(message.id, { ...message, mentions: [...new Set(message.mentions)] });
      return true;
    },
    async setMentions(id, messageId, mentions) {
      const c = channel(id);
      const m = c.messages.get(messageId);
      if (m === undefined) return;
      undoSet(c.messages, messageId, undo);
      c.messages.set(messageId, { ...m, mentions: [...new Set(mentions)] });
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
