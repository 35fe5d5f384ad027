/**
 * The attacker of the disclosure tests: what a reader can work out about each member not named to
 * them from the messages they see. Written apart from src/report/disclosure.ts (it reads the
 * rendered blocks, not the module's decisions), after the intruder's computation of tabular
 * disclosure control (Hundepool et al. 2012, "Statistical Disclosure Control", Wiley, ch. 5:
 * a cell is unsafe when the published table and the intruder's own data bound it too tightly).
 *
 * The reader knows: who the active members are, each group's members, their own share, the
 * shares of members named to them. From the blocks they read: share bars (a named label gives
 * that member's share, "member r" an anonymous value), group share rows ("night 31% of …", rounded
 * to a whole percent) and the largest share (every share is at most it). Feasible share vectors:
 * anonymous values assigned to the unknown members in any order consistent with every group
 * share; without anonymous values, any shares ≥ 0 and ≤ the largest share that meet the group
 * and channel totals. The result per unknown member is the width of the range of values their
 * share can take. The quadratic effective-voices figure is not used (a limitation, stated).
 */

import type { Block } from "../../src/domain/blocks.js";

export interface Scenario {
  /** Active members with their true shares, largest first. */
  readonly members: readonly { readonly id: string; readonly share: number }[];
  /** Display labels of the members the reader knows (named to them, or themself). */
  readonly known: ReadonlyMap<string, readonly string[]>;
  /** The reader's id when they are an active member. */
  readonly reader: string | null;
  /** Group label → its active members. */
  readonly groups: ReadonlyMap<string, readonly string[]>;
  /** Members whose shares the reader knows from other answers (a facilitator's private check). */
  readonly alsoKnows?: readonly string[];
}

/** Half of a whole percent: the rounding of every percentage shown. */
const ROUNDING = 0.005;
const EPS = 1e-9;

function firstPercent(text: string): number | null {
  const m = /(<1|\d+)%/.exec(text);
  if (!m) return null;
  return m[1] === "<1" ? 0.0025 : Number(m[1]) / 100;
}

interface Readings {
  /** Known member id → share read. */
  readonly knownShares: Map<string, number>;
  /** Values of bars whose label names nobody the reader knows. */
  readonly anonymous: number[];
  /** Group label → share read (±0.005). */
  readonly groupShares: Map<string, number>;
  top: number | null;
  barsShown: boolean;
}

/** Everything the messages show, read the way a person reads them. */
export function readMessages(
  messages: readonly (readonly Block[])[],
  scenario: Scenario,
): Readings {
  const readings: Readings = {
    knownShares: new Map(),
    anonymous: [],
    groupShares: new Map(),
    top: null,
    barsShown: false,
  };
  const byLabel = new Map<string, string>();
  for (const [id, labels] of scenario.known) for (const l of labels) byLabel.set(l, id);
  let anonymousSeen = false;
  for (const blocks of messages) {
    const anonymousHere: number[] = [];
    for (const block of blocks) {
      if (block.kind === "bars") {
        readings.barsShown = true;
        for (const row of block.rows) {
          const id = byLabel.get(row.label);
          if (id !== undefined) readings.knownShares.set(id, row.value);
          else anonymousHere.push(row.value);
        }
      } else if (block.kind === "figures") {
        for (const row of block.rows) {
          const label = row.label.trim();
          if (label === "Largest share") {
            const top = firstPercent(row.value);
            if (top !== null) readings.top = top;
            const who = row.detail?.split("; ").at(-1);
            const id = who === undefined ? undefined : byLabel.get(who);
            if (id !== undefined && top !== null && !readings.knownShares.has(id)) {
              readings.knownShares.set(id, top);
            }
          }
          if (scenario.groups.has(label)) {
            const share = firstPercent(row.value);
            if (share !== null) readings.groupShares.set(label, share);
          }
        }
      } else if (block.kind === "note") {
        // A note that names a group beside a percentage is read as that group's share.
        for (const label of scenario.groups.keys()) {
          const at = block.text.indexOf(`${label} `);
          if (at >= 0) {
            const share = firstPercent(block.text.slice(at + label.length));
            if (share !== null && !readings.groupShares.has(label)) {
              readings.groupShares.set(label, share);
            }
          }
        }
      }
    }
    // Several messages of one period show the same anonymous values: keep one copy.
    if (!anonymousSeen && anonymousHere.length > 0) {
      readings.anonymous.push(...anonymousHere);
      anonymousSeen = true;
    }
  }
  return readings;
}

