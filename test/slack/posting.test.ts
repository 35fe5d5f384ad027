/**
 * Posts and answers out, against a nock'd stand-in for the Slack Web API (SLACK_API_URL) and for
 * `hooks.slack.com`: the scheduler's digest reaches `chat.postMessage` as Block Kit with a text
 * fallback; a 429 with `Retry-After: 2` is waited out (the injected sleep records the wait) and
 * then posted once; a 5xx is not retried; `/influence` is acknowledged at once and answered
 * through `respond()` at the `response_url`. Rate-limit behaviour per docs.slack.dev/apis/web-api/
 * rate-limits (HTTP 429 with Retry-After in seconds).
 */
import nock from "nock";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import {
  API_HOST,
  CHANNEL,
  consent,
  fixture,
  fixtureText,
  type Harness,
  post,
  SENTINEL,
  sendSigned,
  signedHeaders,
  startHarness,
  T0,
} from "./harness.js";

let h: Harness;

beforeEach(async () => {
  h = await startHarness();
});

afterEach(async () => {
  await h.close();
});

const DIGEST_AT = T0 + 60 * 60_000 + 30_000; // Monday 09:00:30 UTC

async function channelWithActivity(): Promise<void> {
  await consent(h, ["U0ANA", "U0BO", "U0CY"]);
  await sendSigned(h, fixture("message.json"));
  await sendSigned(h, fixture("thread-reply.json"));
  await sendSigned(h, fixture("thread-broadcast.json"));
}

function formBody(body: unknown): Record<string, string> {
  return typeof body === "string"
    ? Object.fromEntries(new URLSearchParams(body))
    : (body as Record<string, string>);
}

