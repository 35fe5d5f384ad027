/**
 * @module channel-ids
 * Core channel ids for Slack: `slack:<team_id>:<channel_id>`. The team part keeps channels of two
 * workspaces apart in one store and lets uninstall erase a whole workspace.
 */

export const SLACK_CHANNEL_PREFIX = "slack:";

export interface SlackChannelRef {
  readonly team: string;
  readonly channel: string;
}

const SLACK_ID = /^[A-Z0-9]+$/;

/** The core channel id of a Slack channel in a workspace. */
export function coreChannelId(team: string, channel: string): string {
  return `${SLACK_CHANNEL_PREFIX}${team}:${channel}`;
}

/** Splits a core channel id; null when it is not a Slack id. */
export function parseCoreChannelId(id: string): SlackChannelRef | null {
  if (!id.startsWith(SLACK_CHANNEL_PREFIX)) return null;
  const [team, channel, ...rest] = id.slice(SLACK_CHANNEL_PREFIX.length).split(":");
  if (rest.length > 0 || !team || !channel || !SLACK_ID.test(team) || !SLACK_ID.test(channel)) {
    return null;
  }
  return { team, channel };
}

/** True for strings shaped like Slack ids (`U…`, `W…`, `C…`, `T…`). */
export function isSlackId(value: unknown): value is string {
  return typeof value === "string" && value.length <= 32 && SLACK_ID.test(value);
}
