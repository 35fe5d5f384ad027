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
  PostClaim,
  PurgeCounts,
  PurgeCutoffs,
  Store,
  StoreKind,
  StoreTx,
} from "../ports/store.js";
import type { MemberKeyer } from "./member-key.js";
import { LATEST_SCHEMA_VERSION, pendingMigrations } from "./migrations.js";
import { buildSnapshot, compareStrings, isConsentLevel, snapshotId } from "./snapshot.js";
import { completeClaim, insertClaim, markMissed, readClaim } from "./sql-claims.js";
import type { SqlConnection, SqlDriver } from "./sql-driver.js";
import { eraseChannelRows, eraseMemberRows, purgeRows } from "./sql-erase.js";
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
      version = migration.version;
    }
    await conn.run("UPDATE plumbline_schema SET version = ?", [version]);
    return { version, applied: pending.length };
  }, "write");
}

export class SqlStore implements Store {
  readonly kind: StoreKind;

  constructor(
    private readonly driver: SqlDriver,
    readonly memberKey: MemberKeyer,
    readonly schemaVersion: number,
  ) {
    this.kind = driver.dialect;
  }

  transaction<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> {
    return this.driver.transaction((conn) => fn(sqlTx(conn)), "write");
  }

  loadSnapshot(channel: string): Promise<LedgerSnapshot> {
    return this.driver.transaction(async (conn) => {
      const messages = await conn.all(
        "SELECT id, author, at, parent_author, deleted FROM message WHERE channel = ?",
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

  completePost(key: ClaimKey & { claimedBy: string; platformMessageId: string }): Promise<boolean> {
    return this.write((conn) => completeClaim(conn, key));
  }

  getClaim(key: ClaimKey): Promise<PostClaim | null> {
    return this.read((conn) => readClaim(conn, key));
  }

  markMissedClaims(now: number): Promise<PostClaim[]> {
    return this.write((conn) => markMissed(conn, now));
  }

  async eraseMember(channel: string, platformId: string): Promise<EraseCounts> {
    const key = this.memberKey(platformId);
    return { rows: await this.write((conn) => eraseMemberRows(conn, channel, key)) };
  }

  async eraseChannel(channel: string): Promise<EraseCounts> {
    return { rows: await this.write((conn) => eraseChannelRows(conn, channel)) };
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
    return { rows };
  }

  purge(cutoffs: PurgeCutoffs): Promise<PurgeCounts> {
    return this.write((conn) => purgeRows(conn, cutoffs));
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
