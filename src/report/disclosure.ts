/**
 * @module disclosure
 * Disclosure control for every message (DESIGN.md §7): no message lets a reader work out an
 * unnamed member's share to within ±5 points. The method is primary and complementary cell
 * suppression as in Hundepool et al. (2012), "Statistical Disclosure Control", Wiley, ch. 5
 * (tabular data): a figure about fewer than k = `minMembers` (never below 3) members is a
 * sensitive cell and is withheld (primary); a figure that would give a withheld one away by
 * subtraction from the channel's 100% or from named shares is withheld too (complementary).
 *
 * The reader model: a reader knows who the channel's active members are, the labels of groups,
 * their own share (members always see it privately) and the share of every member named to them.
 * A message shows them named shares, anonymous ranked shares ("member 3"), group shares and the
 * channel figures. What they can infer about an unnamed member u is the set of values u's share
 * can take under every assignment consistent with those figures. The rules below keep that set
 * wider than 10 points (±5) unless the channel-wide anonymous figures already make it narrower
 * for every member alike (a list of at least k anonymous shares is the accepted release):
 *
 * 1. Elimination: individual shares are shown only when the members not known to the reader are
 *    none or at least k; otherwise the message shows channel figures only and says why.
 * 2. Groups: a group's share only when the group and the rest of the channel each have at least
 *    k active members (primary). The shown groups and the remainder split the channel into
 *    disjoint parts; within each part the members unknown to the reader must be none or at least
 *    k, and their shares must spread over more than 10 points (any permutation of their shares
 *    inside the part fits every figure shown, so that spread bounds what a reader can narrow u
 *    to). A part that fails hides its group, or, for the remainder, the smallest shown group
 *    (complementary), until every part passes.
 * 3. Same-period differencing: a group whose membership changed within the window after it
 *    already had k members is hidden for that window, so two answers of one period never differ
 *    by a few members' shares.
 * For a message posted in the channel every active member may be the reader, so each rule is
 * checked for every possible reader, and `named` members count as known even with names off:
 * a facilitator reading the post has seen their shares in a private check.
 */

import type { AnalysisReport, GroupFigure, InfluenceEntry } from "../domain/report.js";
import type { NamingPolicy } from "./naming.js";

/** Fewest members a shown figure may be about; the floor of `minMembers` (DESIGN.md §4). */
export const MIN_K = 3;
/** The `minMembers` default, used when a caller passes no channel setting. */
const DEFAULT_K = 5;
/** Half-width of the band a share must not be narrowed to: ±5 points. */
export const DISCLOSURE_BAND = 0.05;

/** What the disclosure rules need beyond the report, set by whoever builds the naming policy. */
export interface DisclosureInput {
  /** The channel's `minmembers` setting; k = max(3, this). */
  readonly minMembers: number;
  /** The group label of a report member at the report's `until`; absent = membership unknown. */
  readonly groupOf?: (member: string) => string | null;
  /** Labels whose membership changed within the window after reaching k members. */
  readonly unsettledGroups?: readonly string[];
  /** The reader is a facilitator (may see the labels of hidden groups). */
  readonly facilitator?: boolean;
}

export interface HiddenGroup {
  readonly group: string;
  /** One line: why the figure is hidden. */
  readonly reason: string;
}

/** What one message may show of one report. */
export interface Disclosed {
  readonly k: number;
  /** Individual shares (bars, named shares, contributors, who is above the line) may be shown. */
  readonly individual: boolean;
  /** When `individual` is false: the one line that says why. */
  readonly withheld: string | null;
  /** Labelled groups that may be shown, or null when the report has none. */
  readonly groups: readonly GroupFigure[] | null;
  /** Labelled groups withheld, each with its reason. */
  readonly hiddenGroups: readonly HiddenGroup[];
  /** Louvain clusters that may be shown (all or none), or null. */
  readonly clusters: AnalysisReport["clusters"];
  /** Whether hidden group labels may be listed to this reader (the facilitator who set them). */
  readonly listHiddenLabels: boolean;
}

/** k for a channel: its `minMembers`, never below 3. */
export function disclosureK(minMembers: number | undefined): number {
  return Math.max(MIN_K, Math.floor(minMembers ?? DEFAULT_K));
}

/** Complementary suppression: the group is large enough, but beside the other figures it is not. */
export function singleOutText(k: number): string {
  return `hidden: beside the other figures it would single out fewer than ${k} members`;
}

/** "hidden: fewer than 5 members". */
export function hiddenText(k: number): string {
  return `hidden: fewer than ${k} members`;
}

/** Someone who may read the message, and what they know besides the message. */
interface Reader {
  /** Their member id, or null for someone outside the active members. */
  readonly id: string | null;
  /** They know every `named` member's share (named to them, or a facilitator's private check). */
  readonly knowsNamed: boolean;
}

