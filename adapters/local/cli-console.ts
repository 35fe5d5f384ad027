/**
 * @module cli-console
 * `plumbline console`: type as members of one channel and see exactly what the bot would post,
 * publicly or privately. Uses the real store (default: a temporary SQLite file, deleted on exit).
 * When standard input is not a terminal it reads the whole session from it and exits 0 at its end,
 * so sessions can be scripted.
 */
import { randomBytes } from "node:crypto";
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { createInterface } from "node:readline";
import { PlumblineError } from "../../src/domain/errors.js";
import { ManualClock } from "../../src/ports/clock.js";
import { silentLogger } from "../../src/ports/logger.js";
import { openStore } from "../../src/store/open-store.js";
import { createBot } from "../create-bot.js";
import { parseCommandArgs, parseUntil } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { CONSOLE_HELP, ConsoleSession } from "./console-session.js";
import { LocalPlatform } from "./local-platform.js";

const USAGE =
  "plumbline console [--db URL] [--channel NAME] [--facilitator NAME ...] [--start TIME]";

export async function runConsole(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    {
      db: { type: "string" },
      channel: { type: "string" },
      facilitator: { type: "string", multiple: true },
      start: { type: "string" },
    },
    USAGE,
  );
  if (parsed.positionals.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${parsed.positionals[0]}"`, {
      hint: `usage: ${USAGE}`,
    });
  }
  const stdin = io.stdin ?? process.stdin;
  const fromFlags = Array.isArray(parsed.values.facilitator) ? parsed.values.facilitator : [];
  const fromEnv = (io.env.PLUMBLINE_FACILITATORS ?? "")
    .split(",")
    .map((s) => s.trim())
    .filter(Boolean);
  const facilitators = [...new Set([...fromFlags, ...fromEnv])];
  const channel = typeof parsed.values.channel === "string" ? parsed.values.channel : "console";
  const start =
    typeof parsed.values.start === "string" ? parseUntil(parsed.values.start) : Date.now();
  const db = typeof parsed.values.db === "string" ? parsed.values.db : undefined;
  const scratch = db === undefined ? mkdtempSync(join(tmpdir(), "plumbline-console-")) : null;
  const store = await openStore(db ?? `sqlite:${join(scratch ?? "", "console.db")}`, {
    cwd: io.cwd,
    ...(io.env.PLUMBLINE_ID_KEY ? { idKey: io.env.PLUMBLINE_ID_KEY } : {}),
    ...(db?.startsWith("postgres") && !io.env.PLUMBLINE_ID_KEY
      ? { idKey: randomBytes(32).toString("hex") }
      : {}),
  });
  const clock = new ManualClock(start);
  const platform = new LocalPlatform((text) => io.stdout(text));
  const bot = createBot({
    store,
    platform,
    clock,
    logger: silentLogger,
    facilitators,
    replicaId: "console",
  });
  const session = new ConsoleSession({ bot, platform, clock, channel, print: (t) => io.stdout(t) });
  const interactive = stdin.isTTY === true;
  try {
    if (interactive) {
      io.stdout(
        `plumbline console, channel #${channel}. ${facilitators.length ? `Facilitators: ${facilitators.join(", ")}.` : "No facilitators (use --facilitator NAME)."}\n${CONSOLE_HELP}\n`,
      );
    }
    const lines = createInterface({
      input: stdin,
      terminal: interactive,
      ...(interactive ? { prompt: "> " } : {}),
    });
    if (interactive) lines.prompt();
    for await (const line of lines) {
      if (!interactive && line.trim() !== "") io.stdout(`> ${line}\n`);
      const more = await session.line(line);
      if (!more) break;
      if (interactive) lines.prompt();
    }
    lines.close();
  } finally {
    await store.close();
    if (scratch !== null) rmSync(scratch, { recursive: true, force: true });
  }
  return 0;
}