describe("posting to Slack", () => {
  it("posts the digest with chat.postMessage as Block Kit with a plain-text fallback", async () => {
    await channelWithActivity();
    const seen: Record<string, string>[] = [];
    const scope = nock(API_HOST)
      .post("/api/chat.postMessage", (body) => {
        seen.push(formBody(body));
        return true;
      })
      .reply(200, { ok: true, channel: "C0GENERAL", ts: "1793610030.000100" });
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    expect(report.posted).toEqual([
      expect.objectContaining({ channel: CHANNEL, kind: "digest", messageId: "1793610030.000100" }),
    ]);
    scope.done();
    expect(seen).toHaveLength(1);
    expect(seen[0].channel).toBe("C0GENERAL");
    expect(seen[0].text.length).toBeGreaterThan(0);
    const blocks = JSON.parse(seen[0].blocks) as { type: string }[];
    expect(blocks.length).toBeGreaterThan(0);
    expect(blocks.every((b) => b.type === "section" || b.type === "context")).toBe(true);
    expect(JSON.stringify(seen[0])).not.toContain(SENTINEL);
  });

  it("waits out a 429 with Retry-After: 2, then posts once", async () => {
    await channelWithActivity();
    let calls = 0;
    const scope = nock(API_HOST)
      .post("/api/chat.postMessage")
      .reply(() => {
        calls++;
        return [429, { ok: false, error: "ratelimited" }, { "Retry-After": "2" }];
      })
      .post("/api/chat.postMessage")
      .reply(() => {
        calls++;
        return [200, { ok: true, ts: "1793610031.000200" }];
      });
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    scope.done();
    expect(calls).toBe(2);
    expect(report.posted.map((p) => p.messageId)).toEqual(["1793610031.000200"]);
    expect(Math.max(...h.sleeps)).toBeGreaterThanOrEqual(2000);
  });

  it("does not retry a post that failed with a 5xx at once (its outcome is unknown)", async () => {
    await channelWithActivity();
    let calls = 0;
    nock(API_HOST)
      .post("/api/chat.postMessage")
      .times(3)
      .reply(() => {
        calls++;
        return [503, "upstream unavailable"];
      });
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(calls).toBe(1);
    expect(report.posted).toEqual([]);
    expect(report.failed).toEqual([expect.objectContaining({ channel: CHANNEL, kind: "digest" })]);
    const claim = await h.store.getClaim({
      channel: CHANNEL,
      kind: "digest",
      period: report.failed[0].period ?? "",
    });
    expect(claim?.platformMessageId ?? null).toBeNull();
  });

  it("asks conversations.history about a post whose answer was lost; found, it is recorded, not re-posted", async () => {
    await channelWithActivity();
    const posts: Record<string, string>[] = [];
    nock(API_HOST)
      .post("/api/chat.postMessage", (body) => {
        posts.push(formBody(body));
        return true;
      })
      .reply(503, "upstream unavailable");
    h.clock.set(DIGEST_AT);
    const first = await h.bot.scheduler.tick();
    expect(first.failed).toEqual([expect.objectContaining({ channel: CHANNEL, kind: "digest" })]);
    const period = first.failed[0].period ?? "";
    const marker = JSON.parse(posts[0].metadata) as { event_type: string; event_payload: unknown };
    expect(marker).toEqual({
      event_type: "plumbline_post",
      event_payload: { claim: `digest ${period}` },
    });
    // The post did arrive: Slack lists it with its metadata once the lease has ended.
    const asked: Record<string, string>[] = [];
    nock(API_HOST)
      .post("/api/conversations.history", (body) => {
        asked.push(formBody(body));
        return true;
      })
      .reply(200, {
        ok: true,
        messages: [
          { ts: "1793610099.000300", text: "someone else" },
          { ts: "1793610031.000200", metadata: marker },
        ],
        has_more: false,
      });
    h.clock.advance(15 * 60_000 + 1);
    const second = await h.bot.scheduler.tick();
    expect(asked).toHaveLength(1);
    expect(asked[0]).toMatchObject({ channel: "C0GENERAL", include_all_metadata: "true" });
    expect(Number(asked[0].oldest)).toBeLessThanOrEqual(DIGEST_AT / 1000);
    expect(second.settled).toEqual([{ channel: CHANNEL, kind: "digest", period, found: true }]);
    expect(second.posted).toEqual([]);
    expect(await h.store.getClaim({ channel: CHANNEL, kind: "digest", period })).toMatchObject({
      status: "posted",
      platformMessageId: "1793610031.000200",
    });
    expect(posts).toHaveLength(1);
  });

  it("re-posts once a post whose answer was lost when Slack's history does not show it", async () => {
    await channelWithActivity();
    let posts = 0;
    nock(API_HOST)
      .post("/api/chat.postMessage")
      .reply(() => {
        posts++;
        return [504, "gateway timeout"];
      })
      .post("/api/conversations.history")
      .reply(200, { ok: true, messages: [{ ts: "1793610099.000300" }], has_more: false })
      .post("/api/chat.postMessage")
      .reply(() => {
        posts++;
        return [200, { ok: true, ts: "1793610931.000400" }];
      });
    h.clock.set(DIGEST_AT);
    const first = await h.bot.scheduler.tick();
    const period = first.failed[0]?.period ?? "";
    h.clock.advance(15 * 60_000 + 1);
    const second = await h.bot.scheduler.tick();
    expect(second.settled).toEqual([{ channel: CHANNEL, kind: "digest", period, found: false }]);
    expect(second.posted.map((p) => p.messageId)).toEqual(["1793610931.000400"]);
    expect(posts).toBe(2);
    // Later passes neither ask nor post again (nock refuses any further call).
    h.clock.advance(60 * 60_000);
    const third = await h.bot.scheduler.tick();
    expect([third.posted, third.failed, third.settled, third.missed]).toEqual([[], [], [], []]);
  });

  it("records a post Slack refused (channel_not_found) as missed with Slack's reason, and never re-posts it", async () => {
    await channelWithActivity();
    let posts = 0;
    nock(API_HOST)
      .post("/api/chat.postMessage")
      .reply(() => {
        posts++;
        return [200, { ok: false, error: "channel_not_found" }];
      });
    h.clock.set(DIGEST_AT);
    const first = await h.bot.scheduler.tick();
    expect(first.failed).toEqual([]);
    // (The week before the harness's first slot is found 24 h late: a miss of its own.)
    const refusedMisses = first.missed.filter((m) => m.reason !== "too-late");
    expect(refusedMisses).toEqual([
      expect.objectContaining({ channel: CHANNEL, reason: "refused", detail: "channel_not_found" }),
    ]);
    const period = refusedMisses[0].period;
    expect(await h.store.getClaim({ channel: CHANNEL, kind: "digest", period })).toMatchObject({
      status: "missed",
      platformMessageId: "(missed: refused: channel_not_found)",
    });
    for (let i = 0; i < 4; i++) {
      h.clock.advance(15 * 60_000 + 1);
      expect((await h.bot.scheduler.tick()).posted).toEqual([]);
    }
    expect(posts).toBe(1);
  });

  it("reopens a digest still rate limited after the queue's waits at Slack's Retry-After, and posts it once then", async () => {
    await channelWithActivity();
    let posts = 0;
    const limited = () => {
      posts++;
      return [429, { ok: false, error: "ratelimited" }, { "Retry-After": "30" }] as const;
    };
    nock(API_HOST)
      .post("/api/chat.postMessage")
      .times(4)
      .reply(limited)
      .post("/api/chat.postMessage")
      .reply(() => {
        posts++;
        return [200, { ok: true, ts: "1793610200.000500" }];
      });
    h.clock.set(DIGEST_AT);
    const first = await h.bot.scheduler.tick();
    // The queue waited Retry-After three times (the harness's sleep moves the clock), then gave up.
    expect(posts).toBe(4);
    expect(h.sleeps.filter((ms) => ms >= 30_000)).toHaveLength(3);
    expect(first.failed).toEqual([]);
    expect(first.retrying).toEqual([
      expect.objectContaining({
        channel: CHANNEL,
        kind: "digest",
        retryAt: h.clock.now() + 30_000,
      }),
    ]);
    const retryAt = first.retrying[0].retryAt;
    h.clock.set(retryAt - 1000);
    expect((await h.bot.scheduler.tick()).posted).toEqual([]);
    expect(posts).toBe(4);
    h.clock.set(retryAt + 1);
    const later = await h.bot.scheduler.tick();
    expect(later.posted.map((p) => p.messageId)).toEqual(["1793610200.000500"]);
    expect(posts).toBe(5);
    expect(later.posted[0].slotAt).toBeGreaterThan(retryAt - DIGEST_AT);
  });

  it("keeps posts in one channel about a second apart", async () => {
    const times: number[] = [];
    nock(API_HOST)
      .post("/api/chat.postMessage")
      .times(3)
      .reply(() => {
        times.push(h.clock.now());
        return [200, { ok: true, ts: `1793610040.00000${times.length}` }];
      });
    const message = { blocks: [{ kind: "note" as const, text: "hello" }], text: "hello" };
    await Promise.all([0, 1, 2].map(() => h.adapter.platform.postToChannel(CHANNEL, message)));
    expect(times).toHaveLength(3);
    expect(times[1] - times[0]).toBeGreaterThanOrEqual(1000);
    expect(times[2] - times[1]).toBeGreaterThanOrEqual(1000);
  });

  it("sends private posts with chat.postEphemeral in the channel", async () => {
    const seen: Record<string, string>[] = [];
    nock(API_HOST)
      .post("/api/chat.postEphemeral", (body) => {
        seen.push(formBody(body));
        return true;
      })
      .reply(200, { ok: true, message_ts: "1793610050.000100" });
    await h.adapter.platform.postPrivately(CHANNEL, "U0ANA", {
      blocks: [{ kind: "note", text: "for you" }],
      text: "for you",
    });
    expect(seen).toEqual([
      expect.objectContaining({ channel: "C0GENERAL", user: "U0ANA", text: "for you" }),
    ]);
  });

  it("looks up display names with users.info and caches them briefly", async () => {
    const scope = nock(API_HOST)
      .post("/api/users.info")
      .once()
      .reply(200, {
        ok: true,
        user: { id: "U0ANA", name: "ana", profile: { display_name: "Ana P." } },
      });
    expect(await h.adapter.platform.displayName("U0ANA")).toBe("Ana P.");
    expect(await h.adapter.platform.displayName("U0ANA")).toBe("Ana P.");
    scope.done();
    expect(await h.adapter.platform.displayName("teams:29:abc")).toBeNull();
  });
});

