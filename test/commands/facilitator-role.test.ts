/**
 * Facilitators are a role stored with their platform id, separate from their consent for counting
 * (DESIGN.md §7): a facilitator who joined `counted` gets facilitator-only balance notes, is still
 * never named in figures, and loses the role (and its kept id) when they leave.
 */
import { describe, expect, it } from "vitest";
import { createBot } from "../../adapters/create-bot.js";
import type { ChatPlatform, OutgoingMessage } from "../../src/ports/chat-platform.js";
import { ManualClock } from "../../src/ports/clock.js";
import { silentLogger } from "../../src/ports/logger.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { TEST_KEY } from "../store/test-key.js";
import { CHANNEL, DAY, HOUR, NAMES, T0 } from "./channel-fixture.js";

class RecordingPlatform implements ChatPlatform {
  readonly name = "test";
  readonly channelPosts: OutgoingMessage[] = [];
  readonly privatePosts: { member: string; message: OutgoingMessage }[] = [];
  async postToChannel(_channel: string, message: OutgoingMessage) {
    this.channelPosts.push(message);
    return { messageId: `p${this.channelPosts.length}` };
  }
  async postPrivately(_channel: string, member: string, message: OutgoingMessage) {
    this.privatePosts.push({ member, message });
  }
  async displayName(member: string) {
    return NAMES[member] ?? null;
  }
}

async function channelWithCountedFacilitator() {
  const store = createMemoryStore({ idKey: TEST_KEY });
  await store.registerChannel(CHANNEL, null);
  const platform = new RecordingPlatform();
  const clock = new ManualClock(T0);
  const bot = createBot({
    store,
    platform,
    clock,
    logger: silentLogger,
    facilitators: ["UBOSS"],
    replicaId: "r1",
  });
  const run = (member: string, text: string) =>
    bot.onCommand({ channel: CHANNEL, member, text, isPlatformAdmin: false });
  for (const m of ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY"]) await run(m, "join");
  await run("UBOSS", "facilitator add UCY");
  await run("UBOSS", "set notes facilitators");
  await run("UBOSS", "set digest off");
  // Everyone answers UANA: one member far above the line.
  let id = 0;
  for (const from of ["UBO", "UCY", "UDEE", "UELI", "UFAY"]) {
    for (let k = 0; k < 8; k++) {
      id++;
      await bot.onEvent(
        {
          type: "message",
          at: T0 + HOUR + id * 60_000,
          channel: CHANNEL,
          id: `m${id}`,
          author: from,
          mentions: ["UANA", ...(k % 2 === 0 ? [] : ["UBO"])].filter((m) => m !== from),
        },
        `e${id}`,
      );
    }
  }
  for (const [from, to] of [
    ["UANA", "UBO"],
    ["UANA", "UCY"],
    ["UANA", "UDEE"],
  ]) {
    id++;
    await bot.onEvent(
      {
        type: "message",
        at: T0 + 2 * HOUR + id * 60_000,
        channel: CHANNEL,
        id: `m${id}`,
        author: from,
        mentions: [to],
      },
      `e${id}`,
    );
  }
  return { store, platform, clock, bot, run };
}

describe("the facilitator role", () => {
  it("a facilitator who joined counted receives facilitator-only notes and is never named", async () => {
    const { platform, clock, bot, store } = await channelWithCountedFacilitator();
    // UCY's consent keeps no platform id; the role does.
    expect(await store.facilitatorPlatformIds(CHANNEL)).toEqual(["UCY"]);
    clock.set(T0 + DAY);
    const report = await bot.scheduler.tick();
    expect(report.posted.map((p) => p.audience)).toContain("facilitators");
    const targets = platform.privatePosts.map((p) => p.member).sort();
    expect(targets).toEqual(["UBOSS", "UCY"]);
    expect(platform.channelPosts).toEqual([]);
    for (const { message } of platform.privatePosts) {
      expect(message.text).toContain("Balance note for facilitators");
      expect(message.text).not.toContain(NAMES.UCY);
      expect(message.text).not.toContain("UCY");
    }
  });

  it("leaving ends the role and forgets its platform id", async () => {
    const { store, run, clock } = await channelWithCountedFacilitator();
    clock.set(T0 + DAY);
    const left = await run("UCY", "leave");
    expect(left.message.text.length).toBeGreaterThan(0);
    expect(await store.facilitatorPlatformIds(CHANNEL)).toEqual([]);
    expect(await store.isFacilitator(CHANNEL, "UCY")).toBe(false);
  });
});
