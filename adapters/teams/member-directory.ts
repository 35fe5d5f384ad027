/**
 * @module member-directory
 * What this process has seen of Teams accounts, in memory only: a member's channel account id
 * (29:…, needed to open a personal conversation), their core id (Entra object id) and display name.
 * Nothing here is stored; a restart relearns it from new activities or the roster.
 */
import type { AccountLike } from "./activity-fields.js";
import { memberIdOf } from "./activity-fields.js";

interface Entry {
  readonly accountId: string;
  readonly member: string;
  readonly name: string | null;
}

export class MemberDirectory {
  private readonly byAccount = new Map<string, Entry>();
  private readonly byMember = new Map<string, Entry>();

  /** Records an account seen in an activity or a roster answer. */
  learn(account: AccountLike | undefined): void {
    const accountId = account?.id;
    const member = memberIdOf(account);
    if (!accountId || member === null) return;
    const entry: Entry = { accountId, member, name: account?.name ?? null };
    this.byAccount.set(accountId, entry);
    this.byMember.set(member, entry);
  }

  /** The core member id of a channel account id, when seen. */
  memberOf(accountId: string): string | null {
    return this.byAccount.get(accountId)?.member ?? null;
  }

  /** The channel account id (29:…) of a core member id, when seen. */
  accountOf(member: string): string | null {
    return this.byMember.get(member)?.accountId ?? null;
  }

  nameOf(member: string): string | null {
    return this.byMember.get(member)?.name ?? null;
  }
}
