/**
 * @module memory-store
 * The in-memory `Store` for tests and the console: the same contract as the SQL stores, kept in
 * maps. A transaction records an undo step for every write and replays them backwards when its
 * function throws, so a failed event leaves nothing behind, as in the databases.
 */
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
  StoreTx,
} from "../ports/store.js";
import { missedMarker } from "../ports/store.js";
import { createMemberKeyer, type MemberKeyer, randomSecret } from "./member-key.js";
import { emptyChannel, type MemoryState, memoryTx } from "./memory-tx.js";
import { buildSnapshot, compareStrings, snapshotId } from "./snapshot.js";
import { Mutex } from "./sql-driver.js";

export interface MemoryStoreOptions {
  /** The member id key (at least 32 characters). */
  readonly idKey: string;
}

/** A fresh, empty in-memory store. */
export function createMemoryStore(options: MemoryStoreOptions): Store {
  return new MemoryStore(createMemberKeyer(options.idKey));
}

class MemoryStore implements Store {
  readonly kind = "memory" as const;
  readonly schemaVersion = 0;
  private readonly state: MemoryState = {
    deliveries: new Map(),
    rejected: new Map(),
    channels: new Map(),
    rows: new Map(),
  };
  private readonly claims = new Map<string, PostClaim>();
  private readonly secrets = new Map<string, string>();
  private readonly mutex = new Mutex();

  constructor(readonly memberKey: MemberKeyer) {}

  transaction<T>(fn: (tx: StoreTx) => Promise<T>): Promise<T> {
    return this.mutex.run(async () => {
      const undo: (() => void)[] = [];
      try {
        return await fn(memoryTx(this.state, undo));
      } catch (error) {
        for (let i = undo.length - 1; i >= 0; i--) undo[i]();
        throw error;
      }
    });
  }

  async loadSnapshot(channel: string): Promise<LedgerSnapshot> {
    const c = this.state.channels.get(channel) ?? emptyChannel();
    return buildSnapshot({
      channel,
      messages: [...c.messages.values()],
      consent: c.consent,
      groups: c.groups,
      formats: c.formats,
      platformIds: c.named,
      lastEventAt: this.state.rows.get(channel)?.lastEventAt ?? null,
    });
  }

  async registerChannel(channel: string, workspace: string | null): Promise<void> {
    const row = this.state.rows.get(channel);
    this.state.rows.set(channel, { workspace, lastEventAt: row?.lastEventAt ?? null });
  }

  async listChannels(): Promise<ChannelInfo[]> {
    return [...this.state.rows.entries()]
      .map(([channel, row]) => ({ channel, ...row }))
      .sort((a, b) => compareStrings(a.channel, b.channel));
  }

  async readChannelState(channel: string, kind: ChannelStateKind): Promise<unknown> {
    const text = this.state.channels.get(channel)?.state.get(kind);
    return text === undefined ? null : (JSON.parse(text) as unknown);
  }

  async writeChannelState(channel: string, kind: ChannelStateKind, value: unknown): Promise<void> {
    const c = this.channel(channel);
    if (value === null || value === undefined) c.state.delete(kind);
    else c.state.set(kind, JSON.stringify(value));
  }

  async addFacilitator(channel: string, platformId: string): Promise<void> {
    this.channel(channel).facilitators.set(this.memberKey(platformId), platformId);
  }

  async removeFacilitator(channel: string, platformId: string): Promise<void> {
    this.state.channels.get(channel)?.facilitators.delete(this.memberKey(platformId));
  }

  async isFacilitator(channel: string, platformId: string): Promise<boolean> {
    return this.state.channels.get(channel)?.facilitators.has(this.memberKey(platformId)) ?? false;
  }

  async listFacilitators(channel: string): Promise<string[]> {
    const c = this.state.channels.get(channel);
    if (c === undefined) return [];
    return [...c.facilitators.keys()].map((k) => snapshotId(k, c.named)).sort(compareStrings);
  }

  async facilitatorPlatformIds(channel: string): Promise<string[]> {
    const c = this.state.channels.get(channel);
    return c === undefined ? [] : [...c.facilitators.values()].sort(compareStrings);
  }

