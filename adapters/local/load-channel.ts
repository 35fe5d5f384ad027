/**
 * @module load-channel
 * Resolves an analysing command's source: a log path (positional) or, later, `--db URL --channel C`.
 */
import { PlumblineError } from "../../src/domain/errors.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import type { ParsedCommand } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { loadLogChannel } from "./load-source.js";

export async function loadChannel(args: {
  parsed: ParsedCommand;
  io: CliIo;
  usage: string;
  until?: number;
}): Promise<{ snapshot: LedgerSnapshot; skipped: number }> {
  const { parsed, usage } = args;
  const channel = typeof parsed.values.channel === "string" ? parsed.values.channel : undefined;
  const [path, ...rest] = parsed.positionals;
  if (rest.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${rest[0]}"`, {
      hint: `usage: ${usage}`,
    });
  }
  if (path === undefined) {
    throw new PlumblineError("ARG_MISSING", "no log given", { hint: `usage: ${usage}` });
  }
  const { resolve } = await import("node:path");
  return loadLogChannel({
    path: resolve(args.io.cwd, path),
    skipBad: parsed.values["skip-bad"] === true,
    ...(channel === undefined ? {} : { channel }),
    ...(args.until === undefined ? {} : { until: args.until }),
  });
}
