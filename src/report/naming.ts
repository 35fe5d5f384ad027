/**
 * @module naming
 * The naming rules of DESIGN.md §6: a member is named only if their consent is `named` and the
 * channel's `names` setting is on, or the reader is that member; everyone else appears as
 * "member k" (k = their place in the share ranking, which carries no identity).
 */
import type { DisclosureInput } from "./disclosure.js";

export interface NamingPolicy {
  /** The channel's `names` setting (facilitator views, the CLI operator). */
  readonly namesOn: boolean;
  /** The member reading, who always sees their own name. */
  readonly reader?: string;
  /** Display names for ids (e.g. platform ids → handles); ids are shown where absent. */
  readonly displayName?: (member: string) => string;
  /** The channel's disclosure inputs (k, group membership); conservative defaults when absent. */
  readonly disclosure?: DisclosureInput;
  /**
   * The number in "member k" for each member, when one message shows several reports (a compare's
   * two panels) and a member must keep one label across them; absent: the place in the ranking.
   */
  readonly ranks?: ReadonlyMap<string, number>;
}

/**
 * One "member k" numbering over several reports: ranked by the first report, then members seen
 * only in later ones numbered on after them, in their own order.
 */
export function sharedRanks(
  reports: readonly (readonly { readonly member: string }[] | null)[],
): ReadonlyMap<string, number> {
  const ranks = new Map<string, number>();
  for (const influence of reports) {
    for (const entry of influence ?? []) {
      if (!ranks.has(entry.member)) ranks.set(entry.member, ranks.size + 1);
    }
  }
  return ranks;
}

export function displayMember(
  entry: { readonly member: string; readonly named: boolean },
  rank: number,
  policy: NamingPolicy,
): string {
  const self = policy.reader !== undefined && policy.reader === entry.member;
  if (self) return `you (${policy.displayName ? policy.displayName(entry.member) : entry.member})`;
  if (policy.namesOn && entry.named) {
    return policy.displayName ? policy.displayName(entry.member) : entry.member;
  }
  return `member ${rank}`;
}

/**
 * The policy for a page that shows a compare below its own figures: one "member k" numbering for
 * the whole page, by the page's own ranking first, then period A's, then B's, so a member keeps
 * one label in the figures and in both panels.
 */
export function samePageLabels(
  policy: NamingPolicy,
  report: { readonly influence: readonly { readonly member: string }[] | null },
  compare: {
    readonly a: {
      readonly report: { readonly influence: readonly { readonly member: string }[] | null };
    };
    readonly b: {
      readonly report: { readonly influence: readonly { readonly member: string }[] | null };
    };
  },
): NamingPolicy {
  return {
    ...policy,
    ranks: sharedRanks([report.influence, compare.a.report.influence, compare.b.report.influence]),
  };
}

/** A lookup from member id to display label for one report, using ranks in `influence` order. */
export function memberLabeller(
  influence: readonly { readonly member: string; readonly named: boolean }[],
  policy: NamingPolicy,
): (member: string) => string {
  const labels = new Map<string, string>();
  influence.forEach((entry, k) => {
    labels.set(
      entry.member,
      displayMember(entry, policy.ranks?.get(entry.member) ?? k + 1, policy),
    );
  });
  return (member) => labels.get(member) ?? "a member";
}
