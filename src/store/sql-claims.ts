/**
 * @module sql-claims
 * Post claims in SQL (DESIGN.md §8): a row keyed (channel, kind, period) inserted with
 * ON CONFLICT DO NOTHING, so exactly one replica gets to post; the poster records the platform's
 * message id; an unfinished claim past its lease is marked missed, never posted again.
 */
import type { ClaimKey, ClaimRequest, PostClaim } from "../ports/store.js";
import { compareStrings } from "./snapshot.js";
import type { SqlConnection, SqlRow } from "./sql-driver.js";
import { num } from "./sql-tx.js";

export async function insertClaim(
  conn: SqlConnection,
  request: ClaimRequest,
  member: string | null,
): Promise<boolean> {
  const changed = await conn.run(
    `INSERT INTO post_claim (channel, kind, period, claimed_by, claimed_at, lease_until, status,
       platform_message_id, member) VALUES (?, ?, ?, ?, ?, ?, 'claimed', NULL, ?)
     ON CONFLICT (channel, kind, period) DO NOTHING`,
    [
      request.channel,
      request.kind,
      request.period,
      request.claimedBy,
      request.now,
      request.now + request.leaseMs,
      member,
    ],
  );
  return changed === 1;
}

export async function completeClaim(
  conn: SqlConnection,
  key: ClaimKey & { claimedBy: string; platformMessageId: string },
): Promise<boolean> {
  const changed = await conn.run(
    `UPDATE post_claim SET status = 'posted', platform_message_id = ?
     WHERE channel = ? AND kind = ? AND period = ? AND claimed_by = ? AND status <> 'posted'`,
    [key.platformMessageId, key.channel, key.kind, key.period, key.claimedBy],
  );
  return changed === 1;
}

export async function readClaim(conn: SqlConnection, key: ClaimKey): Promise<PostClaim | null> {
  const rows = await conn.all(
    "SELECT * FROM post_claim WHERE channel = ? AND kind = ? AND period = ?",
    [key.channel, key.kind, key.period],
  );
  return rows.length === 0 ? null : toClaim(rows[0]);
}

export async function markMissed(conn: SqlConnection, now: number): Promise<PostClaim[]> {
  const rows = await conn.all(
    `UPDATE post_claim SET status = 'missed' WHERE status = 'claimed' AND lease_until < ?
     RETURNING *`,
    [now],
  );
  return rows.map(toClaim).sort((a, b) => compareStrings(claimOrder(a), claimOrder(b)));
}

function toClaim(row: SqlRow): PostClaim {
  const status = row.status === "posted" || row.status === "missed" ? row.status : "claimed";
  return {
    channel: String(row.channel),
    kind: String(row.kind),
    period: String(row.period),
    claimedBy: String(row.claimed_by),
    claimedAt: num(row.claimed_at),
    leaseUntil: num(row.lease_until),
    status,
    platformMessageId: row.platform_message_id === null ? null : String(row.platform_message_id),
    member: row.member === null ? null : String(row.member),
  };
}

function claimOrder(claim: PostClaim): string {
  return `${claim.channel}\u0000${claim.kind}\u0000${claim.period}`;
}
