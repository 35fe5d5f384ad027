/**
 * @module sql-store
 * The `Store` over a `SqlDriver` (SQLite or PostgreSQL): migrations on open, the ingestion
 * transaction, snapshots, channel state, facilitators, post claims, erasure and purge. Member ids
 * are turned into keys here (member-key.ts) before any row is written.
 */
import { PlumblineError } from "../domain/errors.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type {
  ChannelInfo,
  ChannelStateKind,
  ClaimKey,
  ClaimRequest,
  EraseCounts,
  MissReason,
  PostClaim,
  PostSettlement,
  PurgeCounts,
  PurgeCutoffs,
  Store,
  StoreKind,
  StoreTx,
} from "../ports/store.js";
import {
  keyFingerprint,
  type MemberKeyer,
  mismatchedKey,
  type ResolvedKey,
  randomSecret,
} from "./member-key.js";
import { LATEST_SCHEMA_VERSION, pendingMigrations } from "./migrations.js";
import { buildSnapshot, compareStrings, isConsentLevel, snapshotId } from "./snapshot.js";
import {
  beginClaimPost,
  completeClaim,
  insertClaim,
  insertMiss,
  listExpired,
  markMissed,
  readClaim,
  releaseClaimPost,
  settleClaimPost,
} from "./sql-claims.js";
import type { SqlConnection, SqlDriver } from "./sql-driver.js";
import { eraseChannelRows, eraseMemberRows, purgeRows } from "./sql-erase.js";
import { type RekeyOptions, rekeyRows } from "./sql-rekey.js";
import { num, sqlTx } from "./sql-tx.js";

/** Arbitrary fixed id for the migration advisory lock (PostgreSQL). */
const MIGRATION_LOCK = 7_305_112;

/**
 * Brings the schema to the latest version in one transaction and returns the version reached
 * and how many migrations ran. Refuses a database newer than this code (STORE_NEWER_THAN_CODE).
 */
export async function migrateSchema(
  driver: SqlDriver,
): Promise<{ version: number; applied: number }> {
  return driver.transaction(async (conn) => {
    if (driver.dialect === "postgres") {
      await conn.all("SELECT pg_advisory_xact_lock(?)", [MIGRATION_LOCK]);
    }
    await conn.run("CREATE TABLE IF NOT EXISTS plumbline_schema (version INTEGER NOT NULL)");
    const rows = await conn.all("SELECT version FROM plumbline_schema");
    let version = rows.length === 0 ? 0 : num(rows[0].version);
    if (rows.length === 0) await conn.run("INSERT INTO plumbline_schema (version) VALUES (0)");
    if (version > LATEST_SCHEMA_VERSION) {
      throw new PlumblineError(
        "STORE_NEWER_THAN_CODE",
        `the database schema is at version ${version} but this plumbline knows only up to ${LATEST_SCHEMA_VERSION}`,
        {
          hint: "upgrade plumbline to the version that wrote this database, or point DATABASE_URL elsewhere",
        },
      );
    }
    const pending = pendingMigrations(driver.dialect, version);
    for (const migration of pending) {
      for (const statement of migration.statements) await conn.run(statement);
      await migration.transform?.(conn);
      version = migration.version;
    }
    await conn.run("UPDATE plumbline_schema SET version = ?", [version]);
    return { version, applied: pending.length };
  }, "write");
}

/** Tables whose rows mean the store holds data keyed with some id key. */
const KEYED_TABLES = ["consent_change", "message", "group_change", "facilitator", "delivery"];

/**
 * Binds the id key to the store (DESIGN.md §7): compares the key's fingerprint with the one
 * kept, or — for a store without one — records it. `resolve` gets whether the store is empty (a
 * key may be generated only then) and returns the key and where it came from. A different key is
 * refused with STORE_KEY_MISMATCH naming that place.
 */
