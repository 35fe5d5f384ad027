/**
 * @module group-membership
 * Group labels as the disclosure rules need them (DESIGN.md §7): each member's label at a report's
 * `until`, and the labels whose membership changed within the window after the group already had
 * k members, so that two answers of one period cannot differ by a few members' shares.
 */

import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import { type DisclosureInput, disclosureK } from "./disclosure.js";

/** Each member's label after the changes with `at` ≤ `until`, in applied order. */
export function labelsAt(snapshot: LedgerSnapshot, until: number): Map<string, string | null> {
  const labels = new Map<string, string | null>();
  for (const change of snapshot.groups) {
    if (change.at <= until) labels.set(change.member, change.group);
  }
  return labels;
}

function membersOf(labels: ReadonlyMap<string, string | null>, label: string): string {
  return [...labels]
    .filter(([, l]) => l === label)
    .map(([m]) => m)
    .sort()
    .join("\n");
}

/**
 * Labels whose membership at some moment in (from, until) had at least k members and differs
 * from their membership at `until`.
 */
export function unsettledGroups(
  snapshot: LedgerSnapshot,
  window: { from: number; until: number },
  k: number,
): string[] {
  const final = labelsAt(snapshot, window.until);
  const finalLabels = new Set([...final.values()].filter((l): l is string => l !== null));
  const unsettled = new Set<string>();
  const times = [
    window.from,
    ...snapshot.groups.map((c) => c.at).filter((t) => t > window.from && t < window.until),
  ];
  const seen = new Set<number>();
  for (const t of times) {
    if (seen.has(t)) continue;
    seen.add(t);
    const then = labelsAt(snapshot, t);
    const thenLabels = new Set([...then.values()].filter((l): l is string => l !== null));
    for (const label of new Set([...thenLabels, ...finalLabels])) {
      const before = [...then.values()].filter((l) => l === label).length;
      if (before >= k && membersOf(then, label) !== membersOf(final, label)) unsettled.add(label);
    }
  }
  return [...unsettled].sort();
}

/** The disclosure inputs for one report of a channel's snapshot. */
export function disclosureInput(args: {
  snapshot: LedgerSnapshot;
  report: AnalysisReport;
  minMembers: number;
  facilitator?: boolean;
}): DisclosureInput {
  const { snapshot, report, minMembers } = args;
  const until = Date.parse(report.window.until);
  const from = Date.parse(report.window.from);
  const labels = labelsAt(snapshot, until);
  return {
    minMembers,
    groupOf: (member) => labels.get(member) ?? null,
    unsettledGroups: unsettledGroups(snapshot, { from, until }, disclosureK(minMembers)),
    ...(args.facilitator ? { facilitator: true } : {}),
  };
}
