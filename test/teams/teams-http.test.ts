import { existsSync, readFileSync } from "node:fs";
import nock from "nock";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import {
  CHANNEL,
  CHANNEL_CONVERSATION,
  type ConnectorCall,
  commandFrom,
  fakeConnector,
  fixture,
  fixtureText,
  type Harness,
  SENTINEL,
  SERVICE_ORIGIN,
  startHarness,
} from "./harness.js";

let h: Harness;
let calls: ConnectorCall[];

beforeEach(async () => {
  nock.disableNetConnect();
  nock.enableNetConnect("127.0.0.1");
  calls = fakeConnector();
  h = await startHarness();
});

afterEach(async () => {
  await h.close();
  nock.cleanAll();
  nock.enableNetConnect();
});

const key = (member: string) => `~${h.store.memberKey(member)}`;

async function installAndJoin(): Promise<void> {
  expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(200);
  h.clock.set(Date.parse("2026-11-01T09:00:00Z"));
  for (const [who, id] of [
    ["ana", "0901"],
    ["ben", "0902"],
    ["carla", "0903"],
  ] as const) {
    expect((await h.post(commandFrom(who, "join", id))).status).toBe(200);
  }
}

async function snapshot() {
  return h.store.loadSnapshot(CHANNEL);
}

describe("Teams adapter over HTTP (authentication off, real CloudAdapter)", () => {
  it("counts messages, thread replies and mentions; a redelivered activity counts once", async () => {
    await installAndJoin();
    // Each join was answered privately in a personal conversation, never counted as a message.
    expect(calls.filter((c) => c.path === "/amer/v3/conversations")).toHaveLength(3);
    const created = calls.find((c) => c.path === "/amer/v3/conversations")?.body as {
      members: { id: string }[];
    };
    expect(created.members[0].id).toBe("29:ana-account");
    expect((await snapshot()).messages).toHaveLength(0);

    for (const name of [
      "channel-message.json",
      "thread-reply.json",
      "thread-reply.json",
      "mention.json",
    ]) {
      expect((await h.post(fixture(name))).status).toBe(200);
    }
    const messages = (await snapshot()).messages;
    expect(messages.map((m) => m.id)).toEqual(["1001", "1002", "1003"]);
    const [root, reply, mention] = messages;
    expect(root).toMatchObject({ author: key("aad-ana"), parentAuthor: null, mentions: [] });
    expect(reply).toMatchObject({ author: key("aad-ben"), parentAuthor: key("aad-ana") });
    expect(mention).toMatchObject({
      author: key("aad-carla"),
      parentAuthor: null,
      mentions: [key("aad-ana")],
    });
  });

  it("resolves a mention of an account not yet seen through the roster (TeamsInfo.getMember)", async () => {
    await installAndJoin();
    h.clock.set(Date.parse("2026-11-01T09:30:00Z"));
    // Dan has not written yet; Carla's edit mentions Ben, whom the process knows from his join.
    const dan = commandFrom("dan", "join", "0904");
    expect((await h.post(dan)).status).toBe(200);
    const mentionDan = fixture("mention.json", {
      id: "1010",
      conversation: {
        conversationType: "channel",
        tenantId: "tenant-0001",
        id: `${CHANNEL_CONVERSATION};messageid=1010`,
      },
      entities: [
        { type: "mention", text: "<at>Zed</at>", mentioned: { id: "29:zed-account", name: "Zed" } },
      ],
    });
    expect((await h.post(mentionDan)).status).toBe(200);
    const stored = (await snapshot()).messages.find((m) => m.id === "1010");
    // Zed is not in the roster (404): the mention is dropped, the message still counted.
    expect(stored?.mentions).toEqual([]);
    expect(
      calls.some(
        (c) => c.method === "GET" && c.path.endsWith(encodeURIComponent("29:zed-account")),
      ),
    ).toBe(true);
  });

  it("an edit replaces the mentions, a soft delete removes the message and an undelete restores it", async () => {
    await installAndJoin();
    for (const name of ["channel-message.json", "thread-reply.json", "mention.json"])
      await h.post(fixture(name));
    expect((await h.post(fixture("edit-message.json"))).status).toBe(200);
    expect((await snapshot()).messages.find((m) => m.id === "1003")?.mentions).toEqual([
      key("aad-ben"),
    ]);
    expect((await h.post(fixture("soft-delete.json"))).status).toBe(200);
    expect((await h.post(fixture("soft-delete.json"))).status).toBe(200);
    expect((await snapshot()).messages.find((m) => m.id === "1002")?.deleted).toBe(true);
    expect((await h.post(fixture("undelete.json"))).status).toBe(200);
    expect((await snapshot()).messages.find((m) => m.id === "1002")?.deleted).toBe(false);
  });

  it("posts the weekly digest proactively to the bare channel as an Adaptive Card 1.5", async () => {
    await installAndJoin();
    for (const name of ["channel-message.json", "thread-reply.json", "mention.json"])
      await h.post(fixture(name));
    const before = calls.length;
    h.clock.set(Date.parse("2026-11-02T09:00:30Z")); // Monday 09:00 UTC: the default digest slot
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    const digest = report.posted.find((p) => p.kind === "digest");
    expect(digest).toBeDefined();
    const posts = calls.slice(before).filter((c) => c.method === "POST");
    const bare = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;
    const post = posts.find((c) => c.path === bare);
    expect(post).toBeDefined();
    const body = post?.body as {
      attachments: { contentType: string; content: { version: string; fallbackText: string } }[];
    };
    expect(body.attachments[0].contentType).toBe("application/vnd.microsoft.card.adaptive");
    expect(body.attachments[0].content.version).toBe("1.5");
    expect(body.attachments[0].content.fallbackText.length).toBeGreaterThan(20);
    expect(digest?.messageId).toMatch(/^posted-/);
  });

  it("a team owner's `check post` goes to the channel; a member's is refused privately", async () => {
    await installAndJoin();
    for (const name of ["channel-message.json", "thread-reply.json", "mention.json"])
      await h.post(fixture(name));
    const bare = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;
    const before = calls.length;
    // Ben's roster entry says userRole "user": refused, answered in his personal chat.
    expect((await h.post(commandFrom("ben", "check post", "0950"))).status).toBe(200);
    expect(calls.slice(before).some((c) => c.method === "POST" && c.path === bare)).toBe(false);
    // Carla's says "owner": a platform admin, so a facilitator; the check is posted top-level.
    expect((await h.post(commandFrom("carla", "check post", "0951"))).status).toBe(200);
    expect(calls.slice(before).filter((c) => c.method === "POST" && c.path === bare)).toHaveLength(
      1,
    );
    expect((await snapshot()).messages).toHaveLength(3);
  });

  it("answers `influence` in a personal chat with a pointer to the channel", async () => {
    const personal = commandFrom("ana", "me", "0960");
    const activity = {
      ...personal,
      conversation: { conversationType: "personal", tenantId: "tenant-0001", id: "a:personal-ana" },
      entities: [],
      text: "influence me",
    };
    expect((await h.post(activity)).status).toBe(200);
    const reply = calls.find((c) =>
      c.path.startsWith(
        `/amer/v3/conversations/${encodeURIComponent("a:personal-ana")}/activities`,
      ),
    );
    expect(reply).toBeDefined();
    expect((reply?.body as { text?: string } | undefined)?.text).toMatch(/mention it there/);
    expect(await h.store.listChannels()).toEqual([]);
  });

  it("rejects bad bodies with 400 or 413 and keeps serving", async () => {
    expect((await h.post(fixtureText("bad-empty-object.json"))).status).toBe(400);
    expect((await h.post(fixtureText("bad-no-type.json"))).status).toBe(400);
    expect((await h.post(fixtureText("bad-array.json"))).status).toBe(400);
    expect((await h.post(fixtureText("bad-malformed.txt"))).status).toBe(400);
    const big = JSON.stringify({ type: "message", pad: "x".repeat(1024 * 1024 + 10) });
    expect((await h.post(big)).status).toBe(413);
    expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(200);
    expect((await h.store.listChannels()).map((c) => c.channel)).toEqual([CHANNEL]);
  });

  it("records a command activity delivered to two replicas once, by its activity id", async () => {
    expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(200);
    const at = Date.parse("2026-11-01T09:00:00Z");
    // The replica 2 s ahead takes it first; the one behind sees no consent yet at its own time.
    for (const now of [at + 2_000, at]) {
      h.clock.set(now);
      expect((await h.post(commandFrom("dan", "join", "0999"))).status).toBe(200);
    }
    const dan = (await snapshot()).consent.filter(
      (c) => c.member.startsWith("~") || c.member === "aad-dan",
    );
    expect(dan).toEqual([expect.objectContaining({ level: "counted", at: at + 2_000 })]);
  });

  it("refuses activities whose ids hold NUL, escape sequences or spaces with 400, storing nothing", async () => {
    const base = fixture("channel-message.json");
    const conversation = base.conversation as Record<string, unknown>;
    const from = base.from as Record<string, unknown>;
    const bad = [
      { conversation: { ...conversation, id: "19:gen\u0000eral@thread.tacv2" } },
      { conversation: { ...conversation, id: "19:general\u001b[2J@thread.tacv2" } },
      { conversation: { ...conversation, id: "general-channel" } },
      { conversation: { ...conversation, id: "19:general0001@thread.tacv2;messageid=x;y" } },
      { from: { ...from, aadObjectId: "aad ana" } },
      { id: "17000\u009b2J" },
    ];
    for (const overrides of bad) {
      const reply = await h.post({ ...base, ...overrides });
      expect(reply.status).toBe(400);
      expect(reply.text).toMatch(/^malformed /);
    }
    expect(await h.store.listChannels()).toEqual([]);
    expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(200);
  });

  it("erases the channel when the bot is removed from the team", async () => {
    await installAndJoin();
    await h.post(fixture("channel-message.json"));
    expect((await snapshot()).messages).toHaveLength(1);
    expect((await h.post(fixture("conversation-update-remove.json"))).status).toBe(200);
    const after = await snapshot();
    expect(after.messages).toHaveLength(0);
    expect(after.consent).toHaveLength(0);
    expect(await h.store.readChannelState(CHANNEL, "conversation")).toBeNull();
  });

  it("never lets message text reach the database file or the logs", async () => {
    await installAndJoin();
    for (const name of [
      "channel-message.json",
      "thread-reply.json",
      "mention.json",
      "edit-message.json",
      "soft-delete.json",
      "undelete.json",
    ]) {
      await h.post(fixture(name));
    }
    await h.post(fixtureText("bad-no-type.json"));
    const bytes = [h.dbPath, `${h.dbPath}-wal`].filter(existsSync).map((p) => readFileSync(p));
    expect(bytes.length).toBeGreaterThan(0);
    for (const b of bytes) expect(b.includes(Buffer.from(SENTINEL))).toBe(false);
    expect(JSON.stringify(h.logger.records)).not.toContain(SENTINEL);
    expect(
      h.logger.records.some((r) => r.level === "warn" && /AUTHENTICATION IS OFF/.test(r.message)),
    ).toBe(true);
  });
});