/** Shares of a set of members, sorted, so the spread without any one member costs O(1). */
class Pool {
  readonly sorted: number[];
  readonly sum: number;
  readonly ids: ReadonlySet<string>;

  constructor(entries: readonly InfluenceEntry[]) {
    this.sorted = entries.map((e) => e.share).sort((a, b) => a - b);
    this.sum = this.sorted.reduce((acc, x) => acc + x, 0);
    this.ids = new Set(entries.map((e) => e.member));
  }

  size(without: number | null): number {
    return this.sorted.length - (without === null ? 0 : 1);
  }

  /** Largest minus smallest share, leaving out one member's share `without` (if any). */
  spread(without: number | null): number {
    const v = this.sorted;
    const n = v.length;
    if (n - (without === null ? 0 : 1) <= 1) return 0;
    if (without === null) return v[n - 1] - v[0];
    const low = without === v[0] ? v[1] : v[0];
    const high = without === v[n - 1] ? v[n - 2] : v[n - 1];
    return high - low;
  }
}

interface Part {
  /** The shown group, or null for the remainder. */
  readonly group: GroupFigure | null;
  readonly members: readonly InfluenceEntry[];
}

/**
 * The readers to check. A private answer: the one reading, who knows the named shares when they
 * are named to them and shown. A channel post: nobody and every active member, each both as a
 * member (names as the channel shows them) and as a facilitator, who has seen every named share
 * in a private check of the same period.
 */
function readersOf(report: AnalysisReport, policy: NamingPolicy, individual: boolean): Reader[] {
  if (policy.reader !== undefined) {
    return [{ id: policy.reader, knowsNamed: individual && policy.namesOn }];
  }
  const variants = policy.namesOn && individual ? [true] : [false, true];
  const ids = [null, ...(report.influence ?? []).map((e) => e.member)];
  return ids.flatMap((id) => variants.map((knowsNamed) => ({ id, knowsNamed })));
}

/** The reader's share, when they are one of `pool` (they know it, so it leaves the pool). */
function ownShare(
  reader: string | null,
  pool: Pool,
  byId: ReadonlyMap<string, InfluenceEntry>,
): number | null {
  if (reader === null || !pool.ids.has(reader)) return null;
  return byId.get(reader)?.share ?? null;
}

/** Elimination (rule 1) for every reader: the members unknown to them are none or at least k. */
function eliminationHolds(
  influence: readonly InfluenceEntry[],
  readers: readonly Reader[],
  k: number,
): boolean {
  const all = new Set(influence.map((e) => e.member));
  const counted = new Set(influence.filter((e) => !e.named).map((e) => e.member));
  return readers.every((reader) => {
    const unknown = reader.knowsNamed ? counted : all;
    const count = unknown.size - (reader.id !== null && unknown.has(reader.id) ? 1 : 0);
    return count === 0 || count >= k;
  });
}

/** Whether a part passes rule 2 for every reader. */
function partHolds(args: {
  part: Part;
  influence: readonly InfluenceEntry[];
  byId: ReadonlyMap<string, InfluenceEntry>;
  readers: readonly Reader[];
  k: number;
  individual: boolean;
  top: number;
}): boolean {
  const { part, k, individual, top, byId } = args;
  const pools = (knowsNamed: boolean) => {
    const hidden = (e: InfluenceEntry) => !(knowsNamed && e.named);
    return {
      inPart: new Pool(part.members.filter(hidden)),
      everyone: new Pool(args.influence.filter(hidden)),
    };
  };
  const byKnowledge = { false: pools(false), true: pools(true) };
  const band = 2 * DISCLOSURE_BAND;
  return args.readers.every((reader) => {
    const { inPart, everyone } = byKnowledge[reader.knowsNamed ? "true" : "false"];
    const ownInPart = ownShare(reader.id, inPart, byId);
    const ownInAll = ownShare(reader.id, everyone, byId);
    const m = inPart.size(ownInPart);
    if (m === 0) return true;
    if (individual) {
      if (m < k) return false;
      // Every anonymous share is within 10 points of every other: the list itself says as much.
      if (everyone.spread(ownInAll) <= band) return true;
      return inPart.spread(ownInPart) > band;
    }
    // Shares withheld: the part's unknown total S is shared by m members, each between 0 and the
    // largest share; every value in [max(0, S − (m−1)·top), min(S, top)] fits the figures.
    const sum = inPart.sum - (ownInPart ?? 0);
    const width = Math.max(
      Math.min(sum, top) - Math.max(0, sum - (m - 1) * top),
      inPart.spread(ownInPart),
    );
    if (width > band) return true;
    // As narrow from the channel's figures alone (the total of everyone unknown): nothing added.
    const total = everyone.sum - (ownInAll ?? 0);
    const count = everyone.size(ownInAll);
    return Math.min(total, top) - Math.max(0, total - (count - 1) * top) <= band;
  });
}

