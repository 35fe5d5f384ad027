/**
 * @module migrations
 * Versioned schema for the SQL stores. Each migration is a list of statements applied in one
 * transaction together with the new version number in `plumbline_schema`; a database whose version
 * is above `LATEST_SCHEMA_VERSION` is refused (STORE_NEWER_THAN_CODE). The DDL is shared by SQLite
 * and PostgreSQL; only the applied-order sequence column differs (`{SEQ}`).
 */

import { createHash } from "node:crypto";
import type { SqlConnection } from "./sql-driver.js";

export type SqlDialect = "sqlite" | "postgres";

/** The stored form of a delivery key: its SHA-256, hex (FIPS 180-4), so no key is kept in the clear. */
export function deliveryDigest(deliveryKey: string): string {
  return createHash("sha256").update(deliveryKey, "utf8").digest("hex");
}

interface Migration {
  readonly version: number;
  readonly statements: readonly string[];
  /** Row changes after the statements (e.g. digesting old keys), in the same transaction. */
  readonly transform?: (conn: SqlConnection) => Promise<void>;
}

const MIGRATIONS: readonly Migration[] = [
  {
    version: 1,
    statements: [
      `CREATE TABLE channel (channel TEXT PRIMARY KEY, workspace TEXT, last_event_at BIGINT)`,
      `CREATE INDEX channel_workspace ON channel (workspace)`,
      `CREATE TABLE delivery (delivery_key TEXT PRIMARY KEY, received_at BIGINT NOT NULL)`,
      `CREATE INDEX delivery_received ON delivery (received_at)`,
      `CREATE TABLE consent_change (seq {SEQ}, channel TEXT NOT NULL, member TEXT NOT NULL,
        at BIGINT NOT NULL, level TEXT NOT NULL, notice TEXT)`,
      `CREATE INDEX consent_lookup ON consent_change (channel, member, at, seq)`,
      `CREATE TABLE named_member (channel TEXT NOT NULL, member TEXT NOT NULL,
        platform_id TEXT NOT NULL, PRIMARY KEY (channel, member))`,
      `CREATE TABLE group_change (seq {SEQ}, channel TEXT NOT NULL, member TEXT NOT NULL,
        at BIGINT NOT NULL, label TEXT)`,
      `CREATE INDEX group_lookup ON group_change (channel, member)`,
      `CREATE TABLE message (channel TEXT NOT NULL, id TEXT NOT NULL, author TEXT NOT NULL,
        at BIGINT NOT NULL, parent_author TEXT, deleted INTEGER NOT NULL DEFAULT 0,
        PRIMARY KEY (channel, id))`,
      `CREATE INDEX message_author ON message (channel, author)`,
      `CREATE INDEX message_parent ON message (channel, parent_author)`,
      `CREATE INDEX message_at ON message (at)`,
      `CREATE TABLE message_target (channel TEXT NOT NULL, message_id TEXT NOT NULL,
        kind TEXT NOT NULL, target TEXT NOT NULL, PRIMARY KEY (channel, message_id, kind, target))`,
      `CREATE INDEX message_target_target ON message_target (channel, target)`,
      `CREATE TABLE channel_state (channel TEXT NOT NULL, kind TEXT NOT NULL, value TEXT NOT NULL,
        PRIMARY KEY (channel, kind))`,
      `CREATE TABLE facilitator (channel TEXT NOT NULL, member TEXT NOT NULL,
        PRIMARY KEY (channel, member))`,
      `CREATE TABLE post_claim (channel TEXT NOT NULL, kind TEXT NOT NULL, period TEXT NOT NULL,
        claimed_by TEXT NOT NULL, claimed_at BIGINT NOT NULL, lease_until BIGINT NOT NULL,
        status TEXT NOT NULL, platform_message_id TEXT, member TEXT,
        PRIMARY KEY (channel, kind, period))`,
      `CREATE INDEX post_claim_member ON post_claim (channel, member)`,
    ],
  },
  {
    // Issue 11: the id key's fingerprint, the report-link secret shared by replicas, rejected
    // deliveries, delivery keys as digests with their channel and member (erased with them), and
    // broadcasts (messages mentioning more than 50 members, kept without their mention rows).
    version: 2,
    statements: [
      `CREATE TABLE plumbline_key (id INTEGER PRIMARY KEY, fingerprint TEXT NOT NULL)`,
      `CREATE TABLE plumbline_secret (name TEXT PRIMARY KEY, value TEXT NOT NULL)`,
      `CREATE TABLE rejected_delivery (delivery_key TEXT PRIMARY KEY, code TEXT NOT NULL,
        received_at BIGINT NOT NULL)`,
      `CREATE INDEX rejected_received ON rejected_delivery (received_at)`,
      `ALTER TABLE delivery ADD COLUMN channel TEXT`,
      `ALTER TABLE delivery ADD COLUMN member TEXT`,
      `CREATE INDEX delivery_member ON delivery (channel, member)`,
      `ALTER TABLE message ADD COLUMN broadcast INTEGER NOT NULL DEFAULT 0`,
    ],
    async transform(conn) {
      const rows = await conn.all("SELECT delivery_key FROM delivery");
      for (const row of rows) {
        const key = String(row.delivery_key);
        await conn.run("UPDATE delivery SET delivery_key = ? WHERE delivery_key = ?", [
          deliveryDigest(key),
          key,
        ]);
      }
    },
  },
  {
    // Facilitators are a role stored with their platform id (DESIGN.md §7), separate from their
    // consent for counting, so notes for facilitators reach those who joined `counted` too.
    // Rows from before keep the id a named member had; the others get it when next added.
    version: 3,
    statements: [
      `ALTER TABLE facilitator ADD COLUMN platform_id TEXT`,
      `UPDATE facilitator SET platform_id = (SELECT n.platform_id FROM named_member n
        WHERE n.channel = facilitator.channel AND n.member = facilitator.member)`,
    ],
  },
  {
    // Issue 16: format periods, kept like group labels (a facilitator's name, or null to end one).
    version: 4,
    statements: [
      `CREATE TABLE format_change (seq {SEQ}, channel TEXT NOT NULL, at BIGINT NOT NULL,
        label TEXT)`,
      `CREATE INDEX format_lookup ON format_change (channel, seq)`,
    ],
  },
];

/** The schema version this code writes and reads. */
export const LATEST_SCHEMA_VERSION = MIGRATIONS[MIGRATIONS.length - 1].version;

/** Statements that take a database at `from` to the latest version, grouped per version. */
export function pendingMigrations(
  dialect: SqlDialect,
  from: number,
): { version: number; statements: string[]; transform?: (conn: SqlConnection) => Promise<void> }[] {
  const seq = dialect === "sqlite" ? "INTEGER PRIMARY KEY" : "BIGSERIAL PRIMARY KEY";
  return MIGRATIONS.filter((m) => m.version > from).map((m) => ({
    version: m.version,
    statements: m.statements.map((s) => s.replaceAll("{SEQ}", seq)),
    ...(m.transform ? { transform: m.transform } : {}),
  }));
}
