/**
 * @module command-keys
 * What makes the delivery key of something a command records unique: the platform's request id
 * when there is one (Slack `trigger_id`, Teams activity id; never a replica's clock, DESIGN.md
 * §8), so the same request delivered to two replicas is recorded once; else the command's time.
 */
import type { CommandContext } from "./command-types.js";

/** The occurrence part of a command's delivery key. */
export function commandOccurrence(context: Pick<CommandContext, "now" | "requestId">): string {
  return context.requestId !== undefined ? `req:${context.requestId}` : String(context.now);
}
