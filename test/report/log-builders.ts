/**
 * Test helpers: build neutral logs (DESIGN.md §3) from pairs of attention, and analyse them
 * through the whole path (reader → ledger → signals → report).
 */
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import type { ChatEvent, ConsentLevel } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";

export const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);

/** Events where `from` mentions `to` once per unit of `weight` (whole numbers), all at T0 + k s. */
export function mentionEvents(
  pairs: readonly (readonly [string, string, number])[],
  options: { channel?: string; consent?: ConsentLevel | ((member: string) => ConsentLevel) } = {},
): ChatEvent[] {
  const channel = options.channel ?? "c1";
  const members = [...new Set(pairs.map((p) => p[0]).concat(pairs.map((p) => p[1])))].sort();
  const level = (m: string): ConsentLevel =>
    typeof options.consent === "function" ? options.consent(m) : (options.consent ?? "named");
  const events: ChatEvent[] = members.map((member, k) => ({
    type: "consent",
    at: T0 - 3_600_000 + k,
    channel,
    member,
    level: level(member),
  }));
  let id = 0;
  for (const [from, to, weight] of pairs) {
    for (let w = 0; w < weight; w++) {
      id++;
      events.push({
        type: "message",
        at: T0 + id * 1000,
        channel,
        id: `m${id}`,
        author: from,
        mentions: [to],
      });
    }
  }
  return events;
}

export function snapshotOf(events: readonly ChatEvent[], channel = "c1"): LedgerSnapshot {
  const snapshot = buildLedgers(events).get(channel);
  if (!snapshot) throw new Error(`no channel ${channel}`);
  return snapshot;
}

/** Mutual attention along undirected ties: u→v and v→u, `weight` times each. */
export function mutualPairs(
  ties: readonly (readonly [string, string])[],
  weight = 1,
): [string, string, number][] {
  return ties.flatMap(([u, v]) => [
    [u, v, weight] as [string, string, number],
    [v, u, weight] as [string, string, number],
  ]);
}

export function writeLog(events: readonly ChatEvent[], name = "log.jsonl"): string {
  const dir = mkdtempSync(join(tmpdir(), "plumbline-test-"));
  const path = join(dir, name);
  writeFileSync(
    path,
    `${events.map((e) => JSON.stringify({ ...e, at: new Date(e.at).toISOString() })).join("\n")}\n`,
  );
  return path;
}
