/**
 * Test helpers: an `AnalysisReport` with given shares, consent and group labels (groups' shares
 * are the sums of their members' shares, as DESIGN.md §4.9 defines them), and the scenario the
 * attacker of reader-inference.ts works from for one reader.
 */
import type { AnalysisReport, GroupFigure, InfluenceEntry } from "../../src/domain/report.js";
import type { NamingPolicy } from "../../src/report/naming.js";
import type { Scenario } from "./reader-inference.js";

export interface SyntheticMember {
  readonly id: string;
  readonly share: number;
  readonly named: boolean;
  readonly label: string | null;
}

const round6 = (x: number) => Math.round(x * 1e6) / 1e6;

/** Members from raw positive weights: shares normalised and sorted largest first. */
export function membersFrom(
  weights: readonly number[],
  named: readonly boolean[],
  labels: readonly (string | null)[],
): SyntheticMember[] {
  const total = weights.reduce((a, b) => a + b, 0);
  return weights
    .map((w, i) => ({
      id: `u${i + 1}`,
      share: round6(w / total),
      named: named[i] ?? false,
      label: labels[i] ?? null,
    }))
    .sort((a, b) => b.share - a.share || (a.id < b.id ? -1 : 1));
}

export function syntheticReport(members: readonly SyntheticMember[]): AnalysisReport {
  const n = members.length;
  const influence: InfluenceEntry[] = members.map((m) => ({
    member: m.id,
    share: m.share,
    low: Math.max(0, m.share - 0.05),
    high: Math.min(1, m.share + 0.05),
    pAbove: m.share >= 0.3 ? 0.9 : 0.1,
    attentionReceived: 1,
    named: m.named,
  }));
  const byLabel = new Map<string, SyntheticMember[]>();
  for (const m of members) {
    if (m.label === null) continue;
    byLabel.set(m.label, [...(byLabel.get(m.label) ?? []), m]);
  }
  const groups: GroupFigure[] = [...byLabel]
    .map(([group, list]) => {
      const share = round6(list.reduce((a, m) => a + m.share, 0));
      return {
        group,
        members: list.length,
        share,
        low: Math.max(0, share - 0.05),
        high: Math.min(1, share + 0.05),
        headcountShare: round6(list.length / n),
      };
    })
    .sort((a, b) => b.share - a.share || (a.group < b.group ? -1 : 1));
  const top = influence[0];
  const sumSquares = members.reduce((a, m) => a + m.share * m.share, 0);
  const crossed = top.share >= 0.3;
  return {
    version: 1,
    channel: "c1",
    broadcasts: 0,
    window: {
      from: "2026-10-05T09:00:00.000Z",
      until: "2026-11-02T09:00:00.000Z",
      days: 28,
      halfLifeDays: 14,
    },
    settings: {
      replyWeight: 1,
      mentionWeight: 1,
      background: 1,
      priorStrength: 1,
      posterior: "exact",
      selfWeight: 0.5,
      samples: 400,
      interval: 0.9,
      seed: 1,
      threshold: 0.3,
      thresholdMode: "fixed",
      confidence: 0.8,
    },
    status: "ok",
    members: n,
    signals: 100,
    sufficient: true,
    needed: null,
    influence,
    top: { member: top.member, share: top.share, low: top.low, high: top.high, pAbove: 0.9 },
    effectiveVoices: { value: 1 / sumSquares, low: 1 / sumSquares - 0.5, high: 1 / sumSquares },
    balance: 1 / sumSquares / n,
    hhi: n >= 7 ? Math.round(10000 * sumSquares) : null,
    concentration: null,
    consensus: { closedGroups: 1, reached: true, secondEigenvalue: 0.5, roundsToHalve: 1 },
    contributors: [],
    groups: groups.length > 0 ? groups : null,
    clusters: null,
    line: { threshold: 0.3, crossed, member: crossed ? top.member : null, probability: 0.9 },
  };
}

/** Display name of a member id in these tests. */
export const nameOf = (id: string) => `Name-${id}`;

/** The naming policy of one reader (undefined reader = a channel post). */
export function policyFor(args: {
  members: readonly SyntheticMember[];
  namesOn: boolean;
  reader?: string;
  minMembers: number;
  facilitator?: boolean;
}): NamingPolicy {
  const labels = new Map(args.members.map((m) => [m.id, m.label]));
  return {
    namesOn: args.namesOn,
    ...(args.reader === undefined ? {} : { reader: args.reader }),
    displayName: nameOf,
    disclosure: {
      minMembers: args.minMembers,
      groupOf: (id) => labels.get(id) ?? null,
      ...(args.facilitator ? { facilitator: true } : {}),
    },
  };
}

/** The attacker's scenario for one reader (null = someone outside the active members). */
export function scenarioFor(
  members: readonly SyntheticMember[],
  namesOn: boolean,
  reader: string | null,
): Scenario {
  const known = new Map<string, string[]>();
  for (const m of members) {
    const labels: string[] = [];
    if (namesOn && m.named) labels.push(nameOf(m.id));
    if (m.id === reader) labels.push(`you (${nameOf(m.id)})`);
    if (labels.length > 0) known.set(m.id, labels);
  }
  const groups = new Map<string, string[]>();
  for (const m of members) {
    if (m.label !== null) groups.set(m.label, [...(groups.get(m.label) ?? []), m.id]);
  }
  return {
    members: members.map((m) => ({ id: m.id, share: m.share })),
    known,
    reader,
    groups,
  };
}