describe("/influence", () => {
  it("acknowledges at once and answers through respond() at the response_url", async () => {
    const answers: Record<string, unknown>[] = [];
    const hook = nock("https://hooks.slack.com")
      .post("/commands/T0PLUMB/1234/abcd", (body) => {
        answers.push(body as Record<string, unknown>);
        return true;
      })
      .reply(200, "ok");
    nock(API_HOST)
      .post("/api/users.info")
      .reply(200, {
        ok: true,
        user: { id: "U0ANA", is_admin: false, is_owner: false, profile: {} },
      });
    const body = fixtureText("slash-command.txt");
    const reply = await post(
      h.port,
      body,
      signedHeaders(body, h.clock.now(), "application/x-www-form-urlencoded"),
    );
    expect(reply.status).toBe(200);
    expect(reply.body).toBe("");
    await waitFor(() => hook.isDone());
    expect(answers).toHaveLength(1);
    expect(answers[0].response_type).toBe("ephemeral");
    expect(typeof answers[0].text).toBe("string");
    const snapshot = await h.store.loadSnapshot(CHANNEL);
    expect(snapshot.consent).toEqual([
      expect.objectContaining({ member: "U0ANA", level: "named" }),
    ]);
  });

  it("records a command delivered to two replicas once, by its trigger_id, whatever their clocks", async () => {
    nock(API_HOST)
      .post("/api/users.info")
      .reply(200, { ok: true, user: { id: "U0ANA", is_admin: false, profile: {} } });
    const body = fixtureText("slash-command.txt");
    const start = h.clock.now();
    // The replica whose clock is 2 s ahead answers first; the other, behind, gets the same request.
    for (const at of [start + 2_000, start]) {
      const hook = nock("https://hooks.slack.com").post("/commands/T0PLUMB/1234/abcd").reply(200);
      h.clock.set(at);
      const reply = await post(
        h.port,
        body,
        signedHeaders(body, at, "application/x-www-form-urlencoded"),
      );
      expect(reply.status).toBe(200);
      await waitFor(() => hook.isDone());
    }
    expect((await h.store.loadSnapshot(CHANNEL)).consent).toEqual([
      expect.objectContaining({ member: "U0ANA", level: "named", at: start + 2_000 }),
    ]);
  });

  it("answers `check post` in the channel for a workspace admin", async () => {
    const answers: Record<string, unknown>[] = [];
    const hook = nock("https://hooks.slack.com")
      .post("/commands/T0PLUMB/1234/abcd", (body) => {
        answers.push(body as Record<string, unknown>);
        return true;
      })
      .reply(200, "ok");
    nock(API_HOST)
      .post("/api/users.info")
      .reply(200, { ok: true, user: { id: "U0ANA", is_admin: true, profile: {} } });
    const body = fixtureText("slash-command.txt").replace("text=join+named", "text=check+post");
    const reply = await post(
      h.port,
      body,
      signedHeaders(body, h.clock.now(), "application/x-www-form-urlencoded"),
    );
    expect(reply.status).toBe(200);
    await waitFor(() => hook.isDone());
    expect(answers[0].response_type).toBe("in_channel");
    expect(Array.isArray(answers[0].blocks)).toBe(true);
  });

  it("refuses to run inside a thread", async () => {
    const answers: Record<string, unknown>[] = [];
    const hook = nock("https://hooks.slack.com")
      .post("/commands/T0PLUMB/1234/abcd", (body) => {
        answers.push(body as Record<string, unknown>);
        return true;
      })
      .reply(200, "ok");
    const body = `${fixtureText("slash-command.txt")}&thread_ts=1793606460.000100`;
    const reply = await post(
      h.port,
      body,
      signedHeaders(body, h.clock.now(), "application/x-www-form-urlencoded"),
    );
    expect(reply.status).toBe(200);
    await waitFor(() => hook.isDone());
    expect(String(answers[0].text)).toMatch(/not inside a thread/);
    expect((await h.store.loadSnapshot(CHANNEL)).consent).toEqual([]);
  });
});

/** Polls (without timers) until the condition holds; the answer is sent after the ack. */
async function waitFor(condition: () => boolean): Promise<void> {
  for (let k = 0; k < 100_000 && !condition(); k++) await new Promise((r) => setImmediate(r));
  expect(condition()).toBe(true);
}
