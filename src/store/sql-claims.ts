/**
 * @module sql-claims
 * Post claims in SQL (DESIGN.md §8), in two phases: a row keyed (channel, kind, period) is
 * inserted as "claimed" with ON CONFLICT, so exactly one replica holds it while composing; a
 * "claimed" row whose lease has ended (its holder died before sending) is taken over by the same
 * upsert, whose WHERE is re-checked on the locked row, so two replicas racing cannot both win.
 * Just before the platform call the holder moves it to "posting"; a "posting" row past its lease
 * is never taken over but marked missed ("outcome unknown"), because the post may have arrived.
 */
import {
  type ClaimKey,
  type ClaimRequest,
  type ClaimStatus,
  type MissReason,
  missedMarker,
  type PostClaim,
  type PostSettlement,
} from "../ports/store.js";
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
     ON CONFLICT (channel, kind, period) DO UPDATE SET claimed_by = excluded.claimed_by,
       claimed_at = excluded.claimed_at, lease_until = excluded.lease_until, member = excluded.member
     WHERE post_claim.status = 'claimed' AND post_claim.lease_until < excluded.claimed_at`,
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

export async function beginClaimPost(
  conn: SqlConnection,
  key: ClaimKey & { claimedBy: string; now: number; leaseMs: number },
): Promise<boolean> {
  const changed = await conn.run(
    `UPDATE post_claim SET status = 'posting', lease_until = ?
     WHERE channel = ? AND kind = ? AND period = ? AND claimed_by = ? AND status = 'claimed'`,
    [key.now + key.leaseMs, key.channel, key.kind, key.period, key.claimedBy],
  );
  return changed === 1;
}

export async function releaseClaimPost(
  conn: SqlConnection,
  key: ClaimKey & { claimedBy: string; retryAt?: number },
): Promise<boolean> {
  const changed = await conn.run(
    `UPDATE post_claim SET status = 'claimed', lease_until = COALESCE(?, lease_until)
     WHERE channel = ? AND kind = ? AND period = ? AND claimed_by = ? AND status = 'posting'`,
    [key.retryAt ?? null, key.channel, key.kind, key.period, key.claimedBy],
  );
  return changed === 1;
}

/** Ends a "posting" claim: the holder's own, or (claimedBy null) anyone's past its lease. */
export async function settleClaimPost(
  conn: SqlConnection,
  key: ClaimKey & { claimedBy: string | null; now: number; settlement: PostSettlement },
): Promise<boolean> {
  const { settlement } = key;
  const messageId =
    settlement.status === "posted"
      ? settlement.platformMessageId
      : settlement.status === "missed"
        ? missedMarker(settlement.reason)
        : null;
  const changed = await conn.run(
    `UPDATE post_claim SET status = ?, platform_message_id = ?
     WHERE channel = ? AND kind = ? AND period = ? AND status = 'posting'
       AND ${key.claimedBy === null ? "lease_until < ?" : "claimed_by = ?"}`,
    [
      settlement.status,
      messageId,
      key.channel,
      key.kind,
      key.period,
      key.claimedBy === null ? key.now : key.claimedBy,
    ],
  );
  return changed === 1;
}

export async function insertMiss(
  conn: SqlConnection,
  request: ClaimRequest & { reason: MissReason },
  member: string | null,
): Promise<boolean> {
  const changed = await conn.run(
    `INSERT INTO post_claim (channel, kind, period, claimed_by, claimed_at, lease_until, status,
       platform_message_id, member) VALUES (?, ?, ?, ?, ?, ?, 'missed', ?, ?)
     ON CONFLICT (channel, kind, period) DO UPDATE SET status = 'missed',
       claimed_by = excluded.claimed_by, platform_message_id = excluded.platform_message_id
     WHERE post_claim.status = 'claimed' AND post_claim.lease_until < excluded.claimed_at`,
    [
      request.channel,
      request.kind,
      request.period,
      request.claimedBy,
      request.now,
      request.now,
      missedMarker(request.reason),
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

export async function listExpired(
  conn: SqlConnection,
  now: number,
  kind: string,
  status: "claimed" | "posting" = "claimed",
): Promise<PostClaim[]> {
  const rows = await conn.all(
    "SELECT * FROM post_claim WHERE status = ? AND kind = ? AND lease_until < ?",
    [status, kind, now],
  );
  return rows.map(toClaim).sort((a, b) => compareStrings(claimOrder(a), claimOrder(b)));
}

export async function markMissed(
  conn: SqlConnection,
  now: number,
  abandonedBefore: number | undefined,
): Promise<PostClaim[]> {
  const rows = await conn.all(
    `UPDATE post_claim SET status = 'missed', platform_message_id = CASE WHEN status = 'posting'
       THEN '${missedMarker("outcome unknown")}' ELSE '${missedMarker("not taken over")}' END
     WHERE (status = 'posting' AND lease_until < ?)
       OR (status = 'claimed' AND lease_until < ?)
     RETURNING *`,
    [now, abandonedBefore ?? Number.MIN_SAFE_INTEGER],
  );
  return rows.map(toClaim).sort((a, b) => compareStrings(claimOrder(a), claimOrder(b)));
}

function toClaim(row: SqlRow): PostClaim {
  const status: ClaimStatus =
    row.status === "posted" || row.status === "missed" || row.status === "posting"
      ? row.status
      : "claimed";
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
