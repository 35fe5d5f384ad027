/**
 * Test harness: a console session on a real SQLite file, a manual clock and the real bot.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { createBot } from "../../adapters/create-bot.js";
import { ConsoleSession } from "../../adapters/local/console-session.js";
import { LocalPlatform } from "../../adapters/local/local-platform.js";
import { ManualClock } from "../../src/ports/clock.js";
import { silentLogger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import { openStore } from "../../src/store/open-store.js";

export const START = Date.UTC(2026, 10, 2, 7, 0, 0); // Monday 2026-11-02 07:00 UTC

export interface Harness {
  readonly session: ConsoleSession;
  readonly platform: LocalPlatform;
  readonly clock: ManualClock;
  readonly store: Store;
  readonly output: string[];
  /** Types lines in order. */
  type(...lines: string[]): Promise<void>;
  /** Channel posts (not private answers) whose text includes `marker`. */
  posts(marker: string): string[];
  close(): Promise<void>;
}

export async function consoleHarness(options: { facilitators?: string[] } = {}): Promise<Harness> {
  const dir = mkdtempSync(join(tmpdir(), "plumbline-console-test-"));
  const store = await openStore(`sqlite:${join(dir, "console.db")}`);
  const clock = new ManualClock(START);
  const output: string[] = [];
  const platform = new LocalPlatform((text) => output.push(text));
  const bot = createBot({
    store,
    platform,
    clock,
    logger: silentLogger,
    facilitators: options.facilitators ?? [],
    replicaId: "test",
  });
  const session = new ConsoleSession({
    bot,
    platform,
    clock,
    channel: "team",
    print: (text) => output.push(text),
  });
  return {
    session,
    platform,
    clock,
    store,
    output,
    async type(...lines) {
      for (const line of lines) await session.line(line);
    },
    posts(marker) {
      return platform.posts
        .filter((p) => p.privateTo === null && p.text.includes(marker))
        .map((p) => p.text);
    },
    async close() {
      await store.close();
      rmSync(dir, { recursive: true, force: true });
    },
  };
}

/** Every member in `members` joins (named). */
export function joins(members: readonly string[]): string[] {
  return members.map((m) => `${m}> /influence join named`);
}

/** One round of messages where every member except the hub mentions the hub twice. */
export function hubRound(hub: string, others: readonly string[]): string[] {
  return others
    .flatMap((m) => [`${m}> what do you think @${hub}`, `${m}> agreed @${hub}`])
    .concat([`${hub}> thanks @${others[0]}`]);
}

/** One round where each member mentions the next two around a ring. */
export function ringRound(members: readonly string[]): string[] {
  return members.flatMap((m, k) => [
    `${m}> over to you @${members[(k + 1) % members.length]}`,
    `${m}> and you @${members[(k + 2) % members.length]}`,
  ]);
}
