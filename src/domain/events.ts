/**
 * @module events
 * The platform-neutral events every adapter produces (DESIGN.md §3). Times are epoch milliseconds
 * here; the JSON Lines log carries them as ISO 8601 with a zone. There is no text field, ever.
 */

export type ConsentLevel = "off" | "counted" | "named";

interface EventBase {
  /** Epoch milliseconds. */
  readonly at: number;
  readonly channel: string;
}

export interface ConsentEvent extends EventBase {
  readonly type: "consent";
  readonly member: string;
  readonly level: ConsentLevel;
  /** Version of the consent notice the member saw, when known. */
  readonly notice?: string;
}

export interface MessageEvent extends EventBase {
  readonly type: "message";
  readonly id: string;
  readonly author: string;
  /** Id of the message being answered (thread root or direct reply). */
  readonly parent?: string;
  /** Author of the parent, when the platform names it; else resolved from the ledger. */
  readonly parentAuthor?: string;
  readonly mentions?: readonly string[];
}

export interface EditEvent extends EventBase {
  readonly type: "edit";
  readonly id: string;
  /** The message's new, complete mention list. */
  readonly mentions: readonly string[];
}

export interface DeleteEvent extends EventBase {
  readonly type: "delete";
  readonly id: string;
}

/** Extension of DESIGN.md §3 (Teams `undeleteMessage`): restores a deleted message's signals. */
export interface UndeleteEvent extends EventBase {
  readonly type: "undelete";
  readonly id: string;
}

export interface GroupEvent extends EventBase {
  readonly type: "group";
  readonly member: string;
  /** `null` clears the member's group. */
  readonly group: string | null;
}

/** A facilitator's name for how the channel runs its discussion from `at` on (DESIGN.md §3). */
export interface FormatEvent extends EventBase {
  readonly type: "format";
  /** `null` ends the current format period. */
  readonly format: string | null;
}

export type ChatEvent =
  | FormatEvent
  | ConsentEvent
  | MessageEvent
  | EditEvent
  | DeleteEvent
  | UndeleteEvent
  | GroupEvent;

export type ChatEventType = ChatEvent["type"];
