/**
 * @module membership-commands
 * A member's own standing in a channel: `join [named]` (the consent notice, then the consent
 * recorded through ingestion with the notice's version), `leave` (every row naming the member
 * erased, DESIGN.md §7) and `status`.
 */

import type { Block } from "../domain/blocks.js";
import { PlumblineError } from "../domain/errors.js";
import type { ConsentLevel } from "../domain/events.js";
import { ingest } from "../ingest/ingest.js";
import { CONSENT_NOTICE_VERSION, consentNoticeBlocks } from "../report/consent-notice.js";
import { statusBlocks } from "../report/member-blocks.js";
import { viewChannel } from "./analysis-commands.js";
import { commandOccurrence } from "./command-keys.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { consentChangeAt, optedInCount, snapshotIds } from "./member-view.js";
import { nextDigestAt } from "./next-digest.js";
import { isFacilitator } from "./permissions.js";
import { respond, respondNotes } from "./respond.js";

const LEVEL_WORDS: Record<Exclude<ConsentLevel, "off">, string> = {
  counted: "counted: your replies and mentions count, and you are never named to others",
  named:
    "named: your replies and mentions count, and your name may be shown to facilitators (and to the channel if names are on)",
};

/** The delivery key of a consent a command records (a member key, never the platform id). */
export function consentDeliveryKey(args: {
  channel: string;
  memberKey: string;
  level: ConsentLevel;
  /** `commandOccurrence(context)`. */
  occurrence: string;
}): string {
  return `cmd:consent:${args.channel}:${args.memberKey}:${args.level}:${args.occurrence}`;
}

/** `join [named]`. */
export async function join(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  const word = args.length === 0 ? "counted" : args.length === 1 ? args[0].toLowerCase() : "";
  if (word !== "counted" && word !== "named") {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `join takes nothing, or "named"; not "${args.join(" ")}"`,
      {
        hint: "write /influence join to be counted without your name, or /influence join named",
      },
    );
  }
  const level: ConsentLevel = word;
  const { store } = deps;
  const snapshot = await store.loadSnapshot(context.channel);
  const current = consentChangeAt(snapshot, snapshotIds(store, context.member), context.now);
  const notice = consentNoticeBlocks();
  if (current?.level === level) {
    return respond([
      ...notice,
      { kind: "note", text: `You are already in as ${LEVEL_WORDS[level]}. Nothing changed.` },
    ]);
  }
  await ingest(
    store,
    {
      type: "consent",
      at: context.now,
      channel: context.channel,
      member: context.member,
      level,
      notice: CONSENT_NOTICE_VERSION,
    },
    consentDeliveryKey({
      channel: context.channel,
      memberKey: store.memberKey(context.member),
      level,
      occurrence: commandOccurrence(context),
    }),
    { receivedAt: context.now },
  );
  const other = level === "counted" ? "/influence join named" : "/influence join";
  const blocks: Block[] = [
    ...notice,
    {
      kind: "note",
      text: `You are in as ${LEVEL_WORDS[level]}. Counting starts now; only replies and mentions between members who have both joined count.`,
    },
    {
      kind: "note",
      text: `See your own figures with /influence me. Change your choice with ${other}, or stop and delete everything about you with /influence leave.`,
    },
  ];
  return respond(blocks);
}

/** `leave`: erase the member's rows in the channel and say what went. */
export async function leave(context: CommandContext, deps: CommandDeps): Promise<CommandResponse> {
  const { store } = deps;
  const wasAdded = await store.isFacilitator(context.channel, context.member);
  const { rows } = await store.eraseMember(context.channel, context.member);
  if (rows === 0) {
    return respondNotes(
      "Nothing was stored about you in this channel, so there was nothing to delete. You are not counted here.",
    );
  }
  const texts = [
    `Done: you are no longer counted in this channel, and ${rows} stored record${rows === 1 ? "" : "s"} about you here ${rows === 1 ? "was" : "were"} deleted: your consent record, the replies and mentions you sent or received, and any group label.`,
  ];
  if (wasAdded) texts.push("Your facilitator role in this channel was removed too.");
  texts.push("You can join again at any time with /influence join; counting would start afresh.");
  return respondNotes(...texts);
}

/** `status`: the member's consent, what the window holds, the settings and the next digest. */
export async function status(context: CommandContext, deps: CommandDeps): Promise<CommandResponse> {
  const { settings, snapshot, report } = await viewChannel(context, deps);
  const change = consentChangeAt(snapshot, snapshotIds(deps.store, context.member), context.now);
  const level = change?.level ?? "off";
  return respond(
    statusBlocks({
      report,
      consent: {
        level,
        since: level === "off" ? null : (change?.at ?? null),
        notice: change?.notice ?? null,
      },
      facilitator: await isFacilitator(context, deps),
      optedIn: optedInCount(snapshot, context.now),
      settings,
      nextDigest: nextDigestAt(settings, context.now),
    }),
  );
}