export async function bindIdKey(
  driver: SqlDriver,
  resolve: (empty: boolean) => ResolvedKey,
): Promise<ResolvedKey> {
  const state = await driver.transaction(async (conn) => {
    const rows = await conn.all("SELECT fingerprint FROM plumbline_key WHERE id = 1");
    let data = false;
    for (const table of KEYED_TABLES) {
      if ((await conn.all(`SELECT 1 AS found FROM ${table} LIMIT 1`)).length > 0) {
        data = true;
        break;
      }
    }
    return { fingerprint: rows[0] === undefined ? null : String(rows[0].fingerprint), data };
  }, "read");
  const resolved = resolve(state.fingerprint === null && !state.data);
  const fingerprint = keyFingerprint(resolved.key);
  const kept =
    state.fingerprint ??
    (await driver.transaction(async (conn) => {
      await conn.run(
        "INSERT INTO plumbline_key (id, fingerprint) VALUES (1, ?) ON CONFLICT (id) DO NOTHING",
        [fingerprint],
      );
      const rows = await conn.all("SELECT fingerprint FROM plumbline_key WHERE id = 1");
      return String(rows[0].fingerprint);
    }, "write"));
  if (kept !== fingerprint) throw mismatchedKey(resolved.origin);
  return resolved;
}

export class SqlStore implements Store {
  readonly kind: StoreKind;

  constructor(
    private readonly driver: SqlDriver,
    readonly memberKey: MemberKeyer,
    readonly schemaVersion: number,
    /** The id key in use and where it came from (for `plumbline rekey`). */
    readonly idKey: ResolvedKey,
  ) {
    this.kind = driver.dialect;
  }

  transaction<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> {
    return this.driver.transaction((conn) => fn(sqlTx(conn, this.driver.dialect)), "write");
  }

  loadSnapshot(channel: string): Promise<LedgerSnapshot> {
    return this.driver.transaction(async (conn) => {
      const messages = await conn.all(
        "SELECT id, author, at, parent_author, deleted, broadcast FROM message WHERE channel = ?",
        [channel],
      );
      const targets = await conn.all(
        "SELECT message_id, target FROM message_target WHERE channel = ? AND kind = 'mention'",
        [channel],
      );
      const mentions = new Map<string, string[]>();
      for (const t of targets) {
        const list = mentions.get(String(t.message_id)) ?? [];
        list.push(String(t.target));
        mentions.set(String(t.message_id), list);
      }
      const consent = await conn.all(
        "SELECT member, at, level, notice FROM consent_change WHERE channel = ? ORDER BY seq",
        [channel],
      );
      const groups = await conn.all(
        "SELECT member, at, label FROM group_change WHERE channel = ? ORDER BY seq",
        [channel],
      );
      const formats = await conn.all(
        "SELECT at, label FROM format_change WHERE channel = ? ORDER BY seq",
        [channel],
      );
      const channelRow = await conn.all("SELECT last_event_at FROM channel WHERE channel = ?", [
        channel,
      ]);
      const last = channelRow[0]?.last_event_at;
      return buildSnapshot({
        channel,
        messages: messages.map((m) => ({
          id: String(m.id),
          author: String(m.author),
          at: num(m.at),
          parentAuthor: m.parent_author === null ? null : String(m.parent_author),
          deleted: num(m.deleted) !== 0,
          mentions: mentions.get(String(m.id)) ?? [],
          ...(num(m.broadcast) !== 0 ? { broadcast: true } : {}),
        })),
        consent: consent.map((c) => ({
          member: String(c.member),
          at: num(c.at),
          level: isConsentLevel(c.level) ? c.level : "off",
          notice: c.notice === null ? null : String(c.notice),
        })),
        groups: groups.map((g) => ({
          member: String(g.member),
          at: num(g.at),
          group: g.label === null ? null : String(g.label),
        })),
        formats: formats.map((f) => ({
          at: num(f.at),
          format: f.label === null ? null : String(f.label),
        })),
        platformIds: await platformIds(conn, channel),
        lastEventAt: last === null || last === undefined ? null : num(last),
      });
    }, "read");
  }

