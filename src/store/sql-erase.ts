/**
 * @module sql-erase
 * Erasure and retention for the SQL stores (DESIGN.md §7): a member leaving a channel, a channel
 * or workspace uninstalling, and the daily purge. Each runs inside the caller's transaction.
 */
import type { PurgeCounts, PurgeCutoffs } from "../ports/store.js";
import type { SqlConnection } from "./sql-driver.js";

/** Every row naming the member key in the channel; returns rows changed. */
export async function eraseMemberRows(
  conn: SqlConnection,
  channel: string,
  member: string,
): Promise<number> {
  const c = channel;
  const m = member;
  let rows = 0;
  rows += await conn.run(
    `DELETE FROM message_target WHERE channel = ? AND message_id IN
       (SELECT id FROM message WHERE channel = ? AND author = ?)`,
    [c, c, m],
  );
  rows += await conn.run("DELETE FROM message WHERE channel = ? AND author = ?", [c, m]);
  rows += await conn.run("DELETE FROM message_target WHERE channel = ? AND target = ?", [c, m]);
  rows += await conn.run(
    "UPDATE message SET parent_author = NULL WHERE channel = ? AND parent_author = ?",
    [c, m],
  );
  for (const table of [
    "group_change",
    "consent_change",
    "facilitator",
    "post_claim",
    "named_member",
    "delivery",
  ]) {
    rows += await conn.run(`DELETE FROM ${table} WHERE channel = ? AND member = ?`, [c, m]);
  }
  return rows;
}

const CHANNEL_TABLES = [
  "message_target",
  "message",
  "group_change",
  "format_change",
  "consent_change",
  "named_member",
  "facilitator",
  "post_claim",
  "channel_state",
  "delivery",
  "channel",
] as const;

/** Every row of the channel, the channel row included; returns rows deleted. */
export async function eraseChannelRows(conn: SqlConnection, channel: string): Promise<number> {
  let rows = 0;
  for (const table of CHANNEL_TABLES) {
    rows += await conn.run(`DELETE FROM ${table} WHERE channel = ?`, [channel]);
  }
  return rows;
}

export async function purgeRows(conn: SqlConnection, cutoffs: PurgeCutoffs): Promise<PurgeCounts> {
  await conn.run(
    `DELETE FROM message_target WHERE EXISTS (SELECT 1 FROM message m
       WHERE m.channel = message_target.channel AND m.id = message_target.message_id AND m.at < ?)`,
    [cutoffs.ledgerBefore],
  );
  const messages = await conn.run("DELETE FROM message WHERE at < ?", [cutoffs.ledgerBefore]);
  const deliveries = await conn.run("DELETE FROM delivery WHERE received_at < ?", [
    cutoffs.deliveriesBefore,
  ]);
  await conn.run("DELETE FROM rejected_delivery WHERE received_at < ?", [cutoffs.deliveriesBefore]);
  return { messages, deliveries };
}
