/**
 * @module erase
 * Erasure (DESIGN.md §7, GDPR Art. 17(1)(b)): `leave` deletes every row naming the member in the
 * channel — messages they wrote and their mention rows, mentions of them, replies' references to
 * them (cleared), group labels, consent history, facilitator rows, post claims about them and
 * their platform id. Uninstalling erases a channel or every channel of a workspace.
 */
import type { EraseCounts, Store } from "../ports/store.js";

/** The member (platform id) leaves the channel: all their rows there are deleted. */
export function leave(store: Store, channel: string, member: string): Promise<EraseCounts> {
  return store.eraseMember(channel, member);
}

/** The app was removed from a channel: every row of it is deleted. */
export function eraseChannel(store: Store, channel: string): Promise<EraseCounts> {
  return store.eraseChannel(channel);
}

/** The app was removed from a workspace: every channel registered to it is erased. */
export function eraseWorkspace(store: Store, workspace: string): Promise<EraseCounts> {
  return store.eraseWorkspace(workspace);
}
