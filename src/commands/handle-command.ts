/**
 * @module handle-command
 * Parses and routes `/influence …` (DESIGN.md §6) to its command and returns a neutral response.
 * Input it does not understand gets the help text. Errors a user can cause (a bad setting, range
 * or member) come back as a private answer that names the fix; anything else is rethrown for the
 * adapter to log, never shown as a stack trace.
 */

import type { Block } from "../domain/blocks.js";
import { isPlumblineError } from "../domain/errors.js";
import { explainMessage } from "../report/explain-blocks.js";
import { helpMessage } from "../report/help-text.js";
import { check, compare, me, whatIf } from "./analysis-commands.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { facilitator, group, report, set, showSettings } from "./facilitator-commands.js";
import { join, leave, status } from "./membership-commands.js";
import { words } from "./parse-input.js";
import { respond } from "./respond.js";

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
  explain: none(async () => ({ visibility: "private", message: explainMessage() })),
  status: none(status),
  compare,
  whatif: whatIf,
  report,
  settings: none(showSettings),
  set,
  group,
  facilitator,
  help: none(async () => ({ visibility: "private", message: helpMessage() })),
};

function help(unknown: string): CommandResponse {
  return { visibility: "private", message: helpMessage({ unknown }) };
}

/** Answers one `/influence` command. */
export async function handleCommand(
  context: CommandContext,
  deps: CommandDeps,
): Promise<CommandResponse> {
  const [first, ...args] = words(context.text);
  const name = (first ?? "check").toLowerCase();
  const route = Object.hasOwn(ROUTES, name) ? ROUTES[name] : undefined;
  if (!route) return help(context.text.trim());
  try {
    return (await route(context, deps, args)) ?? help(context.text.trim());
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
