/**
 * @module snapshot
 * Builds a `LedgerSnapshot` from stored rows, shared by every store so all three map member keys
 * the same way: a member whose platform id is kept (consent `named`) appears under it, any other
 * member as `~` + key. Orders follow src/domain/ledger.ts: messages by `at` then id, mentions
 * ascending by the mapped id, consent and group changes in applied order.
 */
import type { ConsentLevel } from "../domain/events.js";
import type { LedgerMessage, LedgerSnapshot } from "../domain/ledger.js";
import { PSEUDONYM_PREFIX } from "../ports/store.js";

export interface SnapshotRows {
  readonly channel: string;
  readonly messages: readonly {
    readonly id: string;
    readonly author: string;
    readonly at: number;
    readonly parentAuthor: string | null;
    readonly deleted: boolean;
    readonly mentions: readonly string[];
    readonly broadcast?: boolean;
  }[];
  /** In applied order. */
  readonly consent: readonly {
    readonly member: string;
    readonly at: number;
    readonly level: ConsentLevel;
    readonly notice: string | null;
  }[];
  /** In applied order. */
  readonly groups: readonly {
    readonly member: string;
    readonly at: number;
    readonly group: string | null;
  }[];
  /** In applied order. */
  readonly formats: readonly { readonly at: number; readonly format: string | null }[];
  /** Member key → platform id, for members whose platform id is kept. */
  readonly platformIds: ReadonlyMap<string, string>;
  readonly lastEventAt: number | null;
}

/** The snapshot id of a member key: the kept platform id, else `~` + key. */
export function snapshotId(key: string, platformIds: ReadonlyMap<string, string>): string {
  return platformIds.get(key) ?? `${PSEUDONYM_PREFIX}${key}`;
}

export function buildSnapshot(rows: SnapshotRows): LedgerSnapshot {
  const id = (key: string): string => snapshotId(key, rows.platformIds);
  const messages: LedgerMessage[] = rows.messages.map((m) => ({
    id: m.id,
    author: id(m.author),
    at: m.at,
    parentAuthor: m.parentAuthor === null ? null : id(m.parentAuthor),
    mentions: m.mentions.map(id).sort(compareStrings),
    deleted: m.deleted,
    ...(m.broadcast === true ? { broadcast: true } : {}),
  }));
  messages.sort((a, b) => a.at - b.at || compareStrings(a.id, b.id));
  return {
    channel: rows.channel,
    messages,
    consent: rows.consent.map((c) => ({
      member: id(c.member),
      at: c.at,
      level: c.level,
      notice: c.notice,
    })),
    groups: rows.groups.map((g) => ({ member: id(g.member), at: g.at, group: g.group })),
    formats: rows.formats.map((f) => ({ at: f.at, format: f.format })),
    lastEventAt: rows.lastEventAt,
  };
}

/** Code-unit order, the order of `Array.prototype.sort` without a comparator. */
export function compareStrings(a: string, b: string): number {
  return a < b ? -1 : a > b ? 1 : 0;
}

export function isConsentLevel(value: unknown): value is ConsentLevel {
  return value === "off" || value === "counted" || value === "named";
}