/** Width of the range each unknown member's share can take, given the messages. */
export function inferredWidths(
  messages: readonly (readonly Block[])[],
  scenario: Scenario,
): Map<string, number> {
  const r = readMessages(messages, scenario);
  const truth = new Map(scenario.members.map((m) => [m.id, m.share]));
  // The reader always knows their own share (they can ask for it privately), and whatever other
  // answers told them; an anonymous bar with that value is recognised as theirs.
  const extra = [
    ...(scenario.reader === null ? [] : [scenario.reader]),
    ...(scenario.alsoKnows ?? []),
  ];
  for (const id of extra) {
    if (!truth.has(id) || r.knownShares.has(id)) continue;
    const own = truth.get(id) ?? 0;
    r.knownShares.set(id, own);
    if (r.anonymous.length > 0) {
      let closest = 0;
      r.anonymous.forEach((v, i) => {
        if (Math.abs(v - own) < Math.abs(r.anonymous[closest] - own)) closest = i;
      });
      r.anonymous.splice(closest, 1);
    }
  }
  const unknown = scenario.members.map((m) => m.id).filter((id) => !r.knownShares.has(id));
  const widths = new Map<string, number>();
  if (unknown.length === 0) return widths;
  const groups = [...r.groupShares].map(([label, share]) => ({
    members: scenario.groups.get(label) ?? [],
    share,
  }));
  if (r.anonymous.length === unknown.length && unknown.length > 0) {
    const low = new Map(unknown.map((id) => [id, Number.POSITIVE_INFINITY]));
    const high = new Map(unknown.map((id) => [id, Number.NEGATIVE_INFINITY]));
    const assignment = new Map<string, number>(r.knownShares);
    const used = new Array<boolean>(r.anonymous.length).fill(false);
    const fits = () =>
      groups.every(({ members, share }) => {
        let sum = 0;
        for (const m of members) sum += assignment.get(m) ?? 0;
        return Math.abs(sum - share) <= ROUNDING + EPS;
      });
    const place = (k: number) => {
      if (k === unknown.length) {
        if (!fits()) return;
        for (const id of unknown) {
          const v = assignment.get(id) ?? 0;
          low.set(id, Math.min(low.get(id) ?? v, v));
          high.set(id, Math.max(high.get(id) ?? v, v));
        }
        return;
      }
      const tried = new Set<number>();
      for (let j = 0; j < r.anonymous.length; j++) {
        if (used[j] || tried.has(r.anonymous[j])) continue;
        tried.add(r.anonymous[j]);
        used[j] = true;
        assignment.set(unknown[k], r.anonymous[j]);
        place(k + 1);
        used[j] = false;
      }
      assignment.delete(unknown[k]);
    };
    place(0);
    for (const id of unknown) widths.set(id, (high.get(id) ?? 0) - (low.get(id) ?? 0));
    return widths;
  }
  // No anonymous values: the group totals and the channel's 100% split the members into parts.
  const top = (r.top ?? 1) + ROUNDING;
  const inGroup = new Map<string, number>();
  groups.forEach((g, i) => {
    for (const m of g.members) inGroup.set(m, i);
  });
  const knownSum = (ids: readonly string[]) =>
    ids.reduce((acc, id) => acc + (r.knownShares.get(id) ?? 0), 0);
  const rest = scenario.members.map((m) => m.id).filter((id) => !inGroup.has(id));
  const parts = [
    ...groups.map((g) => ({ members: g.members, total: g.share, slack: ROUNDING })),
    {
      members: rest,
      total: 1 - groups.reduce((acc, g) => acc + g.share, 0),
      slack: ROUNDING * groups.length,
    },
  ];
  for (const part of parts) {
    const open = part.members.filter((id) => !r.knownShares.has(id));
    if (open.length === 0) continue;
    const sum = part.total - knownSum(part.members);
    const lowSum = Math.max(0, sum - part.slack);
    const highSum = sum + part.slack;
    const low = Math.max(0, lowSum - (open.length - 1) * top);
    const high = Math.min(highSum, top);
    for (const id of open) widths.set(id, Math.max(0, high - low));
  }
  return widths;
}

/**
 * What the accepted release alone says about each unknown member: the channel's largest share and
 * the reader's own share, and, where at least k members are unknown, their anonymous values.
 */
export function baselineWidths(scenario: Scenario, k: number, top: number): Map<string, number> {
  const knownIds = new Set([...scenario.known.keys(), ...(scenario.alsoKnows ?? [])]);
  if (scenario.reader !== null) knownIds.add(scenario.reader);
  const unknown = scenario.members.filter((m) => !knownIds.has(m.id));
  const own = scenario.members.find((m) => m.id === scenario.reader)?.share ?? 0;
  const others = scenario.members.filter((m) => m.id !== scenario.reader).length;
  const sum = 1 - own;
  // The largest share as the message writes it: a whole percent.
  const shown = Math.round(top * 100) / 100;
  const continuous =
    Math.min(sum, shown + ROUNDING) - Math.max(0, sum - (others - 1) * (shown + ROUNDING));
  const values = unknown.map((m) => m.share);
  const anonymous =
    unknown.length >= k ? Math.max(...values) - Math.min(...values) : Number.POSITIVE_INFINITY;
  return new Map(unknown.map((m) => [m.id, Math.min(continuous, anonymous)]));
}
