/**
 * Every kind of message the bot can send, built the way the bot builds them: the chat commands
 * through `handleCommand` on an invented busy channel (and on a channel with too little data),
 * the weekly digest and the balance note from the same channel's report, and every meeting-format
 * message (format-messages.ts). The platform checks
 * (Block Kit limits, Adaptive Card parsing) run over this catalogue, so a new message kind only
 * needs adding here.
 */
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";
import { digestMessage } from "../../src/report/digest-blocks.js";
import { noteMessage } from "../../src/report/note-blocks.js";
import { busyChannel, CHANNEL, NOW, runner, T0 } from "../commands/channel-fixture.js";
import { formatMessages } from "./format-messages.js";

export interface NamedMessage {
  readonly name: string;
  readonly message: OutgoingMessage;
}

const COMMANDS: readonly [string, string, string][] = [
  // [name, member, command text]
  ["check", "UBO", "check"],
  ["check post", "UBOSS", "check post"],
  ["me", "UCY", "me"],
  ["me (not counted)", "UGUS", "me"],
  ["status", "UBO", "status"],
  ["settings", "UBOSS", "settings"],
  ["set", "UBOSS", "set threshold 0.4"],
  ["explain", "UBO", "explain"],
  ["help", "UBO", "help"],
  ["unknown command", "UBO", "chek"],
  ["compare", "UBOSS", "compare"],
  ["whatif", "UBOSS", "whatif cap 0.25"],
  ["group", "UBOSS", "group UBO night-shift"],
  ["facilitator add", "UBOSS", "facilitator add UCY"],
  ["join", "UGUS", "join"],
  ["leave", "UFAY", "leave"],
  ["refused (not a facilitator)", "UBO", "set threshold 0.4"],
];

/** The catalogue; each entry's name says which command or post it is. */
export async function everyMessage(): Promise<NamedMessage[]> {
  const out: NamedMessage[] = [];
  const r = await busyChannel();
  const report = analyzeSnapshot(await r.store.loadSnapshot(CHANNEL), DEFAULT_SETTINGS, {
    until: NOW,
  });
  out.push({
    name: "digest",
    message: digestMessage({ report, previous: null, policy: { namesOn: false } }),
  });
  out.push({
    name: "digest with previous week",
    message: digestMessage({ report, previous: report, policy: { namesOn: true } }),
  });
  out.push({
    name: "note (channel)",
    message: noteMessage({ report, policy: { namesOn: false }, audience: "channel" }),
  });
  out.push({
    name: "note (facilitators)",
    message: noteMessage({ report, policy: { namesOn: true }, audience: "facilitators" }),
  });
  for (const [name, member, text] of COMMANDS) {
    const response = await r.run(member, text);
    out.push({ name, message: response.message });
  }
  const quiet = await runner();
  await quiet.run("UANA", "join", { now: T0 });
  out.push({
    name: "check (too little data)",
    message: (await quiet.run("UANA", "check")).message,
  });
  out.push({ name: "join (consent notice)", message: (await quiet.run("UBO", "join")).message });
  await r.store.close();
  await quiet.store.close();
  out.push(...(await formatMessages()));
  return out;
}
