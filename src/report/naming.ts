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

/** A lookup from member id to display label for one report, using ranks in `influence` order. */
export function memberLabeller(
  influence: readonly { readonly member: string; readonly named: boolean }[],
  policy: NamingPolicy,
): (member: string) => string {
  const labels = new Map<string, string>();
  influence.forEach((entry, k) => {
    labels.set(entry.member, displayMember(entry, k + 1, policy));
  });
  return (member) => labels.get(member) ?? "a member";
}
