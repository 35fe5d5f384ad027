/**
 * @module demo-replay
 * `npm run demo`: the invented scenario replayed through the whole bot — ingestion into a real
 * SQLite store, the scheduler on a simulated clock (digests every Monday 09:00 UTC, notes checked
 * hourly), a few member commands, and a facilitator's compare of the two meeting formats (by dates,
 * then by the tagged format periods). Prints every post as the channel would see it.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { ChatEvent } from "../../src/domain/events.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { ManualClock } from "../../src/ports/clock.js";
import { silentLogger } from "../../src/ports/logger.js";
import { CAUTIONS_FULL } from "../../src/report/cautions.js";
import { openStore } from "../../src/store/open-store.js";
import { createBot } from "../create-bot.js";
import { ConsoleSession } from "./console-session.js";
import {
  DEMO_CHANNEL,
  DEMO_START,
  DEMO_SWITCH_WEEK,
  DEMO_WEEKS,
  demoDescription,
  demoEvents,
  demoRanges,
} from "./demo-scenario.js";
import { LocalPlatform } from "./local-platform.js";

export const DEMO_FACILITATOR = "ines";

const HOUR_MS = 3_600_000;

function day(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

function keyOf(event: ChatEvent, k: number): string {
  return event.type === "message" ? `demo:${event.id}` : `demo:${event.type}:${k}`;
}

/** Runs the replay, printing through `print`; returns the number of posts the bot made. */
export async function runDemoReplay(print: (text: string) => void): Promise<number> {
  const scratch = mkdtempSync(join(tmpdir(), "plumbline-demo-"));
  const store = await openStore(`sqlite:${join(scratch, "demo.db")}`);
  try {
    const events = demoEvents();
    const clock = new ManualClock(events[0].at - 60_000);
    const platform = new LocalPlatform(print);
    const bot = createBot({
      store,
      platform,
      clock,
      logger: silentLogger,
      facilitators: [DEMO_FACILITATOR],
      replicaId: "demo",
    });
    const session = new ConsoleSession({ bot, platform, clock, channel: DEMO_CHANNEL, print });
    const as = async (line: string) => {
      print(`> ${line}\n`);
      await session.line(line);
    };
    print(
      `${demoDescription()}\n\nEvery post below is printed as the channel (or one member) would see it.\n\n`,
    );
    // Each heading names the days the posts under it cover: a week's heading covers that week
    // (its notes and answers end inside it); each Monday's digest comes under "after week N",
    // because it covers the days up to that Monday 09:00.
    const weekStart = (w: number) => DEMO_START + w * 7 * DAY_MS;
    const format = (w: number) => (w < DEMO_SWITCH_WEEK ? "coordinator-led" : "rotating hosts");
    const afterWeek = async (w: number, question = "") => {
      print(
        `\n======== Monday ${day(weekStart(w + 1))}, after week ${w + 1} (${format(w)})${question} ========\n\n`,
      );
      // The digest is due at 09:00; the new week's first thread opens at 09:00 or later.
      await session.advanceTo(weekStart(w + 1) + HOUR_MS);
      if (w === DEMO_SWITCH_WEEK - 1) {
        print(
          "(Before the switch to rotating hosts, rosa looks at the coordinator-led weeks.)\n\n",
        );
        await as("rosa> /influence check");
      }
    };
    let week = -1;
    for (const [k, event] of events.entries()) {
      const eventWeek = Math.floor((event.at - DEMO_START) / (7 * DAY_MS));
      if (eventWeek !== week && eventWeek >= 0) {
        if (week >= 0) await afterWeek(week);
        else await session.advanceTo(weekStart(0));
        week = eventWeek;
        print(
          `\n======== Week ${week + 1} of ${DEMO_WEEKS} (${format(week)}), ${day(weekStart(week))} to ${day(weekStart(week) + 6 * DAY_MS)} ========\n\n`,
        );
        if (week === 0) {
          await as(`${DEMO_FACILITATOR}> /influence set names on`);
        }
        if (week === 2) await as("lena> /influence me");
        if (week === DEMO_SWITCH_WEEK) {
          print("(The channel switches to rotating hosts this week.)\n\n");
        }
      }
      await session.advanceTo(event.at);
      await bot.onEvent(event, keyOf(event, k));
    }
    await afterWeek(DEMO_WEEKS - 1, ": did the new format help?");
    const { a, b } = demoRanges();
    await as(`${DEMO_FACILITATOR}> /influence compare ${a.label} ${b.label}`);
    // The same question by the tagged format periods, each read on its own.
    await as(`${DEMO_FACILITATOR}> /influence compare formats`);
    print(
      `\nBefore you use figures like these:\n${CAUTIONS_FULL.map((c) => `  - ${c}`).join("\n")}\n`,
    );
    print(
      "\nNext: `npx plumbline console` to type as members yourself, or `npx plumbline demo --write-log demo.jsonl` and `npx plumbline analyze demo.jsonl`.\n",
    );
    return platform.posts.length;
  } finally {
    await store.close();
    rmSync(scratch, { recursive: true, force: true });
  }
}
