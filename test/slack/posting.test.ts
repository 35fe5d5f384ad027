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

  it("does not retry a post that failed with a 5xx; the claim becomes a miss", async () => {
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
