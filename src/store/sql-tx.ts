/**
 * @module sql-tx
 * `StoreTx` over one SQL connection inside a transaction: the row-level reads and writes that
 * ingestion composes into the event rules. Shared by SQLite and PostgreSQL (portable SQL with
 * `INSERT … ON CONFLICT`, supported by both).
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, GroupChange, LedgerMessage } from "../domain/ledger.js";
import type { StoredMessageHead, StoreTx } from "../ports/store.js";
import { isConsentLevel } from "./snapshot.js";
import type { SqlConnection } from "./sql-driver.js";

/** A number from a driver value (pg returns BIGINT as a string). */
export function num(value: unknown): number {
  return typeof value === "number" ? value : Number(value);
}

/** Rule 1 for one member: the latest change at or before the time, the later applied on ties. */
const LATEST_LEVEL = `SELECT level FROM consent_change WHERE channel = ? AND member = ? AND at <= ?
  ORDER BY at DESC, seq DESC LIMIT 1`;

export function sqlTx(conn: SqlConnection): StoreTx {
  return {
    async addDelivery(key, receivedAt) {
      const changed = await conn.run(
        "INSERT INTO delivery (delivery_key, received_at) VALUES (?, ?) ON CONFLICT (delivery_key) DO NOTHING",
        [key, receivedAt],
      );
      return changed === 1;
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
      // One statement, one indexed LIMIT 1 lookup per member (a single round trip on PostgreSQL).
      const rows = await conn.all(
        `SELECT ${distinct.map((_, i) => `(${LATEST_LEVEL}) AS l${i}`).join(", ")}`,
        distinct.flatMap((member) => [channel, member, at]),
      );
      const levels = new Map<string, ConsentLevel>();
      distinct.forEach((member, i) => {
        const level = rows[0]?.[`l${i}`];
        levels.set(member, isConsentLevel(level) ? level : "off");
      });
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
        `INSERT INTO message (channel, id, author, at, parent_author, deleted)
         VALUES (?, ?, ?, ?, ?, ?) ON CONFLICT (channel, id) DO NOTHING`,
        [
          channel,
          message.id,
          message.author,
          message.at,
          message.parentAuthor,
          message.deleted ? 1 : 0,
        ],
      );
      if (inserted === 0) return false;
      await insertMentions(conn, channel, message.id, message.mentions);
      return true;
    },
    async setMentions(channel, id, mentions) {
      await conn.run(
        "DELETE FROM message_target WHERE channel = ? AND message_id = ? AND kind = 'mention'",
        [channel, id],
      );
      await insertMentions(conn, channel, id, mentions);
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
  channel: string,
  id: string,
  mentions: readonly string[],
): Promise<void> {
  const targets = [...new Set(mentions)];
  if (targets.length === 0) return;
  await conn.run(
    `INSERT INTO message_target (channel, message_id, kind, target) VALUES
     ${targets.map(() => "(?, ?, 'mention', ?)").join(", ")}`,
    targets.flatMap((target) => [channel, id, target]),
  );
}
