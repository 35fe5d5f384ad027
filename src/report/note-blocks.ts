/**
 * @module note-blocks
 * The balance note (DESIGN.md §1): posted when one member's influence share is above the channel's
 * line with enough probability. It names nobody unless the naming rules allow it, says what the
 * figure means for the channel's pooled view, and offers a few things a facilitator might try.
 */

import type { Block } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { EXPLAIN_POINTER, windowText } from "./digest-blocks.js";
import { disclose } from "./disclosure.js";
import { decimal1, percent, percentRange, probability } from "./format.js";
import { displayMember, type NamingPolicy } from "./naming.js";
import { renderText } from "./render-text.js";

export type NoteAudience = "channel" | "facilitators";

export interface NoteArgs {
  readonly report: AnalysisReport;
  /** Naming rules for the audience; the note names the member only where these allow it. */
  readonly policy: NamingPolicy;
  readonly audience: NoteAudience;
  /** The channel's display name for the heading; the channel id otherwise. */
  readonly channelName?: string;
}

/** A what-if cap worth trying: 25%, or the smallest feasible cap for n members, in 5% steps. */
export function suggestedCap(members: number): number {
  if (members < 2) return 1;
  const floor = Math.ceil((1 / (members - 1)) * 20 - 1e-9) / 20;
  return Math.min(1, Math.max(0.25, floor));
}

/** "Your" or "Ana's" where the naming rules allow naming the member above the line; else null. */
function namedSubject(report: AnalysisReport, policy: NamingPolicy): string | null {
  const member = report.line?.member ?? null;
  const entries = report.influence ?? [];
  const rank = entries.findIndex((e) => e.member === member);
  if (member === null || rank < 0) return null;
  if (policy.reader !== undefined && policy.reader === member) return "Your";
  if (policy.namesOn && entries[rank].named)
    return `${displayMember(entries[rank], rank + 1, policy)}'s`;
  return null;
}

function suggestions(report: AnalysisReport): string[] {
  const cap = suggestedCap(report.members);
  return [
    "Invite the quieter members to speak first, before the most-answered voices.",
    "Rotate who opens threads and who sums up a discussion.",
    "Ask everyone for a short written view before a decision, then discuss.",
    `See what a more even habit would change: /influence whatif cap ${cap.toFixed(2)}.`,
  ];
}

/** The note as neutral blocks. */
export function noteBlocks(args: NoteArgs): Block[] {
  const { report, policy, audience } = args;
  const title = audience === "facilitators" ? "Balance note for facilitators" : "Balance note";
  const blocks: Block[] = [
    { kind: "heading", text: `${title} · ${args.channelName ?? report.channel}` },
    { kind: "note", text: windowText(report) },
  ];
  const line = report.line;
  const entry = (report.influence ?? []).find((e) => e.member === line?.member);
  if (!line?.crossed || !entry || !report.effectiveVoices) {
    blocks.push({
      kind: "note",
      text: line
        ? `No member is clearly above this channel's line of ${percent(line.threshold)} right now.`
        : "There are no figures for these days, so there is no note to give.",
    });
    blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
    return blocks;
  }
  // Where individual shares are withheld the note names nobody, not even a named member.
  const named = disclose(report, policy).individual ? namedSubject(report, policy) : null;
  const subject = named ?? "One member's";
  blocks.push({
    kind: "note",
    text: `${subject} influence share is above this channel's line of ${percent(line.threshold)}, with probability ${probability(line.probability)}. Their share is ${percent(entry.share)} (interval ${percentRange(entry.low, entry.high)}); an even split would give each of the ${report.members} active members ${percent(1 / report.members)}.`,
  });
  blocks.push({
    kind: "note",
    text: `What it means: the channel's shared view leans on one member's view, so what the others know counts for less. Right now the channel's shared view is worth about ${decimal1(report.effectiveVoices.value)} independent voices of ${report.members}.`,
  });
  const lead =
    audience === "facilitators"
      ? "What you might try:"
      : "What the channel might try (facilitators especially):";
  blocks.push({
    kind: "note",
    text: [lead, ...suggestions(report).map((s) => `• ${s}`)].join("\n"),
  });
  if (named === null) {
    blocks.push({
      kind: "note",
      text: "This note names nobody. The member concerned can see their own figures privately with /influence me.",
    });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  blocks.push({ kind: "footer", text: EXPLAIN_POINTER });
  return blocks;
}

/** The balance note, ready to post: blocks plus their plain-text rendering. */
export function noteMessage(args: NoteArgs): OutgoingMessage {
  const blocks = noteBlocks(args);
  return { blocks, text: renderText(blocks) };
}
