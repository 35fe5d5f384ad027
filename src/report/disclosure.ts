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
 * checked for every possible reader.
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

function knownTo(entry: InfluenceEntry, policy: NamingPolicy, reader: string | null): boolean {
  return (policy.namesOn && entry.named) || entry.member === reader;
}

function spread(values: readonly number[]): number {
  if (values.length === 0) return 0;
  return Math.max(...values) - Math.min(...values);
}

interface Part {
  /** The shown group, or null for the remainder. */
  readonly group: GroupFigure | null;
  readonly members: readonly InfluenceEntry[];
}

/** The readers to check: the one reading, or, for a channel post, nobody and every active member. */
function readersOf(report: AnalysisReport, policy: NamingPolicy): (string | null)[] {
  if (policy.reader !== undefined) return [policy.reader];
  return [null, ...(report.influence ?? []).map((e) => e.member)];
}

/** Elimination (rule 1) for one reader: the members unknown to them are none or at least k. */
function eliminationHolds(
  influence: readonly InfluenceEntry[],
  policy: NamingPolicy,
  reader: string | null,
  k: number,
): boolean {
  const unknown = influence.filter((e) => !knownTo(e, policy, reader)).length;
  return unknown === 0 || unknown >= k;
}

/** Whether a part passes rule 2 for one reader. */
function partHolds(args: {
  part: Part;
  influence: readonly InfluenceEntry[];
  policy: NamingPolicy;
  reader: string | null;
  k: number;
  individual: boolean;
  top: number;
}): boolean {
  const { part, policy, reader, k, individual, top } = args;
  // With individual shares withheld the reader knows only their own share (privately).
  const isKnown = (e: InfluenceEntry) =>
    individual ? knownTo(e, policy, reader) : e.member === reader;
  const unknown = part.members.filter((e) => !isKnown(e));
  if (unknown.length === 0) return true;
  const everyone = args.influence.filter((e) => !isKnown(e)).map((e) => e.share);
  if (individual) {
    if (unknown.length < k) return false;
    // Every anonymous share is within 10 points of every other: the list itself says as much.
    if (spread(everyone) <= 2 * DISCLOSURE_BAND) return true;
    return spread(unknown.map((e) => e.share)) > 2 * DISCLOSURE_BAND;
  }
  // Shares withheld: the part's unknown total S is shared by m members, each between 0 and the
  // largest share; every value in [max(0, S − (m−1)·top), min(S, top)] fits the figures.
  const m = unknown.length;
  const sum = unknown.reduce((acc, e) => acc + e.share, 0);
  const low = Math.max(0, sum - (m - 1) * top);
  const high = Math.min(sum, top);
  const width = Math.max(high - low, spread(unknown.map((e) => e.share)));
  if (width > 2 * DISCLOSURE_BAND) return true;
  // As narrow from the channel's figures alone (the total of everyone unknown): nothing added.
  const all = args.influence.filter((e) => !isKnown(e));
  const total = all.reduce((acc, e) => acc + e.share, 0);
  const baseline = Math.min(total, top) - Math.max(0, total - (all.length - 1) * top);
  return baseline <= 2 * DISCLOSURE_BAND;
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
  const readers = readersOf(report, policy);
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
      (part) =>
        !readers.every((reader) =>
          partHolds({ part, influence, policy, reader, k, individual, top }),
        ),
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
  const named = (report.influence ?? []).some((e) => policy.namesOn && e.named);
  return sizesHold && !named ? clusters : null;
}

/** What a message for this reader may show of the report. Every message builder calls this. */
export function disclose(report: AnalysisReport, policy: NamingPolicy): Disclosed {
  const k = disclosureK(policy.disclosure?.minMembers);
  const influence = report.influence ?? [];
  const readers = readersOf(report, policy);
  const individual = readers.every((reader) => eliminationHolds(influence, policy, reader, k));
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
  return [{ label: `  ${n} group${n === 1 ? "" : "s"}`, value: reasons.join("; ") }];
}
