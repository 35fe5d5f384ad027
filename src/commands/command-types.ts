/**
 * @module command-types
 * What the `/influence` command core takes and gives: the context an adapter builds from the
 * platform's request, the dependencies the composition root passes in, and a neutral response
 * the adapter shows privately or posts in the channel.
 */
import type { AnalysisRunner } from "../ports/analysis-runner.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import type { Store } from "../ports/store.js";

export interface CommandContext {
  readonly channel: string;
  /** The platform id of the member who typed the command. */
  readonly member: string;
  /** The words after `/influence` (or Teams' `influence`), command name already stripped. */
  readonly text: string;
  /** Epoch ms: the analysis's `until` and the time of any change the command makes. */
  readonly now: number;
  /** The platform says this member is a workspace admin or owner. */
  readonly isPlatformAdmin: boolean;
  /** The command was typed inside a thread. */
  readonly inThread?: boolean;
  /**
   * The platform's id of this request (Slack `trigger_id`, Teams activity id). Delivery keys of
   * what the command records use it, so a request delivered to two replicas is recorded once;
   * absent (console), they use `now`.
   */
  readonly requestId?: string;
}

export interface CommandDeps {
  readonly store: Store;
  /** Platform ids configured as facilitators everywhere (`PLUMBLINE_FACILITATORS`). */
  readonly facilitators: readonly string[];
  /** Display name of a platform id, when the platform can tell; null when unknown. */
  readonly displayName?: (platformId: string) => Promise<string | null>;
  /** A signed 24-hour link to the channel's report page for this reader; absent when not served. */
  readonly reportLink?: (channel: string, reader: string) => string;
  /** Where analyses run (serve: the bounded queue over the worker pool); default in-thread. */
  readonly analysis?: AnalysisRunner;
}

export type Visibility = "private" | "channel";

export interface CommandResponse {
  /** `private`: show only to the member who asked; `channel`: post for everyone. */
  readonly visibility: Visibility;
  readonly message: OutgoingMessage;
}
