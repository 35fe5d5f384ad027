/**
 * @module sql-rekey
 * Re-keys a SQL store in one transaction (DESIGN.md §7, rotation): every stored member key k
 * becomes HMAC(new secret, k) (member-key.ts, key chains), in every table and column that holds
 * one, and the key fingerprint becomes the new chain's. The old → new map goes through a
 * temporary table filled in fixed-size batches, and each column is updated by one statement, so
 * no statement grows with the member count. Any failure rolls everything back: the old key stays
 * valid and no row changes.
 */
import { PlumblineError } from "../domain/errors.js";
import { hmac128, keyFingerprint, keyParts } from "./member-key.js";
import type { SqlDialect } from "./migrations.js";
import type { SqlConnection } from "./sql-driver.js";

/** Every (table, column) that holds a member key. */
export const MEMBER_COLUMNS: readonly (readonly [string, string])[] = [
  ["consent_change", "member"],
  ["named_member", "member"],
  ["group_change", "member"],
  ["message", "author"],
  ["message", "parent_author"],
  ["message_target", "target"],
  ["facilitator", "member"],
  ["post_claim", "member"],
  ["delivery", "member"],
];

const BATCH = 100;

export interface RekeyOptions {
  /** The key the store is bound to now (a chain or one secret). */
  readonly oldKey: string;
  /** The secret to add. */
  readonly newSecret: string;
  /** Called after each column is updated (tests inject a failure half-way). */
  readonly afterColumn?: (table: string, column: string) => void | Promise<void>;
}

/** Rewrites every member key inside the caller's transaction; returns the new chain and counts. */
export async function rekeyRows(
  conn: SqlConnection,
  dialect: SqlDialect,
  options: RekeyOptions,
): Promise<{ key: string; members: number; rows: number }> {
  const oldParts = keyParts(options.oldKey);
  const [newSecret] = keyParts(options.newSecret);
  if (oldParts.includes(newSecret)) {
    throw new PlumblineError("ARG_BAD_VALUE", "the new key is already part of the store's key", {
      hint: "give a fresh secret, e.g. `openssl rand -hex 32 > new.key`",
    });
  }
  const key = [...oldParts, newSecret].join("\n");
  const kept = await conn.all("SELECT fingerprint FROM plumbline_key WHERE id = 1");
  if (String(kept[0]?.fingerprint) !== keyFingerprint(options.oldKey)) {
    throw new PlumblineError("STORE_KEY_MISMATCH", "the store's key changed while re-keying", {
      hint: "run `plumbline rekey` again with the store's current key",
    });
  }
  const members = new Set<string>();
  for (const [table, column] of MEMBER_COLUMNS) {
    const rows = await conn.all(
      `SELECT DISTINCT ${column} AS k FROM ${table} WHERE ${column} IS NOT NULL`,
    );
    for (const r of rows) members.add(String(r.k));
  }
  await conn.run(
    dialect === "sqlite"
      ? "CREATE TEMP TABLE IF NOT EXISTS rekey_map (old TEXT PRIMARY KEY, new TEXT NOT NULL)"
      : "CREATE TEMP TABLE IF NOT EXISTS rekey_map (old TEXT PRIMARY KEY, new TEXT NOT NULL) ON COMMIT DROP",
  );
  await conn.run("DELETE FROM rekey_map");
  const list = [...members];
  for (let i = 0; i < list.length; i += BATCH) {
    const batch = list.slice(i, i + BATCH);
    await conn.run(
      `INSERT INTO rekey_map (old, new) VALUES ${batch.map(() => "(?, ?)").join(", ")}`,
      batch.flatMap((old) => [old, hmac128(newSecret, old)]),
    );
  }
  let rows = 0;
  for (const [table, column] of MEMBER_COLUMNS) {
    rows += await conn.run(
      `UPDATE ${table} SET ${column} = (SELECT m.new FROM rekey_map m WHERE m.old = ${table}.${column})
       WHERE ${column} IS NOT NULL`,
    );
    await options.afterColumn?.(table, column);
  }
  await conn.run("UPDATE plumbline_key SET fingerprint = ? WHERE id = 1", [keyFingerprint(key)]);
  if (dialect === "sqlite") await conn.run("DELETE FROM rekey_map");
  return { key, members: members.size, rows };
}
