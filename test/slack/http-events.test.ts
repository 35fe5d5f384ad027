/**
 * Events over real HTTP on 127.0.0.1 into a real bot on a SQLite file: counting, redelivery,
 * threads, edits, deletes, erasure, and that message text never reaches the database or the logs.
 * Payload shapes follow Slack's Events API reference (docs.slack.dev/reference/events/message and
 * its message_changed, message_deleted, thread_broadcast subtypes; @slack/types 3.2.0
 * `events/message.d.ts`).
 */
import { readFileSync } from "node:fs";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import {
  CHANNEL,
  consent,
  fixture,
  type Harness,
  SENTINEL,
  sendSigned,
  startHarness,
  withEnvelope,
} from "./harness.js";

let h: Harness;

beforeEach(async () => {
  h = await startHarness();
});

afterEach(async () => {
  await h.close();
});

async function messages() {
  return (await h.store.loadSnapshot(CHANNEL)).messages;
}

describe("slack events over HTTP", () => {
  it("counts a signed message with its rich_text mention", async () => {
    await consent(h, ["U0ANA", "U0BO", "U0CY"]);
    const reply = await sendSigned(h, fixture("message.json"));
    expect(reply.status).toBe(200);
    expect(await messages()).toEqual([
      expect.objectContaining({
        id: "1793606460.000100",
        author: "U0ANA",
        parentAuthor: null,
        mentions: ["U0BO"],
        deleted: false,
      }),
    ]);
  });

  it("counts the same event_id once when Slack redelivers it", async () => {
    await consent(h, ["U0ANA", "U0BO"]);
    const first = await sendSigned(h, fixture("message.json"));
    const again = fixture("message.json");
    // A redelivery carries the same envelope; a different ts under the same id must not count.
    (again.event as Record<string, unknown>).ts = "1793606461.000100";
    const second = await sendSigned(h, again);
    expect([first.status, second.status]).toEqual([200, 200]);
    expect((await messages()).map((m) => m.id)).toEqual(["1793606460.000100"]);
  });

  it("answers 500 when ingestion fails, so Slack retries, and the retry counts once", async () => {
    await consent(h, ["U0ANA", "U0BO"]);
    const original = h.bot.onEvent.bind(h.bot);
    const spy = vi.spyOn(h.bot, "onEvent").mockRejectedValueOnce(new Error("database is locked"));
    expect((await sendSigned(h, fixture("message.json"))).status).toBe(500);
    expect(await messages()).toEqual([]);
    spy.mockImplementation(original);
    expect((await sendSigned(h, fixture("message.json"))).status).toBe(200);
    expect((await sendSigned(h, fixture("message.json"))).status).toBe(200);
    expect((await messages()).map((m) => m.id)).toEqual(["1793606460.000100"]);
  });

  it("counts a thread reply as a reply to the root's author, and a broadcast too", async () => {
    await consent(h, ["U0ANA", "U0BO", "U0CY"]);
    await sendSigned(h, fixture("message.json"));
    expect((await sendSigned(h, fixture("thread-reply.json"))).status).toBe(200);
    expect((await sendSigned(h, fixture("thread-broadcast.json"))).status).toBe(200);
    const byId = new Map((await messages()).map((m) => [m.id, m]));
    expect(byId.get("1793606520.000200")).toMatchObject({ author: "U0BO", parentAuthor: "U0ANA" });
    expect(byId.get("1793606580.000300")).toMatchObject({
      author: "U0CY",
      parentAuthor: "U0ANA",
      mentions: ["U0BO"],
    });
  });

  it("replaces the mentions on message_changed and removes the signals on message_deleted", async () => {
    await consent(h, ["U0ANA", "U0BO", "U0CY"]);
    await sendSigned(h, fixture("message.json"));
    await sendSigned(h, fixture("thread-reply.json"));
    expect((await sendSigned(h, fixture("message-changed.json"))).status).toBe(200);
    expect((await messages()).find((m) => m.id === "1793606460.000100")?.mentions).toEqual([
      "U0CY",
    ]);
    expect((await sendSigned(h, fixture("message-deleted.json"))).status).toBe(200);
    expect((await messages()).find((m) => m.id === "1793606520.000200")?.deleted).toBe(true);
  });

  it("ignores bot messages and messages from the bot itself", async () => {
    await consent(h, ["U0ANA", "U0BOT"]);
    expect((await sendSigned(h, fixture("bot-message.json"))).status).toBe(200);
    const own = withEnvelope(
      fixture("message.json"),
      { event_id: "Ev0OWN000001" },
      { user: "U0BOT" },
    );
    expect((await sendSigned(h, own)).status).toBe(200);
    expect(await messages()).toEqual([]);
  });

  it("erases a member who leaves the channel, and the workspace on uninstall", async () => {
    await consent(h, ["U0ANA", "U0BO"]);
    await sendSigned(h, fixture("message.json"));
    await sendSigned(h, fixture("thread-reply.json"));
    expect((await sendSigned(h, fixture("member-left-channel.json"))).status).toBe(200);
    const left = await h.store.loadSnapshot(CHANNEL);
    expect(left.messages.map((m) => m.author)).toEqual(["U0ANA"]);
    expect(left.consent.map((c) => c.member)).not.toContain("U0BO");
    expect((await sendSigned(h, fixture("app-uninstalled.json"))).status).toBe(200);
    const after = await h.store.loadSnapshot(CHANNEL);
    expect(after.messages).toEqual([]);
    expect(after.consent).toEqual([]);
  });

  it("registers the channel with its workspace the first time it is seen", async () => {
    const before = await h.store.listChannels();
    expect(before.map((c) => c.channel)).not.toContain(CHANNEL);
    await sendSigned(h, fixture("message.json"));
    const after = await h.store.listChannels();
    expect(after.find((c) => c.channel === CHANNEL)).toMatchObject({ workspace: "T0PLUMB" });
  });

  it("never writes message text to the database file or the logs", async () => {
    await consent(h, ["U0ANA", "U0BO", "U0CY"]);
    for (const name of [
      "message.json",
      "thread-reply.json",
      "thread-broadcast.json",
      "message-changed.json",
      "message-deleted.json",
      "bot-message.json",
      "unknown-event-type.json",
      "message-missing-user.json",
    ]) {
      await sendSigned(h, fixture(name));
    }
    expect((await messages()).length).toBeGreaterThan(0);
    const files = [h.dbPath, `${h.dbPath}-wal`, `${h.dbPath}-shm`];
    for (const file of files) {
      let bytes: Buffer;
      try {
        bytes = readFileSync(file);
      } catch {
        continue;
      }
      expect(bytes.includes(Buffer.from(SENTINEL)), file).toBe(false);
    }
    expect(readFileSync(h.dbPath).length).toBeGreaterThan(0);
    const logged = JSON.stringify(h.logger.records);
    expect(h.logger.records.length).toBeGreaterThan(0);
    expect(logged).not.toContain(SENTINEL);
  });
});
