/**
 * @module simulate-channel
 * Turns a known attention matrix into the neutral events of DESIGN.md §3 and replays them through
 * the product's own ledger (`ChannelLedger`), so the analysis sees exactly what the CLI would see
 * from a log. Everyone consents `named` a day before the window; each member writes one root
 * message at the window's start (so every member is active and replies have parents); then
 * N = ratio · n signals follow at uniformly spread times: the sender is uniform over the members,
 * the target is drawn from the sender's true row, and each signal is, with probability ½, a reply
 * to the target's root message, else a message mentioning the target. Each message therefore
 * carries exactly one signal.
 */
import { ChannelLedger } from "../../src/attention/channel-ledger.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { createSeededRng, type Rng } from "../../src/ports/rng.js";
import type { TrueChannel, TrueRow } from "./true-matrix.js";

/** The window's end for every simulated channel (an invented date). */
export const SIMULATED_UNTIL = Date.UTC(2026, 10, 30, 12, 0, 0);

export interface SimulateOptions {
  readonly truth: TrueChannel;
  /** Signals per member, N/n. */
  readonly ratio: number;
  readonly seed: number;
  readonly channel: string;
  /** Window length in days the signals are spread over (the analysis window). */
  readonly windowDays: number;
}

export interface SimulatedChannel {
  readonly snapshot: LedgerSnapshot;
  readonly until: number;
  /** Member ids, zero-padded so sorted id order is index order. */
  readonly members: readonly string[];
  /** Signals emitted per sender (the expected-count estimate uses their mean). */
  readonly signals: number;
}

/** Member id of index i among n: zero-padded so string order is index order. */
export function memberId(i: number, n: number): string {
  return `u${String(i).padStart(String(n - 1).length, "0")}`;
}

function drawFromRow(row: TrueRow, rng: Rng): number {
  const u = rng.next();
  let acc = 0;
  const { targets, probs } = row;
  for (let k = 0; k < targets.length; k++) {
    acc += probs[k];
    if (u < acc) return targets[k];
  }
  return targets[targets.length - 1];
}

/** Cumulative rows for O(log d) target draws on dense rows. */
function rowSampler(row: TrueRow): (rng: Rng) => number {
  if (row.targets.length <= 16) return (rng) => drawFromRow(row, rng);
  const cumulative = new Float64Array(row.probs.length);
  let acc = 0;
  for (let k = 0; k < row.probs.length; k++) {
    acc += row.probs[k];
    cumulative[k] = acc;
  }
  return (rng) => {
    const u = rng.next() * acc;
    let lo = 0;
    let hi = cumulative.length - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cumulative[mid] > u) hi = mid;
      else lo = mid + 1;
    }
    return row.targets[lo];
  };
}

/** Simulates one channel (see the module header) and returns its ledger snapshot. */
export function simulateChannel(options: SimulateOptions): SimulatedChannel {
  const { truth, channel } = options;
  const n = truth.n;
  const rng = createSeededRng(options.seed);
  const until = SIMULATED_UNTIL;
  const windowMs = options.windowDays * DAY_MS;
  const start = until - windowMs + 60_000; // one minute into the window
  const members = Array.from({ length: n }, (_, i) => memberId(i, n));
  const ledger = new ChannelLedger(channel);
  const apply = (event: ChatEvent) => ledger.apply(event);
  members.forEach((member, i) => {
    apply({ type: "consent", at: start - DAY_MS + i, channel, member, level: "named" });
  });
  members.forEach((member, i) => {
    apply({ type: "message", at: start + i, channel, id: `r${i}`, author: member });
  });
  const count = Math.round(options.ratio * n);
  const first = start + n; // after every root
  const span = until - first;
  const times = Float64Array.from({ length: count }, () => first + 1 + rng.next() * (span - 1));
  times.sort();
  const samplers = truth.rows.map(rowSampler);
  for (let k = 0; k < count; k++) {
    const from = Math.floor(rng.next() * n);
    const to = samplers[from](rng);
    const at = Math.floor(times[k]);
    const author = members[from];
    if (rng.next() < 0.5) {
      apply({ type: "message", at, channel, id: `s${k}`, author, parent: `r${to}` });
    } else {
      apply({ type: "message", at, channel, id: `s${k}`, author, mentions: [members[to]] });
    }
  }
  return { snapshot: ledger.snapshot(), until, members, signals: count };
}