function labelOf(input: DisclosureInput | undefined) {
  return input?.groupOf;
}

/** Rules 2 and 3 for labelled groups; returns the shown groups and the hidden ones. */
function discloseGroups(args: {
  report: AnalysisReport;
  policy: NamingPolicy;
  k: number;
  individual: boolean;
}): { shown: GroupFigure[]; hidden: HiddenGroup[] } {
  const { report, policy, k, individual } = args;
  const groups = report.groups ?? [];
  const influence = report.influence ?? [];
  const input = policy.disclosure;
  const hidden: HiddenGroup[] = [];
  const unsettled = new Set(input?.unsettledGroups ?? []);
  let shown: GroupFigure[] = [];
  for (const g of groups) {
    if (g.members < k || report.members - g.members < k) {
      hidden.push({ group: g.group, reason: hiddenText(k) });
    } else if (unsettled.has(g.group)) {
      hidden.push({ group: g.group, reason: "hidden: its members changed within this window" });
    } else shown.push(g);
  }
  const groupOf = labelOf(input);
  if (groupOf === undefined || influence.length === 0) {
    // Membership unknown: the parts cannot be checked, so no group is shown beside shares.
    for (const g of shown) hidden.push({ group: g.group, reason: hiddenText(k) });
    return { shown: [], hidden };
  }
  const top = report.top?.share ?? 1;
  const readers = readersOf(report, policy, individual);
  const byId = new Map(influence.map((e) => [e.member, e]));
  for (;;) {
    const labels = new Set(shown.map((g) => g.group));
    const parts: Part[] = shown.map((g) => ({
      group: g,
      members: influence.filter((e) => groupOf(e.member) === g.group),
    }));
    parts.push({
      group: null,
      members: influence.filter((e) => {
        const label = groupOf(e.member);
        return label === null || !labels.has(label);
      }),
    });
    const failing = parts.find(
      (part) => !partHolds({ part, influence, byId, readers, k, individual, top }),
    );
    if (failing === undefined) break;
    // The remainder cannot be hidden: hide the smallest shown group so it joins the remainder.
    const victim =
      failing.group ?? [...shown].sort((a, b) => a.members - b.members || b.share - a.share)[0];
    if (victim === undefined) break;
    hidden.push({ group: victim.group, reason: singleOutText(k) });
    shown = shown.filter((g) => g !== victim);
  }
  return { shown, hidden };
}

/** Clusters: members are not shown, so the size rule applies, and only beside anonymous shares. */
function discloseClusters(
  report: AnalysisReport,
  policy: NamingPolicy,
  k: number,
): AnalysisReport["clusters"] {
  const clusters = report.clusters;
  if (!clusters) return null;
  const sizesHold = clusters.groups.every((g) => g.members >= k && report.members - g.members >= k);
  // Named shares known to any reader (a facilitator reads every channel post) would subtract out.
  const named = (report.influence ?? []).some(
    (e) => e.named && (policy.namesOn || policy.reader === undefined),
  );
  return sizesHold && !named ? clusters : null;
}

/** What a message for this reader may show of the report. Every message builder calls this. */
export function disclose(report: AnalysisReport, policy: NamingPolicy): Disclosed {
  const k = disclosureK(policy.disclosure?.minMembers);
  const influence = report.influence ?? [];
  const individual = eliminationHolds(influence, readersOf(report, policy, true), k);
  const { shown, hidden } = report.groups
    ? discloseGroups({ report, policy, k, individual })
    : { shown: [], hidden: [] };
  return {
    k,
    individual,
    withheld: individual
      ? null
      : `Individual shares are withheld: fewer than ${k} members would be left unnamed, and the shares shown would give theirs away by subtraction. The channel figures are shown instead.`,
    groups: report.groups ? shown : null,
    hiddenGroups: hidden,
    clusters: discloseClusters(report, policy, k),
    listHiddenLabels: policy.disclosure?.facilitator === true,
  };
}

/** The rows a message shows for hidden groups: labelled to a facilitator, else counted. */
export function hiddenGroupRows(
  disclosed: Disclosed,
): { label: string; value: string; detail?: string }[] {
  if (disclosed.hiddenGroups.length === 0) return [];
  if (disclosed.listHiddenLabels) {
    return disclosed.hiddenGroups.map((h) => ({ label: `  ${h.group}`, value: h.reason }));
  }
  const n = disclosed.hiddenGroups.length;
  const reasons = [...new Set(disclosed.hiddenGroups.map((h) => h.reason))];
  // One "hidden:" for the row, then each distinct reason ("hidden: fewer than 5 members, or …").
  const value =
    reasons.length === 1
      ? reasons[0]
      : `hidden: ${reasons.map((r) => r.replace(/^hidden: /, "")).join(", or ")}`;
  return [{ label: `  ${n} group${n === 1 ? "" : "s"}`, value }];
}
