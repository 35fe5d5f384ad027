/**
 * @module permissions
 * Who is a facilitator of a channel: a platform id in the configured list
 * (`PLUMBLINE_FACILITATORS`), a workspace admin or owner as the platform reports, or a member
 * added with `/influence facilitator add`. Everyone else asking for a facilitator command is told
 * who can do it.
 */
import type { CommandContext, CommandDeps } from "./command-types.js";

/** Whether the member asking may run facilitator commands in this channel. */
export async function isFacilitator(context: CommandContext, deps: CommandDeps): Promise<boolean> {
  if (context.isPlatformAdmin) return true;
  if (deps.facilitators.includes(context.member)) return true;
  return deps.store.isFacilitator(context.channel, context.member);
}

/** A member's display name, or their platform id when the platform cannot tell. */
export async function nameOf(deps: CommandDeps, platformId: string): Promise<string> {
  return (await deps.displayName?.(platformId)) ?? platformId;
}

/**
 * The facilitators a member can be pointed to: configured ones and added ones (the role keeps its
 * platform id, whatever the facilitator's consent); rows stored before the role kept ids are only
 * counted.
 */
async function knownFacilitators(
  context: CommandContext,
  deps: CommandDeps,
): Promise<{ names: string[]; unnamed: number }> {
  const added = await deps.store.listFacilitators(context.channel);
  const kept = await deps.store.facilitatorPlatformIds(context.channel);
  const ids = [...new Set([...deps.facilitators, ...kept])];
  const names = await Promise.all(ids.map((id) => nameOf(deps, id)));
  return { names, unnamed: Math.max(0, added.length - kept.length) };
}

/** "Only this channel's facilitators can <action>: ask one of them (…), or a workspace admin." */
export async function refusal(
  action: string,
  context: CommandContext,
  deps: CommandDeps,
): Promise<string> {
  const { names, unnamed } = await knownFacilitators(context, deps);
  const listed = [...names];
  if (unnamed > 0) listed.push(`${unnamed} other${unnamed === 1 ? "" : "s"}`);
  if (listed.length === 0) {
    return `Only this channel's facilitators can ${action}. It has none yet: ask a workspace admin, who can add one with /influence facilitator add <member>.`;
  }
  return `Only this channel's facilitators can ${action}: ask one of them (${listed.join(", ")}), or a workspace admin.`;
}