  async claimPost(request: ClaimRequest): Promise<boolean> {
    const id = claimId(request);
    const held = this.claims.get(id);
    if (!takeable(held, request.now)) {
      return false;
    }
    this.claims.set(id, {
      channel: request.channel,
      kind: request.kind,
      period: request.period,
      claimedBy: request.claimedBy,
      claimedAt: request.now,
      leaseUntil: request.now + request.leaseMs,
      status: "claimed",
      platformMessageId: null,
      member: request.member ? this.memberKey(request.member) : null,
    });
    return true;
  }

  async beginPost(
    key: ClaimKey & { claimedBy: string; now: number; leaseMs: number },
  ): Promise<boolean> {
    const claim = this.claims.get(claimId(key));
    if (claim === undefined || claim.claimedBy !== key.claimedBy || claim.status !== "claimed") {
      return false;
    }
    this.claims.set(claimId(key), {
      ...claim,
      status: "posting",
      leaseUntil: key.now + key.leaseMs,
    });
    return true;
  }

  async releasePost(key: ClaimKey & { claimedBy: string; retryAt?: number }): Promise<boolean> {
    const claim = this.claims.get(claimId(key));
    if (claim === undefined || claim.claimedBy !== key.claimedBy || claim.status !== "posting") {
      return false;
    }
    this.claims.set(claimId(key), {
      ...claim,
      status: "claimed",
      leaseUntil: key.retryAt ?? claim.leaseUntil,
    });
    return true;
  }

  async settlePost(
    key: ClaimKey & { claimedBy: string | null; now: number; settlement: PostSettlement },
  ): Promise<boolean> {
    const claim = this.claims.get(claimId(key));
    if (claim === undefined || claim.status !== "posting") return false;
    if (
      key.claimedBy === null ? !(claim.leaseUntil < key.now) : claim.claimedBy !== key.claimedBy
    ) {
      return false;
    }
    const { settlement } = key;
    this.claims.set(claimId(key), {
      ...claim,
      status: settlement.status,
      platformMessageId:
        settlement.status === "posted"
          ? settlement.platformMessageId
          : settlement.status === "missed"
            ? missedMarker(settlement.reason)
            : null,
    });
    return true;
  }

  async recordMiss(request: ClaimRequest & { reason: MissReason }): Promise<boolean> {
    const id = claimId(request);
    const held = this.claims.get(id);
    if (!takeable(held, request.now)) {
      return false;
    }
    this.claims.set(id, {
      channel: request.channel,
      kind: request.kind,
      period: request.period,
      claimedBy: request.claimedBy,
      claimedAt: held?.claimedAt ?? request.now,
      leaseUntil: held?.leaseUntil ?? request.now,
      status: "missed",
      platformMessageId: missedMarker(request.reason),
      member: held?.member ?? (request.member ? this.memberKey(request.member) : null),
    });
    return true;
  }

  async completePost(
    key: ClaimKey & { claimedBy: string; platformMessageId: string },
  ): Promise<boolean> {
    const claim = this.claims.get(claimId(key));
    if (claim === undefined || claim.claimedBy !== key.claimedBy || claim.status === "posted") {
      return false;
    }
    this.claims.set(claimId(key), {
      ...claim,
      status: "posted",
      platformMessageId: key.platformMessageId,
    });
    return true;
  }

  async getClaim(key: ClaimKey): Promise<PostClaim | null> {
    return this.claims.get(claimId(key)) ?? null;
  }

  async expiredClaims(
    now: number,
    kind: string,
    status: "claimed" | "posting" = "claimed",
  ): Promise<PostClaim[]> {
    return [...this.claims.values()]
      .filter((c) => c.status === status && c.kind === kind && c.leaseUntil < now)
      .sort((a, b) => compareStrings(claimId(a), claimId(b)));
  }

  async markMissedClaims(now: number, abandonedBefore?: number): Promise<PostClaim[]> {
    const missed: PostClaim[] = [];
    for (const [id, claim] of this.claims) {
      const unknown = claim.status === "posting" && claim.leaseUntil < now;
      const abandoned =
        abandonedBefore !== undefined &&
        claim.status === "claimed" &&
        claim.leaseUntil < abandonedBefore;
      if (unknown || abandoned) {
        const updated: PostClaim = {
          ...claim,
          status: "missed",
          platformMessageId: missedMarker(unknown ? "outcome unknown" : "not taken over"),
        };
        this.claims.set(id, updated);
        missed.push(updated);
      }
    }
    return missed.sort((a, b) => compareStrings(claimId(a), claimId(b)));
  }

