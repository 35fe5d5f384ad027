#!/usr/bin/env node
/**
 * @module cli
 * `plumbline <command>`: the local adapter's entry point. Routes to one module per command; every
 * error a user can cause prints one line naming the problem and the fix, and exits with code 2.
 */
import { nearestMatch } from "../../src/commands/nearest-match.js";
import { isPlumblineError } from "../../src/domain/errors.js";
import { printable } from "../../src/report/printable.js";
import type { CliIo } from "./cli-io.js";

type Command = (argv: readonly string[], io: CliIo) => Promise<number>;

// Each command's module is imported when that command runs: `analyze` then never loads serve's
// config schema (zod, 200 modules), pino, the schedulers or the store drivers, which took about
// 0.5 s of CPU at every start (DEVELOPERS.md, "Speed").
const runAnalyze: Command = async (a, io) => (await import("./cli-analyze.js")).runAnalyze(a, io);
const runCompare: Command = async (a, io) => (await import("./cli-analyze.js")).runCompare(a, io);
const runWhatIf: Command = async (a, io) => (await import("./cli-analyze.js")).runWhatIf(a, io);
const runConsole: Command = async (a, io) => (await import("./cli-console.js")).runConsole(a, io);
const runDemo: Command = async (a, io) => (await import("./cli-demo.js")).runDemo(a, io);
const runFormats: Command = async (a, io) => (await import("./cli-formats.js")).runFormats(a, io);
const runRekey: Command = async (a, io) => (await import("./cli-rekey.js")).runRekey(a, io);
const runReport: Command = async (a, io) => (await import("./cli-report.js")).runReport(a, io);
const runServe: Command = async (a, io) => (await import("./cli-serve.js")).runServe(a, io);
const runIngest: Command = async (a, io) => (await import("./cli-store.js")).runIngest(a, io);
const runMigrate: Command = async (a, io) => (await import("./cli-store.js")).runMigrate(a, io);
const runPurge: Command = async (a, io) => (await import("./cli-store.js")).runPurge(a, io);

const COMMANDS: Record<string, { run: Command; summary: string; about: string }> = {
  analyze: {
    run: runAnalyze,
    summary: "analyze <log> [flags] [--json]",
    about: "influence shares, effective voices, structure",
  },
  compare: {
    run: runCompare,
    summary: "compare <log> --a RANGE --b RANGE",
    about: "two periods side by side, P(B more balanced)",
  },
  formats: {
    run: runFormats,
    summary: "formats <log> [--a F --b F]",
    about: "meeting formats compared on their own periods",
  },
  whatif: {
    run: runWhatIf,
    summary: "whatif <log> --cap SHARE",
    about: "recompute with attention to any one member capped",
  },
  report: {
    run: runReport,
    summary: "report <log> --out FILE",
    about: "a self-contained HTML page with charts (add --a RANGE --b RANGE to compare)",
  },
  ingest: {
    run: runIngest,
    summary: "ingest <log> [--db URL]",
    about: "import a log into the store (importing twice changes nothing)",
  },
  migrate: {
    run: runMigrate,
    summary: "migrate [--db URL]",
    about: "bring the store's schema up to date",
  },
  purge: {
    run: runPurge,
    summary: "purge [--db URL]",
    about: "drop signals past retention (91 days) and old delivery keys",
  },
  rekey: {
    run: runRekey,
    summary: "rekey --new-key-file F [--db URL]",
    about: "rotate the member id key: re-key every row in one transaction",
  },
  console: {
    run: runConsole,
    summary: "console [--facilitator NAME]",
    about: "type as members, run commands, see the bot's answers",
  },
  serve: {
    run: runServe,
    summary: "serve",
    about: "run the bot for Slack and/or Teams (configured by environment variables)",
  },
  demo: {
    run: runDemo,
    summary: "demo [--write-log FILE]",
    about: "the invented scenario replayed through the bot: digests, notes, commands",
  },
};

export const HELP = `plumbline: how evenly a chat channel's discussion pools what its members know.

Usage: plumbline <command> [arguments]

Commands:
${[...Object.values(COMMANDS), { summary: "help", about: "this text" }]
  .map((c) => `  ${c.summary.padEnd(36)}${c.about}`)
  .join("\n")}

Every analysing command reads a log, or the store with --db URL --channel C.
Model flags (analyze, compare, formats, whatif): --channel C --until TIME --window DAYS --half-life DAYS
  --reply-weight W --mention-weight W --background B --self-weight S --samples K --interval P
  --seed N --threshold auto|SHARE --min-members N --min-signals N --skip-bad --json
Ranges are YYYY-MM-DD..YYYY-MM-DD, both days included (UTC).
`;

export async function main(argv: readonly string[], given: CliIo): Promise<number> {
  // Every text the CLI writes (reports, the console, errors naming bad input) has its control
  // characters escaped, so ids holding terminal escape sequences print as visible text.
  const io: CliIo = {
    ...given,
    stdout: (text) => given.stdout(printable(text)),
    stderr: (text) => given.stderr(printable(text)),
  };
  const [name, ...rest] = argv;
  if (name === undefined || name === "help" || name === "--help" || name === "-h") {
    io.stdout(HELP);
    return 0;
  }
  const command = Object.hasOwn(COMMANDS, name) ? COMMANDS[name] : undefined;
  if (!command) {
    const near = nearestMatch(name, Object.keys(COMMANDS));
    io.stderr(
      near === null
        ? `plumbline: unknown command "${name}". Run "plumbline help" for the list. [ARG_UNKNOWN]\n`
        : `plumbline: unknown command "${name}"; did you mean "${near}"? Usage: plumbline ${COMMANDS[near].summary} (${COMMANDS[near].about}) [ARG_UNKNOWN]\n`,
    );
    return 2;
  }
  try {
    return await command.run(rest, io);
  } catch (error) {
    if (isPlumblineError(error)) {
      io.stderr(
        `plumbline: ${error.message}${error.hint ? ` (${error.hint})` : ""} [${error.code}]\n`,
      );
      return 2;
    }
    const message = error instanceof Error ? error.message : String(error);
    io.stderr(
      `plumbline: internal error: ${message}. Please report it with the command you ran.\n`,
    );
    if (io.env.PLUMBLINE_DEBUG) io.stderr(`${error instanceof Error ? error.stack : ""}\n`);
    return 1;
  }
}

/** True when this file is the process's entry point (also through npm's bin symlink). */
async function isEntryPoint(): Promise<boolean> {
  const entry = process.argv[1];
  if (entry === undefined) return false;
  const { realpathSync } = await import("node:fs");
  const { fileURLToPath } = await import("node:url");
  try {
    return realpathSync(entry) === realpathSync(fileURLToPath(import.meta.url));
  } catch {
    return false;
  }
}

const invokedDirectly = await isEntryPoint();
if (invokedDirectly) {
  const io: CliIo = {
    stdout: (t) => process.stdout.write(t),
    stderr: (t) => process.stderr.write(t),
    env: process.env,
    cwd: process.cwd(),
    now: () => performance.now(),
  };
  main(process.argv.slice(2), io).then((code) => {
    process.exitCode = code;
  });
}
