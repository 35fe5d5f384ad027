/**
 * @module sql-tx
 * `StoreTx` over one SQL connection inside a transaction: the row-level reads and writes that
 * ingestion composes into the event rules. Shared by SQLite and PostgreSQL (portable SQL with
 * `INSERT … ON CONFLICT`, supported by both).
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, FormatChange, GroupChange, LedgerMessage } from "../domain/ledger.js";
import type { StoredMessageHead, StoreTx } from "../ports/store.js";
import { deliveryDigest, type SqlDialect } from "./migrations.js";
import { isConsentLevel } from "./snapshot.js";
import type { SqlConnection } from "./sql-driver.js";

/** A number from a driver value (pg returns BIGINT as a string). */
export function num(value: unknown): number {
  return typeof value === "number" ? value : Number(value);
}

/** Rule 1 for one member: the latest change at or before the time, the later applied on ties. */
const LATEST_LEVEL = `SELECT level FROM consent_change WHERE channel = ? AND member = ? AND at <= ?
  ORDER BY at DESC, seq DESC LIMIT 1`;

/**
 * A table of the strings in one JSON-array parameter, as `j(value)`: one parameter however many
 * members (SQLite's json_each, sqlite.org/json1.html; PostgreSQL's json_array_elements_text, the
 * manual's "JSON Functions and Operators"). A statement never grows a column or parameter per
 * member, so no member count meets SQLite's or PostgreSQL's limits on either (SQLSTATE 54011).
 */
export function jsonList(dialect: SqlDialect): string {
  return dialect === "sqlite"
    ? "json_each(?) AS j"
    : "json_array_elements_text(?::json) AS j(value)";
}

export function sqlTx(conn: SqlConnection, dialect: SqlDialect): StoreTx {
  return {
    async addDelivery(key, receivedAt, owner) {
      const changed = await conn.run(
        `INSERT INTO delivery (delivery_key, received_at, channel, member) VALUES (?, ?, ?, ?)
         ON CONFLICT (delivery_key) DO NOTHING`,
        [deliveryDigest(key), receivedAt, owner?.channel ?? null, owner?.member ?? null],
      );
      return changed === 1;
    },
    async addRejected(key, code, receivedAt) {
      await conn.run(
        `INSERT INTO rejected_delivery (delivery_key, code, received_at) VALUES (?, ?, ?)
         ON CONFLICT (delivery_key) DO NOTHING`,
        [deliveryDigest(key), code, receivedAt],
      );
    },
    async touchChannel(channel, at) {
      await conn.run(
        `INSERT INTO channel (channel, workspace, last_event_at) VALUES (?, NULL, ?)
         ON CONFLICT (channel) DO UPDATE SET last_event_at = CASE
           WHEN channel.last_event_at IS NULL OR excluded.last_event_at > channel.last_event_at
           THEN excluded.last_event_at ELSE channel.last_event_at END`,
        [channel, at],
      );
    },
    async consentAt(channel, member, at): Promise<ConsentLevel> {
      const rows = await conn.all(LATEST_LEVEL, [channel, member, at]);
      const level = rows[0]?.level;
      return isConsentLevel(level) ? level : "off";
    },
    async consentAtMany(channel, members, at): Promise<ConsentLevel[]> {
      if (members.length === 0) return [];
      const distinct = [...new Set(members)];
      // One statement, one indexed LIMIT 1 lookup per member, the members as one array parameter.
      const rows = await conn.all(
        `SELECT j.value AS member, (SELECT c.level FROM consent_change c WHERE c.channel = ?
           AND c.member = j.value AND c.at <= ? ORDER BY c.at DESC, c.seq DESC LIMIT 1) AS level
         FROM ${jsonList(dialect)}`,
        [channel, at, JSON.stringify(distinct)],
      );
      const levels = new Map<string, ConsentLevel>();
      for (const row of rows) {
        levels.set(String(row.member), isConsentLevel(row.level) ? row.level : "off");
      }
      return members.map((m) => levels.get(m) ?? "off");
    },
    async addConsent(channel, change: ConsentChange) {
      await conn.run(
        "INSERT INTO consent_change (channel, member, at, level, notice) VALUES (?, ?, ?, ?, ?)",
        [channel, change.member, change.at, change.level, change.notice],
      );
    },
    async setPlatformId(channel, member, platformId) {
      if (platformId === null) {
        await conn.run("DELETE FROM named_member WHERE channel = ? AND member = ?", [
          channel,
          member,
        ]);
        return;
      }
      await conn.run(
        `INSERT INTO named_member (channel, member, platform_id) VALUES (?, ?, ?)
         ON CONFLICT (channel, member) DO UPDATE SET platform_id = excluded.platform_id`,
        [channel, member, platformId],
      );
    },
    async addGroup(channel, change: GroupChange) {
      await conn.run("INSERT INTO group_change (channel, member, at, label) VALUES (?, ?, ?, ?)", [
        channel,
        change.member,
        change.at,
        change.group,
      ]);
    },
    async addFormat(channel, change: FormatChange) {
      await conn.run("INSERT INTO format_change (channel, at, label) VALUES (?, ?, ?)", [
        channel,
        change.at,
        change.format,
      ]);
    },
    async findMessage(channel, id): Promise<StoredMessageHead | null> {
      const rows = await conn.all("SELECT author, at FROM message WHERE channel = ? AND id = ?", [
        channel,
        id,
      ]);
      const row = rows[0];
      return row === undefined ? null : { author: String(row.author), at: num(row.at) };
    },
    async insertMessage(channel, message: LedgerMessage) {
      const inserted = await conn.run(
        `INSERT INTO message (channel, id, author, at, parent_author, deleted, broadcast)
         VALUES (?, ?, ?, ?, ?, ?, ?) ON CONFLICT (channel, id) DO NOTHING`,
        [
          channel,
          message.id,
          message.author,
          message.at,
          message.parentAuthor,
          message.deleted ? 1 : 0,
          message.broadcast === true ? 1 : 0,
        ],
      );
      if (inserted === 0) return false;
      await insertMentions(conn, dialect, channel, message.id, message.mentions);
      return true;
    },
    async setMentions(channel, id, mentions, broadcast) {
      await conn.run(
        "DELETE FROM message_target WHERE channel = ? AND message_id = ? AND kind = 'mention'",
        [channel, id],
      );
      await conn.run("UPDATE message SET broadcast = ? WHERE channel = ? AND id = ?", [
        broadcast ? 1 : 0,
        channel,
        id,
      ]);
      await insertMentions(conn, dialect, channel, id, mentions);
    },
    async setDeleted(channel, id, deleted) {
      await conn.run("UPDATE message SET deleted = ? WHERE channel = ? AND id = ?", [
        deleted ? 1 : 0,
        channel,
        id,
      ]);
    },
  };
}

async function insertMentions(
  conn: SqlConnection,
  dialect: SqlDialect,
  channel: string,
  id: string,
  mentions: readonly string[],
): Promise<void> {
  const targets = [...new Set(mentions)];
  if (targets.length === 0) return;
  await conn.run(
    `INSERT INTO message_target (channel, message_id, kind, target)
     SELECT ?, ?, 'mention', j.value FROM ${jsonList(dialect)}`,
    [channel, id, JSON.stringify(targets)],
  );
}