  async registerChannel(channel: string, workspace: string | null): Promise<void> {
    await this.write((conn) =>
      conn.run(
        `INSERT INTO channel (channel, workspace, last_event_at) VALUES (?, ?, NULL)
         ON CONFLICT (channel) DO UPDATE SET workspace = excluded.workspace`,
        [channel, workspace],
      ),
    );
  }

  async listChannels(): Promise<ChannelInfo[]> {
    const rows = await this.read((conn) =>
      conn.all("SELECT channel, workspace, last_event_at FROM channel"),
    );
    return rows
      .map((r) => ({
        channel: String(r.channel),
        workspace: r.workspace === null ? null : String(r.workspace),
        lastEventAt: r.last_event_at === null ? null : num(r.last_event_at),
      }))
      .sort((a, b) => compareStrings(a.channel, b.channel));
  }

  async readChannelState(channel: string, kind: ChannelStateKind): Promise<unknown> {
    const rows = await this.read((conn) =>
      conn.all("SELECT value FROM channel_state WHERE channel = ? AND kind = ?", [channel, kind]),
    );
    return rows.length === 0 ? null : (JSON.parse(String(rows[0].value)) as unknown);
  }

  async writeChannelState(channel: string, kind: ChannelStateKind, value: unknown): Promise<void> {
    await this.write(async (conn) => {
      if (value === null || value === undefined) {
        return conn.run("DELETE FROM channel_state WHERE channel = ? AND kind = ?", [
          channel,
          kind,
        ]);
      }
      return conn.run(
        `INSERT INTO channel_state (channel, kind, value) VALUES (?, ?, ?)
         ON CONFLICT (channel, kind) DO UPDATE SET value = excluded.value`,
        [channel, kind, JSON.stringify(value)],
      );
    });
  }

  async addFacilitator(channel: string, platformId: string): Promise<void> {
    await this.write((conn) =>
      conn.run(
        `INSERT INTO facilitator (channel, member, platform_id) VALUES (?, ?, ?)
         ON CONFLICT (channel, member) DO UPDATE SET platform_id = excluded.platform_id`,
        [channel, this.memberKey(platformId), platformId],
      ),
    );
  }

  async removeFacilitator(channel: string, platformId: string): Promise<void> {
    await this.write((conn) =>
      conn.run("DELETE FROM facilitator WHERE channel = ? AND member = ?", [
        channel,
        this.memberKey(platformId),
      ]),
    );
  }

  async isFacilitator(channel: string, platformId: string): Promise<boolean> {
    const rows = await this.read((conn) =>
      conn.all("SELECT 1 AS found FROM facilitator WHERE channel = ? AND member = ?", [
        channel,
        this.memberKey(platformId),
      ]),
    );
    return rows.length > 0;
  }

  async listFacilitators(channel: string): Promise<string[]> {
    return this.read(async (conn) => {
      const rows = await conn.all("SELECT member FROM facilitator WHERE channel = ?", [channel]);
      const ids = await platformIds(conn, channel);
      return rows.map((r) => snapshotId(String(r.member), ids)).sort(compareStrings);
    });
  }

  async facilitatorPlatformIds(channel: string): Promise<string[]> {
    const rows = await this.read((conn) =>
      conn.all(
        "SELECT platform_id FROM facilitator WHERE channel = ? AND platform_id IS NOT NULL",
        [channel],
      ),
    );
    return rows.map((r) => String(r.platform_id)).sort(compareStrings);
  }

  claimPost(request: ClaimRequest): Promise<boolean> {
    const member = request.member ? this.memberKey(request.member) : null;
    return this.write((conn) => insertClaim(conn, request, member));
  }

  beginPost(key: ClaimKey & { claimedBy: string; now: number; leaseMs: number }): Promise<boolean> {
    return this.write((conn) => beginClaimPost(conn, key));
  }

