/**
 * @module member-view
 * One member as the channel's snapshot and reports see them. Snapshots name a member by platform
 * id only while their consent is `named`; everyone else appears as "~" + their member key. This
 * module finds a member under either id, reads their consent at a time (rule 1 of
 * docs/event-semantics.md) and builds the naming policy for a reader.
 */
import type { ConsentLevel } from "../domain/events.js";
import type { ConsentChange, LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import { PSEUDONYM_PREFIX, type Store } from "../ports/store.js";
import { disclosureInput } from "../report/group-membership.js";
import type { NamingPolicy } from "../report/naming.js";
import type { CommandDeps } from "./command-types.js";

/** The ids a platform id can have in a snapshot: itself, or "~" + its member key. */
export function snapshotIds(store: Store, platformId: string): [string, string] {
  return [platformId, PSEUDONYM_PREFIX + store.memberKey(platformId)];
}

/** Rule 1: the latest applied change with `at` ≤ `at` (ties: the later applied), per member. */
export function consentChangeAt(
  snapshot: LedgerSnapshot,
  ids: readonly string[],
  at: number,
): ConsentChange | null {
  let best: ConsentChange | null = null;
  for (const change of snapshot.consent) {
    if (!ids.includes(change.member) || change.at > at) continue;
    if (best === null || change.at >= best.at) best = change;
  }
  return best;
}

export function consentAt(
  snapshot: LedgerSnapshot,
  ids: readonly string[],
  at: number,
): ConsentLevel {
  return consentChangeAt(snapshot, ids, at)?.level ?? "off";
}

/** How many members have consent `counted` or `named` at `at`. */
export function optedInCount(snapshot: LedgerSnapshot, at: number): number {
  const members = new Set(snapshot.consent.map((c) => c.member));
  let count = 0;
  for (const member of members) if (consentAt(snapshot, [member], at) !== "off") count++;
  return count;
}

/** The reader's id in this snapshot (the platform id when kept, else the pseudonym). */
export function readerId(store: Store, snapshot: LedgerSnapshot, platformId: string): string {
  const [plain, pseudonym] = snapshotIds(store, platformId);
  return snapshot.consent.some((c) => c.member === plain) ? plain : pseudonym;
}

/** Members whose label a summary may show: the bars, the top, the line and the contributors. */
function shownMembers(report: AnalysisReport): string[] {
  const ids = new Set<string>();
  for (const e of (report.influence ?? []).slice(0, 20)) ids.add(e.member);
  for (const c of (report.contributors ?? []).slice(0, 5)) ids.add(c.member);
  if (report.top) ids.add(report.top.member);
  if (report.line?.member) ids.add(report.line.member);
  return [...ids];
}

/**
 * The naming policy for one audience, with display names looked up beforehand (the policy's
 * lookup is synchronous). `reader` is the reading member, if the answer is private. With the
 * channel's snapshot and `minMembers` the policy carries the disclosure inputs (group membership,
 * k); without them the disclosure rules fall back to hiding every group beside shares.
 */
export async function namingPolicy(args: {
  report: AnalysisReport;
  deps: CommandDeps;
  namesOn: boolean;
  reader?: { id: string; platformId: string };
  disclosure?: { snapshot: LedgerSnapshot; minMembers: number; facilitator?: boolean };
}): Promise<NamingPolicy> {
  const { report, deps, namesOn, reader } = args;
  const named = new Set((report.influence ?? []).filter((e) => e.named).map((e) => e.member));
  const lookups = namesOn
    ? shownMembers(report).filter((m) => named.has(m) && !m.startsWith(PSEUDONYM_PREFIX))
    : [];
  const names = new Map<string, string>();
  const lookup = async (key: string, platformId: string) => {
    const name = (await deps.displayName?.(platformId)) ?? null;
    if (name !== null) names.set(key, name);
  };
  await Promise.all(lookups.map((m) => lookup(m, m)));
  if (reader) await lookup(reader.id, reader.platformId);
  return {
    namesOn,
    ...(reader ? { reader: reader.id } : {}),
    ...(args.disclosure ? { disclosure: disclosureInput({ report, ...args.disclosure }) } : {}),
    displayName: (member) =>
      names.get(member) ?? (reader && member === reader.id ? reader.platformId : member),
  };
}