describe("Teams sends", () => {
  it("a 429 then 200 posts once, after one back-off", async () => {
    nock.cleanAll();
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    fakeConnectorWithoutPosts();
    await h.post(fixture("conversation-update-add.json"));
    const bare = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;
    const seen: string[] = [];
    nock(SERVICE_ORIGIN)
      .post(bare)
      .reply(429, () => {
        seen.push("429");
        return { error: { code: "TooManyRequests" } };
      })
      .post(bare)
      .reply(200, () => {
        seen.push("200");
        return { id: "posted-after-429" };
      });
    const result = await h.adapter.platform.postToChannel(CHANNEL, {
      blocks: [{ kind: "note", text: "hello" }],
      text: "hello",
    });
    expect(result.messageId).toBe("posted-after-429");
    expect(seen).toEqual(["429", "200"]);
    expect(h.sleeps).toHaveLength(1);
    expect(h.sleeps[0]).toBeGreaterThanOrEqual(500);
  });

  it("describes a failed post for the scheduler: 403 refused with Teams' code, 502 unknown, 429 left over not sent", async () => {
    nock.cleanAll();
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    fakeConnectorWithoutPosts();
    await h.post(fixture("conversation-update-add.json"));
    const bare = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;
    const platform = h.adapter.platform;
    const message = { blocks: [{ kind: "note" as const, text: "hello" }], text: "hello" };
    const failureOf = async () => {
      try {
        await platform.postToChannel(CHANNEL, message);
      } catch (error) {
        return platform.describeFailure?.(CHANNEL, error);
      }
      throw new Error("the post did not fail");
    };
    nock(SERVICE_ORIGIN)
      .post(bare)
      .reply(403, { error: { code: "BotNotInConversationRoster", message: "not a member" } });
    expect(await failureOf()).toEqual({
      outcome: "refused",
      reason: "HTTP 403 BotNotInConversationRoster",
    });
    nock(SERVICE_ORIGIN)
      .post(bare)
      .reply(502, { error: { code: "BadGateway" } });
    expect(await failureOf()).toEqual({ outcome: "unknown" });
    // The queue retries 429 up to its attempts; one still refused after them was not sent.
    nock(SERVICE_ORIGIN)
      .post(bare)
      .times(5)
      .reply(429, { error: { code: "TooManyRequests" } }, { "Retry-After": "3" });
    expect(await failureOf()).toEqual({ outcome: "not-sent", retryAfterMs: 3000 });
    // No conversation reference stored for a channel: nothing was sent, and Teams cannot be asked.
    expect(platform.findPost).toBeUndefined();
  });

  it("a 500 (outcome unknown) is not resent", async () => {
    nock.cleanAll();
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    fakeConnectorWithoutPosts();
    await h.post(fixture("conversation-update-add.json"));
    const bare = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;
    let hits = 0;
    nock(SERVICE_ORIGIN)
      .post(bare)
      .times(5)
      .reply(500, () => {
        hits += 1;
        return { error: { code: "ServiceError" } };
      });
    await expect(
      h.adapter.platform.postToChannel(CHANNEL, {
        blocks: [{ kind: "note", text: "hello" }],
        text: "hello",
      }),
    ).rejects.toThrow();
    expect(hits).toBe(1);
    expect(h.sleeps).toHaveLength(0);
  });
});

function fakeConnectorWithoutPosts(): void {
  nock(SERVICE_ORIGIN)
    .persist()
    .get(/members/)
    .reply(404, {});
}