  releasePost(key: ClaimKey & { claimedBy: string; retryAt?: number }): Promise<boolean> {
    return this.write((conn) => releaseClaimPost(conn, key));
  }

  settlePost(
    key: ClaimKey & { claimedBy: string | null; now: number; settlement: PostSettlement },
  ): Promise<boolean> {
    return this.write((conn) => settleClaimPost(conn, key));
  }

  recordMiss(request: ClaimRequest & { reason: MissReason }): Promise<boolean> {
    const member = request.member ? this.memberKey(request.member) : null;
    return this.write((conn) => insertMiss(conn, request, member));
  }

  completePost(key: ClaimKey & { claimedBy: string; platformMessageId: string }): Promise<boolean> {
    return this.write((conn) => completeClaim(conn, key));
  }

  getClaim(key: ClaimKey): Promise<PostClaim | null> {
    return this.read((conn) => readClaim(conn, key));
  }

  markMissedClaims(now: number, abandonedBefore?: number): Promise<PostClaim[]> {
    return this.write((conn) => markMissed(conn, now, abandonedBefore));
  }

  expiredClaims(
    now: number,
    kind: string,
    status: "claimed" | "posting" = "claimed",
  ): Promise<PostClaim[]> {
    return this.read((conn) => listExpired(conn, now, kind, status));
  }

  async eraseMember(channel: string, platformId: string): Promise<EraseCounts> {
    const key = this.memberKey(platformId);
    const rows = await this.write((conn) => eraseMemberRows(conn, channel, key));
    await this.driver.afterErase?.();
    return { rows };
  }

  async eraseChannel(channel: string): Promise<EraseCounts> {
    const rows = await this.write((conn) => eraseChannelRows(conn, channel));
    await this.driver.afterErase?.();
    return { rows };
  }

  async eraseWorkspace(workspace: string): Promise<EraseCounts> {
    const rows = await this.write(async (conn) => {
      const channels = await conn.all("SELECT channel FROM channel WHERE workspace = ?", [
        workspace,
      ]);
      let total = 0;
      for (const c of channels) total += await eraseChannelRows(conn, String(c.channel));
      return total;
    });
    await this.driver.afterErase?.();
    return { rows };
  }

  purge(cutoffs: PurgeCutoffs): Promise<PurgeCounts> {
    return this.write((conn) => purgeRows(conn, cutoffs));
  }

  sharedSecret(name: string): Promise<string> {
    return this.write(async (conn) => {
      await conn.run(
        "INSERT INTO plumbline_secret (name, value) VALUES (?, ?) ON CONFLICT (name) DO NOTHING",
        [name, randomSecret()],
      );
      const rows = await conn.all("SELECT value FROM plumbline_secret WHERE name = ?", [name]);
      return String(rows[0].value);
    });
  }

  async countRejected(): Promise<number> {
    const rows = await this.read((conn) => conn.all("SELECT COUNT(*) AS n FROM rejected_delivery"));
    return num(rows[0].n);
  }

  /**
   * Re-keys every row in one transaction (sql-rekey.ts) and returns the new key (chain). The
   * store's own `memberKey` keeps the old key: close it and open again with the new one.
   */
  rekey(options: RekeyOptions): Promise<{ key: string; members: number; rows: number }> {
    return this.write((conn) => rekeyRows(conn, this.driver.dialect, options));
  }

  close(): Promise<void> {
    return this.driver.close();
  }

  private read<T>(fn: (conn: SqlConnection) => Promise<T>): Promise<T> {
    return this.driver.transaction(fn, "read");
  }

  private write<T>(fn: (conn: SqlConnection) => Promise<T>): Promise<T> {
    return this.driver.transaction(fn, "write");
  }
}

async function platformIds(conn: SqlConnection, channel: string): Promise<Map<string, string>> {
  const rows = await conn.all("SELECT member, platform_id FROM named_member WHERE channel = ?", [
    channel,
  ]);
  return new Map(rows.map((r) => [String(r.member), String(r.platform_id)]));
}
