/**
 * @module help-text
 * The `/influence help` answer: every command with one line each, and who may use it. Also the
 * answer to input the bot does not understand.
 */

import type { Block, FigureRow } from "../domain/blocks.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import { renderText } from "./render-text.js";

export interface HelpEntry {
  readonly usage: string;
  readonly summary: string;
  /** True for commands only facilitators may run. */
  readonly facilitatorsOnly: boolean;
}

/** Every command (DESIGN.md §6), in the order help lists them. */
export const HELP_ENTRIES: readonly HelpEntry[] = [
  {
    usage: "check",
    summary: "the channel's balance right now, shown only to you",
    facilitatorsOnly: false,
  },
  {
    usage: "check post",
    summary: "post the same figures in the channel for everyone",
    facilitatorsOnly: true,
  },
  {
    usage: "me",
    summary: "your own share and how sure it is, shown only to you",
    facilitatorsOnly: false,
  },
  {
    usage: "join [counted|named]",
    summary:
      "opt in to be counted (`counted`, the default, is never named to others; `named` allows your name to be shown)",
    facilitatorsOnly: false,
  },
  {
    usage: "leave",
    summary: "stop being counted and delete everything stored about you here",
    facilitatorsOnly: false,
  },
  {
    usage: "explain [more]",
    summary:
      "how to read every figure, and what they cannot tell (`more`: the model behind them, by its technical names)",
    facilitatorsOnly: false,
  },
  {
    usage: "status",
    summary: "your consent, how much is counted, the settings and the next digest",
    facilitatorsOnly: false,
  },
  {
    usage: "compare [A B]",
    summary:
      "compare two periods, e.g. compare 2026-10-01..2026-10-28 2026-11-01..2026-11-28 (default: the last 28 days, or the channel's own number, against the same number of days before)",
    facilitatorsOnly: false,
  },
  {
    usage: "whatif cap <share>",
    summary:
      "what if no one gave any one member more than that share of their attention, e.g. whatif cap 25%",
    facilitatorsOnly: false,
  },
  {
    usage: "report",
    summary: "a private link to the report page with charts, valid for 24 hours",
    facilitatorsOnly: true,
  },
  { usage: "settings", summary: "show this channel's settings", facilitatorsOnly: false },
  {
    usage: "set <key> <value>",
    summary:
      "change a setting: threshold, window, halflife, digest, timezone, names, notes, minmembers",
    facilitatorsOnly: true,
  },
  {
    usage: "group <member> <label|clear>",
    summary: "put an opted-in member in a named group (or clear it) for group shares",
    facilitatorsOnly: true,
  },
  {
    usage: "format <name>|end|list",
    summary:
      "start a named format period (e.g. format written-first), end it, or list the periods; compare formats compares them",
    facilitatorsOnly: true,
  },
  {
    usage: "format trial A B weeks N",
    summary:
      "take turns with two formats week by week (add random for a random order in each pair of weeks) and post the result at the end",
    facilitatorsOnly: true,
  },
  {
    usage: "facilitator add|remove <member>",
    summary: "give or take a member's facilitator role in this channel",
    facilitatorsOnly: true,
  },
  { usage: "help", summary: "this list", facilitatorsOnly: false },
];

/** The command word of a help entry ("whatif" for "whatif cap <share>"). */
function commandWord(entry: HelpEntry): string {
  return entry.usage.split(" ")[0];
}

/** Every command word help lists, in its order. */
export const COMMAND_WORDS: readonly string[] = [...new Set(HELP_ENTRIES.map(commandWord))];

/**
 * The one-line usage of one command: "/influence whatif cap <share>: what if …", with every form
 * of it joined by "; " (check and check post). Null for a word that is no command.
 */
export function commandUsage(word: string): string | null {
  const entries = HELP_ENTRIES.filter((e) => commandWord(e) === word.toLowerCase());
  if (entries.length === 0) return null;
  return entries
    .map((e) => `/influence ${e.usage}: ${e.summary}${e.facilitatorsOnly ? " (facilitators)" : ""}`)
    .join("; ");
}

/** Help as neutral blocks; `unknown` is the input that was not understood, if any. */
export function helpBlocks(options: { unknown?: string } = {}): Block[] {
  const blocks: Block[] = [{ kind: "heading", text: "plumbline: /influence commands" }];
  if (options.unknown !== undefined) {
    const shown =
      options.unknown.length > 60 ? `${options.unknown.slice(0, 57)}...` : options.unknown;
    blocks.push({ kind: "note", text: `I did not understand "${shown}". Here is what I can do:` });
  }
  const rows: FigureRow[] = HELP_ENTRIES.map((e) => ({
    label: `/influence ${e.usage}`,
    value: e.facilitatorsOnly ? `${e.summary} (facilitators)` : e.summary,
  }));
  blocks.push({ kind: "figures", rows });
  blocks.push({
    kind: "footer",
    text: "Counting starts only for members who join. Figures are a rough proxy for attention, never for HR decisions.",
  });
  return blocks;
}

/** The help answer, ready to show. */
export function helpMessage(options: { unknown?: string } = {}): OutgoingMessage {
  const blocks = helpBlocks(options);
  return { blocks, text: renderText(blocks) };
}
