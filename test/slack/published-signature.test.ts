/**
 * The Slack guard against Slack's own published example, not a signature this project computes:
 * Slack, "Verifying requests from Slack" (api.slack.com/authentication/verifying-requests-from-slack,
 * also docs.slack.dev/authentication/verifying-requests-from-slack), the worked example with
 * signing secret 8f742231b10e8888abcd99yyyzzz85a5, timestamp 1531420618, a slash-command form
 * body, and the resulting X-Slack-Signature v0=a2114d57…c69b503. The request goes over real HTTP on
 * loopback into `guardRequest`, with the clock pinned to the example's timestamp.
 */
import { createServer, request as httpRequest, type Server } from "node:http";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { type GuardOutcome, guardRequest } from "../../adapters/slack/request-guard.js";

const SLACK_SECRET = "8f742231b10e8888abcd99yyyzzz85a5";
const SLACK_TIMESTAMP = "1531420618";
const SLACK_BODY =
  "token=xyzz0WbapA4vBCDEFasx0q6G&team_id=T1DC2JH3J&team_domain=testteamnow&channel_id=G8PSS9T3V&channel_name=foobar&user_id=U2CERLKJA&user_name=roadrunner&command=%2Fwebhook-collect&text=&response_url=https%3A%2F%2Fhooks.slack.com%2Fcommands%2FT1DC2JH3J%2F397700885554%2F96rGlfmibIGlgcZRskXaIFfN&trigger_id=398738663015.47445629121.803a0bc887a14d10d2c447fce8b6703c";
const SLACK_SIGNATURE = "v0=a2114d57b48eac39b9ad189dd8316235a7b4a8d21a10bd27519666489c69b503";

let server: Server;
let port = 0;
let secret = SLACK_SECRET;
let nowMs = Number(SLACK_TIMESTAMP) * 1000;
const outcomes: GuardOutcome[] = [];

beforeAll(async () => {
  server = createServer((request, response) => {
    void guardRequest(request, { signingSecret: secret, now: () => nowMs }).then((outcome) => {
      outcomes.push(outcome);
      response.statusCode = outcome.ok ? 200 : outcome.status;
      response.end();
    });
  });
  await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
  port = (server.address() as AddressInfo).port;
});

afterAll(async () => {
  await new Promise<void>((resolve) => server.close(() => resolve()));
});

function post(body: string, signature: string, timestamp = SLACK_TIMESTAMP): Promise<number> {
  return new Promise((resolve, reject) => {
    const req = httpRequest(
      {
        host: "127.0.0.1",
        port,
        method: "POST",
        path: "/slack/commands",
        headers: {
          "content-type": "application/x-www-form-urlencoded",
          "x-slack-request-timestamp": timestamp,
          "x-slack-signature": signature,
        },
      },
      (response) => {
        response.resume();
        response.on("end", () => resolve(response.statusCode ?? 0));
      },
    );
    req.on("error", reject);
    req.end(body);
  });
}

describe("Slack's published signing example", () => {
  it("is accepted and parsed as the slash command it is", async () => {
    secret = SLACK_SECRET;
    nowMs = Number(SLACK_TIMESTAMP) * 1000;
    expect(await post(SLACK_BODY, SLACK_SIGNATURE)).toBe(200);
    const outcome = outcomes.at(-1);
    expect(outcome?.ok).toBe(true);
    if (outcome?.ok) {
      expect(outcome.form).toBe("urlencoded");
      expect(outcome.body.command).toBe("/webhook-collect");
      expect(outcome.body.trigger_id).toBe(
        "398738663015.47445629121.803a0bc887a14d10d2c447fce8b6703c",
      );
    }
  });

  it("is refused when one byte of the body changes", async () => {
    secret = SLACK_SECRET;
    nowMs = Number(SLACK_TIMESTAMP) * 1000;
    expect(await post(SLACK_BODY.replace("foobar", "foobas"), SLACK_SIGNATURE)).toBe(401);
  });

  it("is refused under another signing secret, body untouched", async () => {
    secret = `${SLACK_SECRET.slice(0, -1)}6`;
    nowMs = Number(SLACK_TIMESTAMP) * 1000;
    expect(await post(SLACK_BODY, SLACK_SIGNATURE)).toBe(401);
    secret = SLACK_SECRET;
  });

  it("is refused once the example's timestamp is more than five minutes old", async () => {
    secret = SLACK_SECRET;
    nowMs = (Number(SLACK_TIMESTAMP) + 301) * 1000;
    expect(await post(SLACK_BODY, SLACK_SIGNATURE)).toBe(401);
    nowMs = (Number(SLACK_TIMESTAMP) + 299) * 1000;
    expect(await post(SLACK_BODY, SLACK_SIGNATURE)).toBe(200);
  });
});