  async eraseMember(channel: string, platformId: string): Promise<EraseCounts> {
    const key = this.memberKey(platformId);
    const c = this.state.channels.get(channel);
    let rows = 0;
    if (c !== undefined) {
      for (const [id, m] of c.messages) {
        if (m.author === key) {
          rows += 1 + m.mentions.length;
          c.messages.delete(id);
          continue;
        }
        const kept = m.mentions.filter((t) => t !== key);
        rows += m.mentions.length - kept.length + (m.parentAuthor === key ? 1 : 0);
        c.messages.set(id, {
          ...m,
          mentions: kept,
          parentAuthor: m.parentAuthor === key ? null : m.parentAuthor,
        });
      }
      const before = c.consent.length + c.groups.length;
      c.consent = c.consent.filter((x) => x.member !== key);
      c.groups = c.groups.filter((x) => x.member !== key);
      rows += before - c.consent.length - c.groups.length;
      if (c.facilitators.delete(key)) rows++;
      if (c.named.delete(key)) rows++;
    }
    for (const [digest, d] of this.state.deliveries) {
      if (d.channel === channel && d.member === key) {
        this.state.deliveries.delete(digest);
        rows++;
      }
    }
    for (const [id, claim] of this.claims) {
      if (claim.channel === channel && claim.member === key) {
        this.claims.delete(id);
        rows++;
      }
    }
    return { rows };
  }

  async eraseChannel(channel: string): Promise<EraseCounts> {
    let rows = 0;
    const c = this.state.channels.get(channel);
    if (c !== undefined) {
      for (const m of c.messages.values()) rows += 1 + m.mentions.length;
      rows +=
        c.consent.length +
        c.groups.length +
        c.formats.length +
        c.named.size +
        c.facilitators.size +
        c.state.size;
      this.state.channels.delete(channel);
    }
    if (this.state.rows.delete(channel)) rows++;
    for (const [digest, d] of this.state.deliveries) {
      if (d.channel === channel) {
        this.state.deliveries.delete(digest);
        rows++;
      }
    }
    for (const [id, claim] of this.claims) {
      if (claim.channel === channel) {
        this.claims.delete(id);
        rows++;
      }
    }
    return { rows };
  }

  async eraseWorkspace(workspace: string): Promise<EraseCounts> {
    let rows = 0;
    for (const [channel, row] of [...this.state.rows]) {
      if (row.workspace === workspace) rows += (await this.eraseChannel(channel)).rows;
    }
    return { rows };
  }

  async purge(cutoffs: PurgeCutoffs): Promise<PurgeCounts> {
    let messages = 0;
    let deliveries = 0;
    for (const c of this.state.channels.values()) {
      for (const [id, m] of c.messages) {
        if (m.at < cutoffs.ledgerBefore) {
          c.messages.delete(id);
          messages++;
        }
      }
    }
    for (const [key, d] of this.state.deliveries) {
      if (d.at < cutoffs.deliveriesBefore) {
        this.state.deliveries.delete(key);
        deliveries++;
      }
    }
    for (const [key, r] of this.state.rejected) {
      if (r.at < cutoffs.deliveriesBefore) this.state.rejected.delete(key);
    }
    return { messages, deliveries };
  }

  async sharedSecret(name: string): Promise<string> {
    let secret = this.secrets.get(name);
    if (secret === undefined) {
      secret = randomSecret();
      this.secrets.set(name, secret);
    }
    return secret;
  }

  async countRejected(): Promise<number> {
    return this.state.rejected.size;
  }

  async close(): Promise<void> {}

  private channel(channel: string) {
    let c = this.state.channels.get(channel);
    if (c === undefined) {
      c = emptyChannel();
      this.state.channels.set(channel, c);
    }
    return c;
  }
}

function claimId(key: ClaimKey): string {
  return `${key.channel}\u0000${key.kind}\u0000${key.period}`;
}

/** A claim slot is free, or holds an unposted claim whose lease has ended (it may be taken over). */
function takeable(held: PostClaim | undefined, now: number): boolean {
  return held === undefined || (held.status === "claimed" && held.leaseUntil < now);
}
