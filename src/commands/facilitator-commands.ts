/**
 * @module facilitator-commands
 * Channel administration: `settings` (anyone may look), and for facilitators only `set <key>
 * <value>`, `group <member> <label|clear>` and `facilitator add|remove <member>`. A refused or
 * invalid request changes nothing.
 */

import type { Block } from "../domain/blocks.js";
import { PlumblineError } from "../domain/errors.js";
import { ingest } from "../ingest/ingest.js";
import { settingsRows } from "../report/member-blocks.js";
import { readChannelSettings, writeChannelSettings } from "./channel-settings-store.js";
import { commandOccurrence } from "./command-keys.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { consentAt, snapshotIds } from "./member-view.js";
import { parseMember } from "./parse-input.js";
import { ALLOWED, parseSetting, SETTING_KEYS, settingKey } from "./parse-setting.js";
import { isFacilitator, nameOf, refusal } from "./permissions.js";
import { respond, respondNotes } from "./respond.js";

/** Longest group label accepted. */
export const MAX_GROUP_LABEL = 40;

/** `settings`. */
export async function showSettings(
  context: CommandContext,
  deps: CommandDeps,
): Promise<CommandResponse> {
  const settings = await readChannelSettings(deps.store, context.channel);
  const blocks: Block[] = [
    { kind: "heading", text: `Settings · ${context.channel}` },
    { kind: "figures", rows: settingsRows(settings) },
    {
      kind: "footer",
      text: "Facilitators change these with /influence set <key> <value>, e.g. /influence set window 21.",
    },
  ];
  return respond(blocks);
}

/** `set <key> <value>`. */
export async function set(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  if (!(await isFacilitator(context, deps))) {
    return respondNotes(await refusal("change settings", context, deps));
  }
  const key = args.length > 0 ? settingKey(args[0]) : null;
  if (key === null) {
    const keys = SETTING_KEYS.map((k) => `${k} (${ALLOWED[k]})`);
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `${args.length === 0 ? "set needs a key and a value" : `there is no setting "${args[0]}"`}. The keys are: ${keys.join("; ")}. Nothing was changed.`,
      { hint: "write /influence set <key> <value>, e.g. /influence set window 21" },
    );
  }
  const before = await readChannelSettings(deps.store, context.channel);
  const after = { ...before, ...parseSetting(key, args.slice(1)) };
  await writeChannelSettings(deps.store, context.channel, after);
  const row = (settings: typeof before) => settingsRows(settings).find((r) => r.label === key);
  return respondNotes(
    `Set ${key} to ${row(after)?.value} (was ${row(before)?.value}). The change applies from now on.`,
  );
}

/** `group <member> <label|clear>`. */
export async function group(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  if (!(await isFacilitator(context, deps))) {
    return respondNotes(await refusal("label groups", context, deps));
  }
  const usage = "group <member> <label|clear>";
  const member = parseMember(args[0], usage);
  const labelText = args.slice(1).join(" ");
  if (labelText === "") {
    throw new PlumblineError("ARG_MISSING", "give the group label, or clear", {
      hint: "write /influence group @member night-shift, or /influence group @member clear",
    });
  }
  const label = labelText.toLowerCase() === "clear" ? null : labelText;
  if (label !== null && (label.length > MAX_GROUP_LABEL || /[\p{Cc}<>]/u.test(label))) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `a group label is up to ${MAX_GROUP_LABEL} characters without < or >`,
      { hint: "use a short label such as night-shift or design" },
    );
  }
  const { store } = deps;
  const snapshot = await store.loadSnapshot(context.channel);
  const name = await nameOf(deps, member);
  if (consentAt(snapshot, snapshotIds(store, member), context.now) === "off") {
    return respondNotes(
      `${name} has not joined, so there is nothing to label: groups apply only to members who opted in with /influence join. Nothing was changed.`,
    );
  }
  const key = `cmd:group:${context.channel}:${store.memberKey(member)}:${commandOccurrence(context)}:${label ?? ""}`;
  await ingest(
    store,
    { type: "group", at: context.now, channel: context.channel, member, group: label },
    key,
    { receivedAt: context.now },
  );
  return respondNotes(
    label === null
      ? `${name} is no longer in a group.`
      : `${name} is now in the group "${label}". Group shares appear in checks and digests once at least one member is labelled.`,
  );
}

/** `facilitator add|remove <member>`. */
export async function facilitator(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse | null> {
  const action = args[0]?.toLowerCase();
  if (action !== "add" && action !== "remove") return null;
  if (!(await isFacilitator(context, deps))) {
    return respondNotes(await refusal("add or remove facilitators", context, deps));
  }
  const member = parseMember(args[1], `facilitator ${action} <member>`);
  if (args.length > 2) {
    throw new PlumblineError("ARG_BAD_VALUE", "name one member at a time", {
      hint: `write /influence facilitator ${action} @member`,
    });
  }
  const { store } = deps;
  const name = await nameOf(deps, member);
  const already = await store.isFacilitator(context.channel, member);
  if (action === "add") {
    if (already) return respondNotes(`${name} is already a facilitator of this channel.`);
    await store.addFacilitator(context.channel, member);
    return respondNotes(
      `${name} is now a facilitator of this channel: they can change settings, label groups, post checks and see the names of members who joined as named.`,
    );
  }
  const configured = deps.facilitators.includes(member);
  if (already) await store.removeFacilitator(context.channel, member);
  const texts = [
    already
      ? `${name} is no longer a facilitator of this channel.`
      : `${name} was not added as a facilitator of this channel.`,
  ];
  if (configured) {
    texts.push(
      `${name} stays a facilitator through the bot's configuration (PLUMBLINE_FACILITATORS); the bot's operator can change that.`,
    );
  }
  return respondNotes(...texts);
}

/** `report`: a private, signed link to the report page (facilitators). */
export async function report(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse | null> {
  if (args.length > 0) return null;
  if (!(await isFacilitator(context, deps))) {
    return respondNotes(await refusal("open the report page", context, deps));
  }
  if (!deps.reportLink) {
    return respondNotes(
      "Report pages are served by the running bot (plumbline serve). Here, write one with: plumbline report <log> --out report.html",
    );
  }
  return respondNotes(
    `Your report page, with charts of this channel's figures: ${deps.reportLink(context.channel, context.member)}`,
    "The link works for 24 hours and only for you; it shows what you may see under the channel's naming rules. Do not forward it.",
  );
}
