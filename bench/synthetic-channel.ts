/**
 * @module synthetic-channel
 * An invented, seeded channel for the benchmarks: N members who all consent `named`, M messages
 * spread evenly over a window (28 days by default), with skewed attention. Targets are drawn from a
 * Zipf-like popularity law (weight 1/rank^s over a seeded shuffle of the members, Zipf 1949,
 * "Human Behavior and the Principle of Least Effort"; common practice for synthetic social
 * traffic), a few hubs get extra weight, and about half of the messages answer a recent message,
 * preferably the latest one of a popular member, so reply threads form around the hubs. Authors
 * follow a flatter Zipf law, and each member's first message mentions someone, so every member has
 * an outgoing signal (no empty rows). Sampling is by binary search over cumulative weights, so a
 * channel of 200 000 messages takes well under a second.
 */
import type { ChatEvent } from "../src/domain/events.js";
import { DAY_MS } from "../src/domain/settings.js";
import { createSeededRng, type Rng } from "../src/ports/rng.js";

export interface SyntheticChannelOptions {
  readonly members: number;
  readonly messages: number;
  /** Default 1. */
  readonly seed?: number;
  /** Length of the span the messages cover; default 28. */
  readonly days?: number;
  /** Channel id; default "bench". */
  readonly channel?: string;
  /** Epoch ms of the first message; default 2026-11-02T00:00:00Z. */
  readonly start?: number;
  /** Zipf exponent of target popularity; default 1. */
  readonly popularityExponent?: number;
  /** Zipf exponent of author activity; default 0.5. */
  readonly activityExponent?: number;
  /** Members whose popularity is multiplied by `hubBoost`; default 5. */
  readonly hubs?: number;
  /** Default 4. */
  readonly hubBoost?: number;
  /** Share of messages that answer an earlier one; default 0.5. */
  readonly replyShare?: number;
  /** Share of messages that mention one or two members; default 0.4. */
  readonly mentionShare?: number;
}

export interface SyntheticChannel {
  readonly channel: string;
  /** Member ids, zero-padded so string order is index order. */
  readonly members: readonly string[];
  /** Consent events first, then messages in time order. */
  readonly events: readonly ChatEvent[];
  /** Time of the last message (the natural `until`). */
  readonly until: number;
}

/** A cumulative-weight sampler: O(log n) per draw. */
function sampler(weights: Float64Array, rng: Rng): () => number {
  const cumulative = new Float64Array(weights.length);
  let total = 0;
  for (let i = 0; i < weights.length; i++) {
    total += weights[i];
    cumulative[i] = total;
  }
  return () => {
    const u = rng.next() * total;
    let lo = 0;
    let hi = cumulative.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cumulative[mid] > u) hi = mid;
      else lo = mid + 1;
    }
    return lo;
  };
}

/** Zipf weights 1/rank^s, assigned to members in a seeded random order. */
function zipfWeights(n: number, exponent: number, rng: Rng): Float64Array {
  const order = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = Math.floor(rng.next() * (i + 1));
    [order[i], order[j]] = [order[j], order[i]];
  }
  const weights = new Float64Array(n);
  for (let rank = 0; rank < n; rank++) weights[order[rank]] = 1 / (rank + 1) ** exponent;
  return weights;
}

/** Draws from `draw` until it differs from `not` (gives up after 8 tries and takes a neighbour). */
function drawOther(draw: () => number, not: number, n: number): number {
  for (let attempt = 0; attempt < 8; attempt++) {
    const k = draw();
    if (k !== not) return k;
  }
  return (not + 1) % n;
}

/** Builds the synthetic channel described in the module header. */
export function syntheticChannel(options: SyntheticChannelOptions): SyntheticChannel {
  const n = options.members;
  const m = options.messages;
  if (!Number.isInteger(n) || n < 2) throw new RangeError(`members must be ≥ 2, got ${n}`);
  if (!Number.isInteger(m) || m < n) throw new RangeError(`messages must be ≥ members, got ${m}`);
  const rng = createSeededRng(options.seed ?? 1);
  const channel = options.channel ?? "bench";
  const start = options.start ?? Date.UTC(2026, 10, 2);
  const span = (options.days ?? 28) * DAY_MS;
  const replyShare = options.replyShare ?? 0.5;
  const mentionShare = options.mentionShare ?? 0.4;
  const width = String(n - 1).length;
  const members = Array.from({ length: n }, (_, i) => `m${String(i).padStart(width, "0")}`);

  const popularity = zipfWeights(n, options.popularityExponent ?? 1, rng);
  const hubs = Math.min(n, options.hubs ?? 5);
  const byPopularity = Array.from({ length: n }, (_, i) => i).sort(
    (a, b) => popularity[b] - popularity[a],
  );
  for (let h = 0; h < hubs; h++) popularity[byPopularity[h]] *= options.hubBoost ?? 4;
  const drawTarget = sampler(popularity, rng);
  const drawAuthor = sampler(zipfWeights(n, options.activityExponent ?? 0.5, rng), rng);

  const events: ChatEvent[] = members.map((member, i) => ({
    type: "consent",
    at: start - DAY_MS + i,
    channel,
    member,
    level: "named",
  }));
  const latestBy = new Int32Array(n).fill(-1); // message number of each member's latest message
  const authorOf = new Int32Array(m);
  const recentWindow = 64;
  let until = start;
  for (let k = 0; k < m; k++) {
    const at = start + Math.floor(((k + rng.next()) * span) / m);
    until = at;
    // The first n messages give every member one message with a mention; then authors are skewed.
    const author = k < n ? k : drawAuthor();
    authorOf[k] = author;
    let parent: number | null = null;
    if (k >= n && rng.next() < replyShare) {
      const wanted = drawOther(drawTarget, author, n);
      const candidate = latestBy[wanted];
      parent = candidate >= 0 && k - candidate <= 4 * recentWindow ? candidate : null;
      if (parent === null) parent = k - 1 - Math.floor(rng.next() * Math.min(k, recentWindow));
      if (authorOf[parent] === author) parent = null;
    }
    const mentions: string[] = [];
    if (k < n || rng.next() < mentionShare) {
      const count = k >= n && rng.next() < 0.25 ? 2 : 1;
      for (let c = 0; c < count; c++) {
        const target = members[drawOther(drawTarget, author, n)];
        if (!mentions.includes(target)) mentions.push(target);
      }
    }
    events.push({
      type: "message",
      at,
      channel,
      id: `x${k}`,
      author: members[author],
      ...(parent !== null ? { parent: `x${parent}` } : {}),
      ...(mentions.length > 0 ? { mentions } : {}),
    });
    latestBy[author] = k;
  }
  return { channel, members, events, until };
}
