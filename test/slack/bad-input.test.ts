/**
 * Every bad request gets its status code, stores nothing and leaves the server running. The
 * expectations follow Slack's request verification rules (docs.slack.dev/authentication/
 * verifying-requests-from-slack: v0 HMAC-SHA256 over `v0:timestamp:body`, five-minute window) and
 * the bad-input table in the project's reliability notes (401 / 400 / 413 / 200).
 */
import { createHmac } from "node:crypto";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { MAX_BODY_BYTES } from "../../adapters/slack/request-guard.js";
import {
  CHANNEL,
  consent,
  fixture,
  fixtureText,
  type Harness,
  post,
  signedHeaders,
  startHarness,
} from "./harness.js";

// One harness per test, so the cases hold in any order (the suite runs shuffled in CI once).
let h: Harness;

beforeEach(async () => {
  h = await startHarness();
  await consent(h, ["U0ANA", "U0BO"]);
});

afterEach(async () => {
  await h.close();
});

const message = () => JSON.stringify(fixture("message.json"));
const FORM = "application/x-www-form-urlencoded";
const MINUTE = 60_000;

interface Case {
  readonly name: string;
  readonly status: number;
  readonly send: () => Promise<{ status: number; body: string }>;
}

const cases: Case[] = [
  {
    name: "bad signature",
    status: 401,
    send: () => {
      const headers = signedHeaders(message(), h.clock.now());
      headers["x-slack-signature"] = `v0=${"0".repeat(64)}`;
      return post(h.port, message(), headers);
    },
  },
  {
    name: "signature made with another secret",
    status: 401,
    send: () => {
      // The v0 scheme by hand (HMAC-SHA256 over `v0:timestamp:body`), under a secret that is not
      // the app's; the body is untouched.
      const body = message();
      const timestamp = String(Math.floor(h.clock.now() / 1000));
      const headers = signedHeaders(body, h.clock.now());
      const hmac = createHmac("sha256", "some-other-apps-signing-secret");
      headers["x-slack-signature"] = `v0=${hmac.update(`v0:${timestamp}:${body}`).digest("hex")}`;
      expect(headers["x-slack-request-timestamp"]).toBe(timestamp);
      return post(h.port, body, headers);
    },
  },
  {
    name: "missing signature headers",
    status: 401,
    send: () => post(h.port, message(), { "content-type": "application/json" }),
  },
  {
    name: "timestamp 6 minutes old",
    status: 401,
    send: () => post(h.port, message(), signedHeaders(message(), h.clock.now() - 6 * MINUTE)),
  },
  {
    name: "timestamp 6 minutes in the future",
    status: 401,
    send: () => post(h.port, message(), signedHeaders(message(), h.clock.now() + 6 * MINUTE)),
  },
  {
    name: "malformed JSON with a good signature",
    status: 400,
    send: () => {
      const body = fixtureText("malformed.json.txt");
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "body over 1 MB (signed)",
    status: 413,
    send: () => {
      const body = Buffer.alloc(MAX_BODY_BYTES + 1, 0x20);
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "envelope without event_id",
    status: 400,
    send: () => {
      const body = fixtureText("missing-event-id.json");
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "JSON without a type",
    status: 400,
    send: () => {
      const body = JSON.stringify({ team_id: "T0PLUMB" });
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "message event without a user",
    status: 200,
    send: () => {
      const body = fixtureText("message-missing-user.json");
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "slash command whose channel id holds NUL (C\\0Z)",
    status: 400,
    send: () => {
      const body = fixtureText("slash-command.txt").replace(
        "channel_id=C0GENERAL",
        "channel_id=C%00Z",
      );
      return post(h.port, body, signedHeaders(body, h.clock.now(), FORM));
    },
  },
  {
    name: "slash command whose team id holds ESC [ 2 J",
    status: 400,
    send: () => {
      const body = fixtureText("slash-command.txt").replace(
        "team_id=T0PLUMB",
        "team_id=T0%1B%5B2J",
      );
      return post(h.port, body, signedHeaders(body, h.clock.now(), FORM));
    },
  },
  {
    name: "slash command whose user id is lower case",
    status: 400,
    send: () => {
      const body = fixtureText("slash-command.txt").replace("user_id=U0ANA", "user_id=u0ana");
      return post(h.port, body, signedHeaders(body, h.clock.now(), FORM));
    },
  },
  {
    name: "event envelope whose team id holds NUL",
    status: 400,
    send: () => {
      const body = JSON.stringify({ ...fixture("message.json"), team_id: "T0\u0000PLUMB" });
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
  {
    name: "unknown event type",
    status: 200,
    send: () => {
      const body = fixtureText("unknown-event-type.json");
      return post(h.port, body, signedHeaders(body, h.clock.now()));
    },
  },
];

describe("bad input", () => {
  for (const c of cases) {
    it(`${c.name} → ${c.status}, nothing stored`, async () => {
      const reply = await c.send();
      expect(reply.status).toBe(c.status);
      expect((await h.store.loadSnapshot(CHANNEL)).messages).toEqual([]);
      expect((await h.store.listChannels()).map((c) => c.channel)).toEqual([CHANNEL]);
      // The server still answers a good request afterwards (nothing is stored from it either:
      // url_verification only echoes its challenge).
      const ping = JSON.stringify(fixture("url-verification.json"));
      const pong = await post(h.port, ping, signedHeaders(ping, h.clock.now()));
      expect(pong.status).toBe(200);
    });
  }

  it("answers url_verification with its challenge", async () => {
    const body = fixtureText("url-verification.json");
    const reply = await post(h.port, body, signedHeaders(body, h.clock.now()));
    expect(reply.status).toBe(200);
    expect(JSON.parse(reply.body)).toEqual({
      challenge: fixture("url-verification.json").challenge,
    });
  });

  it("refuses other methods with 405", async () => {
    const reply = await new Promise<number>((resolve, reject) => {
      import("node:http").then(({ get }) =>
        get({ host: "127.0.0.1", port: h.port, path: "/slack/events" }, (res) => {
          res.resume();
          resolve(res.statusCode ?? 0);
        }).on("error", reject),
      );
    });
    expect(reply).toBe(405);
  });

  it("counts a message whose blocks nest 254,000 arrays deep (a 508 KB body) from its text, never 500", async () => {
    const depth = 254_000;
    const base = fixture("message.json");
    const event = base.event as Record<string, unknown>;
    const deep = `${"[".repeat(depth)}${"]".repeat(depth)}`;
    const blocks = `[{"type":"rich_text","block_id":"b1","elements":${deep}}]`;
    const envelope = JSON.stringify({
      ...base,
      event_id: "Ev0DEEP00001",
      event: { ...event, blocks: "@@" },
    });
    const body = envelope.replace('"@@"', blocks);
    expect(body.length).toBeGreaterThan(508_000);
    expect(body.length).toBeLessThan(MAX_BODY_BYTES);
    const reply = await post(h.port, body, signedHeaders(body, h.clock.now()));
    expect(reply.status).toBe(200);
    const messages = (await h.store.loadSnapshot(CHANNEL)).messages;
    expect(messages.map((m) => [m.id, m.mentions])).toEqual([[event.ts, ["U0BO"]]]);
    expect(
      h.logger.records.some(
        (r) => r.message === "slack blocks nest too deep; mentions read from the text",
      ),
    ).toBe(true);
  });

  it("accepts a timestamp 4 minutes off, so the window is 5 minutes and not less", async () => {
    const body = JSON.stringify({ ...fixture("message.json"), event_id: "Ev0SKEW00001" });
    const reply = await post(h.port, body, signedHeaders(body, h.clock.now() + 4 * MINUTE));
    expect(reply.status).toBe(200);
    expect((await h.store.loadSnapshot(CHANNEL)).messages).toHaveLength(1);
  });

  it("logs refusals one line each, at most 10 a minute, then says how many were left out", async () => {
    h.clock.advance(61_000);
    const before = h.logger.records.length;
    for (let k = 0; k < 100; k++) {
      const headers = signedHeaders(message(), h.clock.now());
      headers["x-slack-signature"] = `v0=${"0".repeat(64)}`;
      expect((await post(h.port, message(), headers)).status).toBe(401);
    }
    const refused = h.logger.records
      .slice(before)
      .filter((r) => r.message === "slack request refused");
    expect(refused).toHaveLength(10);
    h.clock.advance(61_000);
    const headers = signedHeaders(message(), h.clock.now());
    headers["x-slack-signature"] = `v0=${"0".repeat(64)}`;
    expect((await post(h.port, message(), headers)).status).toBe(401);
    expect(h.logger.records.at(-1)?.fields).toMatchObject({ status: 401, suppressed: 90 });
  });
});
