/**
 * @module handle-command
 * Parses and routes `/influence …` (DESIGN.md §6) to its command and returns a neutral response.
 * An unknown or misspelt command gets one line: the nearest command (nearest-match.ts) and its
 * one-line usage; a known command with words it does not take gets that command's usage. Errors a user can cause (a bad setting, range
 * or member) come back as a private answer that names the fix; anything else is rethrown for the
 * adapter to log, never shown as a stack trace.
 */

import type { Block } from "../domain/blocks.js";
import { isPlumblineError } from "../domain/errors.js";
import { explainMessage, explainMoreMessage } from "../report/explain-blocks.js";
import { COMMAND_WORDS, commandUsage, helpMessage } from "../report/help-text.js";
import { check, compare, me, whatIf } from "./analysis-commands.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { facilitator, group, report, set, showSettings } from "./facilitator-commands.js";
import { compareFormatsCommand, format } from "./format-commands.js";
import { join, leave, status } from "./membership-commands.js";
import { nearestMatch } from "./nearest-match.js";
import { words } from "./parse-input.js";
import { respond, respondNotes } from "./respond.js";

export type {
  CommandContext,
  CommandDeps,
  CommandResponse,
  Visibility,
} from "./command-types.js";

type Route = (
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
) => Promise<CommandResponse | null>;

const none =
  (run: (context: CommandContext, deps: CommandDeps) => Promise<CommandResponse>): Route =>
  async (context, deps, args) =>
    args.length === 0 ? run(context, deps) : null;

const ROUTES: Record<string, Route> = {
  check,
  me: none(me),
  join,
  leave: none(leave),
  explain: async (_context, _deps, args) =>
    args.length === 0
      ? { visibility: "private", message: explainMessage() }
      : args.length === 1 && args[0].toLowerCase() === "more"
        ? { visibility: "private", message: explainMoreMessage() }
        : null,
  status: none(status),
  compare: async (context, deps, args) =>
    args[0]?.toLowerCase() === "formats"
      ? compareFormatsCommand(context, deps, args.slice(1))
      : compare(context, deps, args),
  whatif: whatIf,
  report,
  settings: none(showSettings),
  set,
  group,
  format,
  facilitator,
  help: none(async () => ({ visibility: "private", message: helpMessage() })),
};

function shorten(text: string): string {
  return text.length > 60 ? `${text.slice(0, 57)}...` : text;
}

/** One line for a word that is no command: the nearest command and its usage, if one is near. */
export function unknownCommand(word: string): CommandResponse {
  const near = nearestMatch(word, COMMAND_WORDS);
  const shown = shorten(word);
  if (near === null) {
    return respondNotes(
      `There is no command "${shown}". /influence help lists every command in one line each.`,
    );
  }
  return respondNotes(
    `There is no command "${shown}"; did you mean \`${near}\`? ${commandUsage(near)}.`,
  );
}

/** One line for a known command given words it does not take: that command's usage. */
function usageOf(name: string, text: string, args: readonly string[]): CommandResponse {
  const said =
    args.length === 0
      ? `/influence ${name} needs more words.`
      : `/influence ${shorten(text)} is not a form of ${name} I know.`;
  return respondNotes(`${said} ${commandUsage(name)}.`);
}

/** Answers one `/influence` command. */
export async function handleCommand(
  context: CommandContext,
  deps: CommandDeps,
): Promise<CommandResponse> {
  const [first, ...args] = words(context.text);
  const name = (first ?? "check").toLowerCase();
  const route = Object.hasOwn(ROUTES, name) ? ROUTES[name] : undefined;
  if (!route) return unknownCommand(first ?? "");
  try {
    return (await route(context, deps, args)) ?? usageOf(name, context.text.trim(), args);
  } catch (error) {
    if (!isPlumblineError(error)) throw error;
    const blocks: Block[] = [{ kind: "note", text: sentence(error.message) }];
    // A bad setting's message already lists the allowed values; its hint would repeat them.
    if (error.hint && error.code !== "SETTING_BAD_VALUE") {
      blocks.push({ kind: "note", text: `To fix: ${error.hint}.` });
    }
    return respond(blocks);
  }
}

function sentence(text: string): string {
  const capital = text.charAt(0).toUpperCase() + text.slice(1);
  return /[.!?]$/.test(capital) ? capital : `${capital}.`;
}
